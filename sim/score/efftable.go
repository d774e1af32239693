package score

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"

	"wallcross/internal/atomicfile"
)

// effColumns is the header of an efficiency table (contract).
var effColumns = []string{"thickness_m", "speed_m_s", "lambda_eff_gev", "step_s", "n", "found", "eff", "wilson_low", "wilson_high", "cp_low", "cp_high"}

// EffColumns returns the header of an efficiency table, in file order.
func EffColumns() []string { return append([]string(nil), effColumns...) }

// An EffRow is one grid cell of an efficiency table.
type EffRow struct {
	Thickness float64 // wall thickness d, m
	Speed     float64 // wall speed, m/s; NaN = pooled over the speed prior (empty cell)
	LambdaEff float64 // effective coupling scale Λ_eff, GeV; NaN = unknown (empty cell)
	Step      float64 // representative bias step of the cell (median over its injections of the largest per-clock |step|), s; NaN = unknown
	N         int     // usable injections (not in gaps)
	Found     int     // injections found
	Eff       float64 // Found/N (NaN for N = 0)
	Wilson    Interval
	CP        Interval // Clopper–Pearson; both at EfficiencyCL
}

// NewEffRow returns a cell with its efficiency and intervals computed from
// the counts.
func NewEffRow(thickness, speed, lambdaEff, step float64, n, found int) (EffRow, error) {
	r := EffRow{Thickness: thickness, Speed: speed, LambdaEff: lambdaEff, Step: step, N: n, Found: found}
	return r, r.recompute()
}

func (r *EffRow) recompute() error {
	var err error
	if r.Wilson, err = Wilson(r.Found, r.N, EfficiencyCL); err != nil {
		return err
	}
	if r.CP, err = ClopperPearson(r.Found, r.N, EfficiencyCL); err != nil {
		return err
	}
	r.Eff = math.NaN()
	if r.N > 0 {
		r.Eff = float64(r.Found) / float64(r.N)
	}
	return nil
}

// cellKey identifies a grid cell: thickness, speed (NaN pooled) and Λ_eff.
type cellKey struct{ d, v, l string }

func keyOf(d, v, l float64) cellKey { return cellKey{fmtParam(d), fmtParam(v), fmtParam(l)} }

// rowKey is the cell of a table row: (thickness, speed, Λ_eff), or
// (thickness, speed, step) for a row without Λ_eff (a grid in the step).
func rowKey(r EffRow) cellKey {
	if math.IsNaN(r.LambdaEff) && !math.IsNaN(r.Step) {
		return cellKey{fmtParam(r.Thickness), fmtParam(r.Speed), "step=" + fmtParam(r.Step)}
	}
	return keyOf(r.Thickness, r.Speed, r.LambdaEff)
}

func fmtParam(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func fmtProb(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'f', 6, 64)
}

// lessNaN orders numbers ascending with NaN first.
func lessNaN(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && !math.IsNaN(b)
	}
	return a < b
}

// SortEff sorts rows by thickness, then speed (pooled first), then Λ_eff,
// then step (unknown first).
func SortEff(rows []EffRow) {
	sort.SliceStable(rows, func(i, j int) bool {
		a, b := rows[i], rows[j]
		if a.Thickness != b.Thickness {
			return a.Thickness < b.Thickness
		}
		if keyOf(0, a.Speed, 0) != keyOf(0, b.Speed, 0) {
			return lessNaN(a.Speed, b.Speed)
		}
		if keyOf(0, 0, a.LambdaEff) != keyOf(0, 0, b.LambdaEff) {
			return lessNaN(a.LambdaEff, b.LambdaEff)
		}
		return lessNaN(a.Step, b.Step)
	})
}

// WriteEfficiency writes rows as an efficiency table: header EffColumns,
// one row per grid cell. Parameters are written to full precision,
// probabilities to 6 decimals; NaN (pooled speed, unknown step, N = 0
// efficiency) is an empty cell.
func WriteEfficiency(w io.Writer, rows []EffRow) error {
	bw := bufio.NewWriter(w)
	for i, c := range effColumns {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(c)
	}
	bw.WriteByte('\n')
	for _, r := range rows {
		fmt.Fprintf(bw, "%s,%s,%s,%s,%d,%d,%s,%s,%s,%s,%s\n",
			fmtParam(r.Thickness), fmtParam(r.Speed), fmtParam(r.LambdaEff), fmtParam(r.Step),
			r.N, r.Found, fmtProb(r.Eff), fmtProb(r.Wilson.Low), fmtProb(r.Wilson.High), fmtProb(r.CP.Low), fmtProb(r.CP.High))
	}
	return bw.Flush()
}

// WriteEfficiencyFile writes an efficiency table atomically (temporary file
// in the same directory, then rename).
func WriteEfficiencyFile(path string, rows []EffRow) error {
	var buf bytes.Buffer
	if err := WriteEfficiency(&buf, rows); err != nil {
		return err
	}
	return writeFileAtomic(path, buf.Bytes())
}

// ReadEfficiency reads an efficiency table. Columns are found by name;
// thickness_m, n and found are required; speed_m_s, lambda_eff_gev and
// step_s are optional (empty = pooled / unknown). The efficiency and interval
// columns are not trusted: they are recomputed from n and found.
func ReadEfficiency(r io.Reader, name string) ([]EffRow, error) {
	t, err := readTable(r, name, "thickness_m", "n", "found")
	if err != nil {
		return nil, err
	}
	rows := make([]EffRow, 0, len(t.rows))
	seen := map[cellKey]int{}
	for i := range t.rows {
		var r EffRow
		if r.Thickness, err = t.float(i, "thickness_m"); err != nil {
			return nil, err
		}
		if r.LambdaEff, err = t.optFloat(i, "lambda_eff_gev"); err != nil {
			return nil, err
		}
		if r.Speed, err = t.optFloat(i, "speed_m_s"); err != nil {
			return nil, err
		}
		if r.Step, err = t.optFloat(i, "step_s"); err != nil {
			return nil, err
		}
		if r.N, err = t.integer(i, "n"); err != nil {
			return nil, err
		}
		if r.Found, err = t.integer(i, "found"); err != nil {
			return nil, err
		}
		if !(r.Thickness > 0) || r.LambdaEff <= 0 || r.Speed <= 0 {
			return nil, t.errorf(i, "thickness %g m, speed %g m/s and lambda_eff %g GeV must be positive", r.Thickness, r.Speed, r.LambdaEff)
		}
		if r.N < 0 || r.Found < 0 || r.Found > r.N {
			return nil, t.errorf(i, "columns n,found: need 0 ≤ found ≤ n, got found=%d n=%d", r.Found, r.N)
		}
		k := rowKey(r)
		if prev, dup := seen[k]; dup {
			return nil, t.errorf(i, "cell thickness=%g m speed=%s lambda_eff=%g GeV repeats line %d", r.Thickness, fmtParam(r.Speed), r.LambdaEff, prev)
		}
		seen[k] = t.line[i]
		if err := r.recompute(); err != nil {
			return nil, err
		}
		rows = append(rows, r)
	}
	return rows, nil
}

// ReadEfficiencyFile reads an efficiency table from a file.
func ReadEfficiencyFile(path string) ([]EffRow, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("score: could not open efficiency table: %w", err)
	}
	defer f.Close()
	return ReadEfficiency(bufio.NewReader(f), filepath.Base(path))
}

// MergeEfficiency pools tables: rows of the same cell (thickness, speed,
// Λ_eff; or thickness, speed, step for rows without Λ_eff) add their
// counts, the step becomes the N-weighted mean of the known steps, and the efficiency and intervals are recomputed from the
// pooled counts (never averaged). The result is sorted with SortEff.
func MergeEfficiency(tables ...[]EffRow) ([]EffRow, error) {
	type acc struct {
		row       EffRow
		stepSum   float64
		stepCount int
	}
	idx := map[cellKey]*acc{}
	var order []cellKey
	for _, tab := range tables {
		for _, r := range tab {
			if r.N < 0 || r.Found < 0 || r.Found > r.N {
				return nil, fmt.Errorf("score: merge: cell thickness=%g m lambda_eff=%g GeV has found=%d n=%d", r.Thickness, r.LambdaEff, r.Found, r.N)
			}
			k := rowKey(r)
			a, ok := idx[k]
			if !ok {
				a = &acc{row: EffRow{Thickness: r.Thickness, Speed: r.Speed, LambdaEff: r.LambdaEff}}
				if math.IsNaN(r.LambdaEff) {
					a.row.Step = r.Step // the step is the cell's coordinate
				}
				idx[k] = a
				order = append(order, k)
			}
			a.row.N += r.N
			a.row.Found += r.Found
			if !math.IsNaN(r.Step) && r.N > 0 {
				a.stepSum += r.Step * float64(r.N)
				a.stepCount += r.N
			}
		}
	}
	out := make([]EffRow, 0, len(order))
	for _, k := range order {
		a := idx[k]
		if !math.IsNaN(a.row.LambdaEff) || math.IsNaN(a.row.Step) {
			a.row.Step = math.NaN()
			if a.stepCount > 0 {
				a.row.Step = a.stepSum / float64(a.stepCount)
			}
		}
		if err := a.row.recompute(); err != nil {
			return nil, err
		}
		out = append(out, a.row)
	}
	SortEff(out)
	return out, nil
}

// writeFileAtomic writes data to a temporary file next to path, syncs it
// and renames it over path, so readers never see a half-written file.
func writeFileAtomic(path string, data []byte) error {
	if _, err := atomicfile.WriteBytes(path, data); err != nil {
		return fmt.Errorf("score: %w", err)
	}
	return nil
}

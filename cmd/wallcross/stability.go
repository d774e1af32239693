package main

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"wallcross/internal/atomicfile"
	"wallcross/noise"
	"wallcross/noise/stability"
	"wallcross/sim"
)

func newStabilityCmd() *command {
	fs := newFlagSet("stability")
	clockID := fs.String("clock", "", "analyse only the clock `ID` (default: every clock in the file)")
	input := fs.String("input", "phase", "data type: phase (s) or frequency (fractional)")
	tau0Flag := fs.Float64("tau0", 0, "sample interval in `SECONDS` (single-column files; default 1); must match the file's spacing otherwise")
	statList := fs.String("stat", "oadev", "statistics `LIST`, comma-separated: adev,oadev,mdev,tdev,hdev,ohdev,totdev")
	taus := fs.String("taus", "octave", "averaging-time grid: octave (τ0·2^k), decade (1-2-5 per decade) or all")
	csvOut := fs.Bool("csv", false, "print CSV (clock,stat,tau_s,n,value,ci_low,ci_high,edf) instead of a table")
	plotPath := fs.String("plot", "", "also draw σ(τ) with error bars to `FILE.svg` or FILE.png")
	family := fs.String("family", "", "draw the model ADEV (and MDEV) of this clock-family preset `NAME` on the plot")
	return &command{
		Name:  "stability",
		Usage: "stability FILE [--clock ID] [--input phase|frequency] [--tau0 S] [--stat oadev,mdev,...] [--taus octave|decade|all] [--csv] [--plot FILE.svg|png]",
		Short: "frequency stability (ADEV, MDEV, TDEV, HDEV, TOTDEV) of clock data",
		Long: `Stability computes frequency-stability statistics of clock phase or frequency
data (NIST SP 1065): adev (non-overlapping Allan), oadev (overlapping Allan),
mdev (modified Allan), tdev (time deviation, s), hdev and ohdev (non-
overlapping and overlapping Hadamard) and totdev (total deviation), with
equivalent degrees of freedom (Greenhall–Riley; SP 1065 Table 7 for totdev)
and 68.3 % χ² confidence intervals; the noise type used for the EDF is
identified at each τ by the lag-1 autocorrelation. Empty or NaN values are
gaps: terms touching them are skipped.

FILE is one of
  - a wide CSV as written by 'wallcross clock' and 'wallcross simulate'
    (header t_s,ID1,ID2,...; t_s in seconds; empty cell = gap),
  - a RINEX clock file (2.00 or 3.04, gzip allowed; AS and AR bias records),
  - a single-column text file, one value per line ('#' comments), sampled
    at --tau0 seconds.
Times must lie on a regular grid; missing epochs become gaps.

The default output is a table; --csv prints clock,stat,tau_s,n,value,
ci_low,ci_high,edf with tau_s in seconds and the deviations dimensionless
(tdev in seconds).

Example:
  wallcross clock --family gps-iif-rb --span 2d --step 30s --out g.csv
  wallcross stability g.csv --stat oadev,mdev --plot g.svg --family gps-iif-rb`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("stability needs exactly one FILE, got %d arguments", len(args))
			}
			var stats []stability.Stat
			for _, s := range strings.Split(*statList, ",") {
				st, err := stability.ParseStat(s)
				if err != nil {
					return usageErrorf("--stat: %v", err)
				}
				if !slices.Contains(stats, st) {
					stats = append(stats, st)
				}
			}
			var grid func(n int, s stability.Stat) []int
			switch *taus {
			case "octave":
				grid = stability.OctaveTaus
			case "decade":
				grid = stability.DecadeTaus
			case "all":
				grid = stability.AllTaus
			default:
				return usageErrorf("--taus %q: want octave, decade or all", *taus)
			}
			isPhase := true
			switch *input {
			case "phase":
			case "frequency":
				isPhase = false
			default:
				return usageErrorf("--input %q: want phase or frequency", *input)
			}
			if *tau0Flag < 0 || math.IsNaN(*tau0Flag) || math.IsInf(*tau0Flag, 0) {
				return usageErrorf("--tau0 %g: want a positive number of seconds", *tau0Flag)
			}
			var model *noise.ClockModel
			if *family != "" {
				m, err := noise.Preset(*family)
				if err != nil {
					return usageErrorf("--family: %v", err)
				}
				model = &m
			}
			if *plotPath != "" {
				if ext := strings.ToLower(filepath.Ext(*plotPath)); ext != ".svg" && ext != ".png" {
					return usageErrorf("--plot %s: want a .svg or .png file name", *plotPath)
				}
			}
			all, err := readSeries(args[0], *tau0Flag)
			if err != nil {
				return err
			}
			var sel []clockSeries
			for _, s := range all {
				if *clockID == "" || s.ID == *clockID {
					sel = append(sel, s)
				}
			}
			if len(sel) == 0 {
				ids := make([]string, len(all))
				for i, s := range all {
					ids[i] = s.ID
				}
				return fmt.Errorf("%s: no clock %q (clocks: %s)", args[0], *clockID, strings.Join(ids, ", "))
			}
			type row struct {
				clock string
				stat  stability.Stat
				r     stability.Result
			}
			var rows []row
			var curves []stability.Curve
			tau0 := sel[0].Tau0
			for _, s := range sel {
				x := s.Data
				if !isPhase {
					x = stability.FreqToPhase(s.Data, s.Tau0)
				}
				if *taus == "all" && len(x) > 100000 {
					fmt.Fprintf(stderr, "wallcross stability: %s: all-τ grid on %d points takes long (cost ∝ N²)\n", s.ID, len(x))
				}
				res, err := stability.ComputeMany(stats, x, s.Tau0, func(st stability.Stat) []int { return grid(len(x), st) }, nil)
				if err != nil {
					return fmt.Errorf("%s: clock %s: %w", args[0], s.ID, err)
				}
				for i, st := range stats {
					if len(res[i]) == 0 {
						fmt.Fprintf(stderr, "wallcross stability: %s: %s: too few points (%d) for any τ\n", s.ID, st, len(x))
					}
					for _, r := range res[i] {
						rows = append(rows, row{s.ID, st, r})
					}
					curves = append(curves, stability.Curve{Label: s.ID + " " + string(st), Results: res[i]})
				}
			}
			fmt.Fprintf(stderr, "wallcross stability: %s: %d clock(s), τ0 = %g s\n", args[0], len(sel), tau0)
			bw := bufio.NewWriter(stdout)
			if *csvOut {
				fmt.Fprintln(bw, "clock,stat,tau_s,n,value,ci_low,ci_high,edf")
				for _, r := range rows {
					fmt.Fprintf(bw, "%s,%s,%s,%d,%s,%s,%s,%s\n", r.clock, r.stat, strconv.FormatFloat(r.r.Tau, 'g', -1, 64), r.r.N,
						fmtSig(r.r.Value), fmtSig(r.r.CILow), fmtSig(r.r.CIHigh), strconv.FormatFloat(r.r.EDF, 'f', 2, 64))
				}
			} else {
				tw := tabwriter.NewWriter(bw, 0, 4, 2, ' ', tabwriter.AlignRight)
				fmt.Fprintln(tw, "clock\tstat\tτ [s]\tn\tvalue\tci_low\tci_high\tedf\tnoise\t")
				for _, r := range rows {
					fmt.Fprintf(tw, "%s\t%s\t%g\t%d\t%.4e\t%.4e\t%.4e\t%.1f\t%s\t\n", r.clock, r.stat, r.r.Tau, r.r.N,
						r.r.Value, r.r.CILow, r.r.CIHigh, r.r.EDF, noiseName(r.r.Alpha))
				}
				tw.Flush()
			}
			if err := bw.Flush(); err != nil {
				return err
			}
			if *plotPath != "" {
				var models []stability.ModelCurve
				if model != nil {
					// the preset's expected σ(τ) at the data's τ0: Allan
					// (with drift and periodic terms) and, with mdev/tdev,
					// modified Allan (noise and drift)
					models = append(models, stability.ModelCurve{Label: "model " + *family + " (ADEV)", F: func(t float64) float64 { return model.ADEV(t, tau0) }})
					if slices.Contains(stats, stability.StatMDEV) {
						models = append(models, stability.ModelCurve{Label: "model " + *family + " (MDEV)", F: func(t float64) float64 { return math.Sqrt(model.MVAR(t, tau0)) }})
					}
				}
				ylabel := "σ(τ)"
				if len(stats) == 1 && stats[0] == stability.StatTDEV {
					ylabel = "σx(τ) [s]"
				}
				p, err := stability.Plot(filepath.Base(args[0]), ylabel, curves, models...)
				if err != nil {
					return err
				}
				format := strings.TrimPrefix(strings.ToLower(filepath.Ext(*plotPath)), ".")
				if _, _, err := atomicfile.Write(*plotPath, func(w *bufio.Writer) error { return stability.WritePlot(w, p, format) }); err != nil {
					return err
				}
				fmt.Fprintf(stderr, "wallcross stability: wrote %s\n", *plotPath)
			}
			return nil
		},
	}
}

// noiseName names the power-law type of S_y ∝ f^α.
func noiseName(alpha int) string {
	switch alpha {
	case -3:
		return "FWFM"
	case -4:
		return "RRFM"
	}
	return noise.Term(2 - alpha).String()
}

// fmtSig formats with 7 significant digits (the precision of the published
// SP 1065 tables), NaN as "NaN".
func fmtSig(v float64) string { return strconv.FormatFloat(v, 'e', 6, 64) }

// clockSeries is one clock's data on a regular grid.
type clockSeries struct {
	ID   string
	Tau0 float64   // sample interval, s
	Data []float64 // phase (s) or fractional frequency; NaN = gap
}

// seriesReader turns a file into named series on regular grids. Readers
// are tried in the order of seriesReaders by their sniff function; a new
// format is added by appending one entry.
type seriesReader struct {
	name  string
	sniff func(head []byte) bool
	read  func(path string, tau0 float64) ([]clockSeries, error)
}

func seriesReaders() []seriesReader {
	return []seriesReader{
		{"RINEX clock", func(h []byte) bool {
			return len(h) >= 2 && h[0] == 0x1f && h[1] == 0x8b || bytes.Contains(firstLine(h), []byte("RINEX VERSION / TYPE"))
		}, readRinexClockSeries},
		{"wide CSV", func(h []byte) bool {
			return bytes.HasPrefix(bytes.TrimSpace(firstLine(h)), []byte("t_s,"))
		}, readWideCSV},
		{"single-column text", func([]byte) bool { return true }, readSingleColumn},
	}
}

func firstLine(h []byte) []byte {
	if i := bytes.IndexByte(h, '\n'); i >= 0 {
		return h[:i]
	}
	return h
}

// readSeries reads FILE with the first reader whose sniff accepts it.
func readSeries(path string, tau0 float64) ([]clockSeries, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("could not read %w", err)
	}
	head := make([]byte, 512)
	k, err := io.ReadFull(f, head)
	f.Close()
	if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) && !errors.Is(err, io.EOF) {
		return nil, fmt.Errorf("could not read %s: %w", path, err)
	}
	head = head[:k]
	if len(bytes.TrimSpace(head)) == 0 {
		return nil, fmt.Errorf("%s: empty file", path)
	}
	for _, r := range seriesReaders() {
		if r.sniff(head) {
			s, err := r.read(path, tau0)
			if err != nil {
				return nil, err
			}
			if len(s) == 0 {
				return nil, fmt.Errorf("%s: no clock data found (read as %s)", path, r.name)
			}
			return s, nil
		}
	}
	return nil, fmt.Errorf("%s: unknown format", path)
}

// onGrid places samples (t_i in s, ascending or not) on the regular grid
// t_0 + kτ0; τ0 is the most common spacing (or want if > 0, which must
// match it). Missing epochs become NaN.
func onGrid(name string, t, v []float64, want float64) (float64, []float64, error) {
	if len(t) == 0 {
		return 0, nil, fmt.Errorf("%s: no samples", name)
	}
	idx := make([]int, len(t))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return t[idx[a]] < t[idx[b]] })
	count := map[int64]int{} // spacing in ns → count
	for i := 1; i < len(idx); i++ {
		d := t[idx[i]] - t[idx[i-1]]
		if d <= 0 {
			return 0, nil, fmt.Errorf("%s: duplicate epoch t = %g s", name, t[idx[i]])
		}
		if !(d >= 1e-9 && d < 1e9) {
			return 0, nil, fmt.Errorf("%s: sample spacing %g s at t = %g s is outside 1 ns … 1e9 s", name, d, t[idx[i]])
		}
		count[int64(math.Round(d*1e9))]++
	}
	var tau0 float64
	best := 0
	for d, c := range count {
		if c > best || c == best && float64(d)/1e9 < tau0 {
			best, tau0 = c, float64(d)/1e9
		}
	}
	if len(t) == 1 {
		tau0 = want
		if tau0 == 0 {
			tau0 = 1
		}
	}
	if want > 0 && math.Abs(want-tau0) > 1e-9*want {
		return 0, nil, fmt.Errorf("%s: --tau0 %g s does not match the file's sample interval %g s", name, want, tau0)
	}
	t0 := t[idx[0]]
	last := t[idx[len(idx)-1]]
	nf := math.Round((last-t0)/tau0) + 1
	if !(nf <= 1<<28) {
		return 0, nil, fmt.Errorf("%s: %g s span at %g s is too many samples (%g)", name, last-t0, tau0, nf)
	}
	data := make([]float64, int(nf))
	for i := range data {
		data[i] = math.NaN()
	}
	for _, i := range idx {
		kf := (t[i] - t0) / tau0
		k := math.Round(kf)
		if math.Abs(kf-k) > 1e-6 {
			return 0, nil, fmt.Errorf("%s: epoch t = %.9g s is off the %g s grid", name, t[i], tau0)
		}
		data[int(k)] = v[i]
	}
	return tau0, data, nil
}

// readRinexClockSeries reads AS/AR bias records through sim.ReadRinexClock.
func readRinexClockSeries(path string, tau0 float64) ([]clockSeries, error) {
	cf, err := sim.ReadRinexClock(path)
	if err != nil {
		return nil, err
	}
	type acc struct{ t, v []float64 }
	byName := map[string]*acc{}
	var order []string
	for _, r := range cf.Records {
		if r.Type != "AS" && r.Type != "AR" || r.N < 1 {
			continue
		}
		a := byName[r.Name]
		if a == nil {
			a = &acc{}
			byName[r.Name] = a
			order = append(order, r.Name)
		}
		a.t = append(a.t, r.Epoch.Sub(cf.Records[0].Epoch))
		a.v = append(a.v, r.Values[0])
	}
	var out []clockSeries
	for _, n := range order {
		a := byName[n]
		t0, data, err := onGrid(path+": "+n, a.t, a.v, tau0)
		if err != nil {
			return nil, err
		}
		out = append(out, clockSeries{ID: n, Tau0: t0, Data: data})
	}
	return out, nil
}

// readWideCSV reads t_s,ID1,ID2,... (empty cell = gap).
func readWideCSV(path string, tau0 float64) ([]clockSeries, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("could not read %w", err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 1<<16), 1<<24)
	line := 0
	var ids []string
	var ts []float64
	var cols [][]float64
	for sc.Scan() {
		line++
		txt := strings.TrimRight(sc.Text(), "\r")
		if line == 1 {
			hdr := strings.Split(txt, ",")
			if strings.TrimSpace(hdr[0]) != "t_s" || len(hdr) < 2 {
				return nil, fmt.Errorf("%s:1: want a header t_s,ID1,ID2 (got %q)", path, txt)
			}
			for _, h := range hdr[1:] {
				h = strings.TrimSpace(h)
				if h == "" || slices.Contains(ids, h) {
					return nil, fmt.Errorf("%s:1: empty or repeated clock id %q", path, h)
				}
				ids = append(ids, h)
			}
			cols = make([][]float64, len(ids))
			continue
		}
		if strings.TrimSpace(txt) == "" {
			continue
		}
		fields := strings.Split(txt, ",")
		if len(fields) != len(ids)+1 {
			return nil, fmt.Errorf("%s:%d: %d fields, want %d", path, line, len(fields), len(ids)+1)
		}
		t, err := strconv.ParseFloat(strings.TrimSpace(fields[0]), 64)
		if err != nil || math.IsNaN(t) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("%s:%d: bad t_s %q", path, line, fields[0])
		}
		ts = append(ts, t)
		for j, fv := range fields[1:] {
			fv = strings.TrimSpace(fv)
			v := math.NaN()
			if fv != "" {
				v, err = strconv.ParseFloat(fv, 64)
				if err != nil || math.IsInf(v, 0) {
					return nil, fmt.Errorf("%s:%d: bad value %q for clock %s", path, line, fv, ids[j])
				}
			}
			cols[j] = append(cols[j], v)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s:%d: %w", path, line+1, err)
	}
	if len(ts) == 0 {
		return nil, fmt.Errorf("%s: no data rows", path)
	}
	var out []clockSeries
	for j, id := range ids {
		t0, data, err := onGrid(path, ts, cols[j], tau0)
		if err != nil {
			return nil, err
		}
		out = append(out, clockSeries{ID: id, Tau0: t0, Data: data})
	}
	return out, nil
}

// readSingleColumn reads one value per line at --tau0 (default 1 s).
func readSingleColumn(path string, tau0 float64) ([]clockSeries, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("could not read %w", err)
	}
	defer f.Close()
	if tau0 == 0 {
		tau0 = 1
	}
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 1<<16), 1<<20)
	var data []float64
	line := 0
	for sc.Scan() {
		line++
		txt := strings.TrimSpace(sc.Text())
		if txt == "" || strings.HasPrefix(txt, "#") {
			continue
		}
		v, err := strconv.ParseFloat(txt, 64)
		if err != nil || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%s:%d: want one number per line, got %q", path, line, txt)
		}
		data = append(data, v)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s:%d: %w", path, line+1, err)
	}
	name := strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	return []clockSeries{{ID: name, Tau0: tau0, Data: data}}, nil
}

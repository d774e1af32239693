package score

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"wallcross/orbits"
	"wallcross/sim"
)

// An Event is one injected wall from events.csv.
type Event struct {
	ID        string     // event id (column event)
	T0        float64    // time the wall's centre plane passes the geocentre, s since the first epoch
	N         [3]float64 // unit velocity direction (normalised on reading)
	Speed     float64    // speed relative to the geocentre, m/s
	Thickness float64    // wall thickness, m
	Profile   string     // profile name
	LambdaEff float64    // effective coupling scale Λ_eff, GeV; NaN if not given (empty or NaN)
	PeakDnu   float64    // peak fractional frequency shift (dimensionless); NaN if absent
	MaxStep   float64    // largest |step_s| over this event's crossings, s; NaN without crossings
	MaxLag    float64    // largest |t_cross − t0| over this event's crossings, s; 0 without crossings
}

// A Truth is the part of a dataset directory that scoring needs.
type Truth struct {
	Events []Event
	// Clocks are the clock ids of clocks.csv, in column order.
	Clocks []string
	// Start and End are the first and last epochs of clocks.csv, s.
	Start, End float64
	// Interval is the sample interval of clocks.csv (first difference of
	// t_s), s; 0 with a single epoch.
	Interval float64
	// RMax is the largest geocentric clock radius found, m, and RMaxSource
	// names the file that gave it.
	RMax       float64
	RMaxSource string
	// runs[j] lists, per clock, the maximal runs [t_a, t_b] of epochs with data.
	runs [][][2]float64
}

// Span returns the time the data cover, s: End − Start + Interval (each
// epoch stands for one sample interval).
func (t *Truth) Span() float64 { return t.End - t.Start + t.Interval }

// fallbackRMax is used when no clock position is known: the geostationary
// radius 42 164 km (physics.md §3.5, from memory), the largest GNSS orbit.
const fallbackRMax = 42164e3

// ReadTruth reads events.csv, clocks.csv and, when present, crossings.csv,
// stations.csv and orbits.sp3 from a dataset directory (DESIGN.md §5).
// Columns are found by header name. events.csv is required, and so is
// clocks.csv, except that a directory without it may hold exactly one
// RINEX clock file instead (clocks.clk, or one *.clk / *.CLK, optionally
// gzipped; e.g. the output of overlay), whose AS and AR records then give
// the data coverage, in seconds after its first epoch.
func ReadTruth(dir string) (*Truth, error) {
	tr := &Truth{}
	if err := tr.readEvents(filepath.Join(dir, "events.csv")); err != nil {
		return nil, err
	}
	if err := tr.readCrossings(filepath.Join(dir, "crossings.csv")); err != nil {
		return nil, err
	}
	err := tr.readClocks(filepath.Join(dir, "clocks.csv"))
	if errors.Is(err, fs.ErrNotExist) {
		err = tr.readRinexClocks(dir)
	}
	if err != nil {
		return nil, err
	}
	if err := tr.findRMax(dir); err != nil {
		return nil, err
	}
	return tr, nil
}

func openTable(path string, required ...string) (*table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("score: could not open %s: %w", filepath.Base(path), err)
	}
	defer f.Close()
	return readTable(bufio.NewReader(f), filepath.Base(path), required...)
}

func (tr *Truth) readEvents(path string) error {
	t, err := openTable(path, eventColumns...)
	if err != nil {
		return err
	}
	return tr.eventsFrom(t)
}

var eventColumns = []string{"event", "t0_s", "nx", "ny", "nz", "speed_m_s", "thickness_m"}

func (tr *Truth) eventsFrom(t *table) error {
	var err error
	seen := map[string]bool{}
	for i := range t.rows {
		e := Event{ID: t.str(i, "event"), Profile: t.str(i, "profile"), MaxStep: math.NaN()}
		if e.ID == "" {
			return t.errorf(i, "column event: empty event id")
		}
		if seen[e.ID] {
			return t.errorf(i, "column event: duplicate event id %q", e.ID)
		}
		seen[e.ID] = true
		if e.T0, err = t.float(i, "t0_s"); err != nil {
			return err
		}
		for j, c := range []string{"nx", "ny", "nz"} {
			if e.N[j], err = t.float(i, c); err != nil {
				return err
			}
		}
		norm := math.Sqrt(e.N[0]*e.N[0] + e.N[1]*e.N[1] + e.N[2]*e.N[2])
		if !(norm > 1e-6) {
			return t.errorf(i, "columns nx,ny,nz: direction has length %g, want a unit vector", norm)
		}
		for j := range e.N {
			e.N[j] /= norm
		}
		if e.Speed, err = t.float(i, "speed_m_s"); err != nil {
			return err
		}
		if e.Thickness, err = t.float(i, "thickness_m"); err != nil {
			return err
		}
		if e.LambdaEff, err = t.unknownFloat(i, "lambda_eff_gev"); err != nil {
			return err
		}
		if e.Speed <= 0 || e.Thickness <= 0 || e.LambdaEff <= 0 {
			return t.errorf(i, "speed %g m/s, thickness %g m and lambda_eff %g GeV must be positive", e.Speed, e.Thickness, e.LambdaEff)
		}
		if e.PeakDnu, err = t.unknownFloat(i, "peak_dnu"); err != nil {
			return err
		}
		tr.Events = append(tr.Events, e)
	}
	return nil
}

func (tr *Truth) readCrossings(path string) error {
	t, err := openTable(path, crossingColumns...)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	return tr.crossingsFrom(t)
}

var crossingColumns = []string{"event", "clock", "t_cross_s", "step_s"}

func (tr *Truth) crossingsFrom(t *table) error {
	idx := make(map[string]int, len(tr.Events))
	for i, e := range tr.Events {
		idx[e.ID] = i
	}
	for i := range t.rows {
		id := t.str(i, "event")
		k, ok := idx[id]
		if !ok {
			return t.errorf(i, "column event: event %q is not in events.csv", id)
		}
		tc, err := t.float(i, "t_cross_s")
		if err != nil {
			return err
		}
		step, err := t.float(i, "step_s")
		if err != nil {
			return err
		}
		e := &tr.Events[k]
		if s := math.Abs(step); math.IsNaN(e.MaxStep) || s > e.MaxStep {
			e.MaxStep = s
		}
		e.MaxLag = math.Max(e.MaxLag, math.Abs(tc-e.T0))
	}
	return nil
}

// readClocks streams clocks.csv (t_s then one column per clock, empty cell
// = gap) and keeps, per clock, the runs of epochs with data.
func (tr *Truth) readClocks(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return fmt.Errorf("score: could not open clocks.csv: %w", err)
	}
	defer f.Close()
	return tr.clocksFrom(bufio.NewReaderSize(f, 1<<16), filepath.Base(path))
}

// readRinexClocks takes the data coverage from the dataset's RINEX clock
// file.
func (tr *Truth) readRinexClocks(dir string) error {
	path := filepath.Join(dir, "clocks.clk")
	if _, err := os.Stat(path); err != nil {
		var found []string
		for _, pat := range []string{"*.clk", "*.CLK", "*.clk.gz", "*.CLK.gz"} {
			m, _ := filepath.Glob(filepath.Join(dir, pat))
			found = append(found, m...)
		}
		switch len(found) {
		case 0:
			return fmt.Errorf("score: %s has neither clocks.csv nor a RINEX clock file", dir)
		case 1:
			path = found[0]
		default:
			return fmt.Errorf("score: %s has no clocks.csv and %d RINEX clock files (%s); want one", dir, len(found), strings.Join(found, ", "))
		}
	}
	cf, err := sim.ReadRinexClock(path)
	if err != nil {
		return fmt.Errorf("score: %w", err)
	}
	return tr.clocksFromRinex(cf, filepath.Base(path))
}

// clocksFromRinex builds the per-clock runs from AS and AR records: times
// of one clock closer than 1.5 sample intervals (the smallest epoch step of
// the file) join one run.
func (tr *Truth) clocksFromRinex(cf *sim.ClockFile, name string) error {
	var t0 orbits.Time
	first := true
	byClock := map[string][]float64{}
	var order []string
	var epochs []float64
	for _, r := range cf.Records {
		if r.Type != "AS" && r.Type != "AR" {
			continue
		}
		if first {
			t0, first = r.Epoch, false
		}
		t := float64(r.Epoch-t0) / 1e9
		if _, ok := byClock[r.Name]; !ok {
			order = append(order, r.Name)
		}
		byClock[r.Name] = append(byClock[r.Name], t)
		epochs = append(epochs, t)
	}
	if len(epochs) == 0 {
		return fmt.Errorf("score: %s: no AS or AR clock records", name)
	}
	sort.Float64s(epochs)
	tr.Start, tr.End = epochs[0], epochs[len(epochs)-1]
	tr.Interval = 0
	for i := 1; i < len(epochs); i++ {
		if d := epochs[i] - epochs[i-1]; d > 0 && (tr.Interval == 0 || d < tr.Interval) {
			tr.Interval = d
		}
	}
	for _, id := range order {
		ts := byClock[id]
		sort.Float64s(ts)
		var runs [][2]float64
		for _, t := range ts {
			if n := len(runs); n > 0 && t-runs[n-1][1] <= 1.5*tr.Interval {
				runs[n-1][1] = t
				continue
			}
			runs = append(runs, [2]float64{t, t})
		}
		tr.Clocks = append(tr.Clocks, id)
		tr.runs = append(tr.runs, runs)
	}
	return nil
}

func (tr *Truth) clocksFrom(r io.Reader, name string) error {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.ReuseRecord = true
	hdr, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return fmt.Errorf("score: %s: empty file, want a header line", name)
		}
		return fmt.Errorf("score: %s: %w", name, err)
	}
	tcol := -1
	var cols []int
	for i, h := range hdr {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		if h == "t_s" {
			tcol = i
			continue
		}
		tr.Clocks = append(tr.Clocks, h)
		cols = append(cols, i)
	}
	if tcol < 0 {
		return fmt.Errorf("score: %s:1: missing required column \"t_s\"", name)
	}
	tr.runs = make([][][2]float64, len(cols))
	open := make([]bool, len(cols)) // the clock's last run is still growing
	nrows := 0
	prev := math.Inf(-1)
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return fmt.Errorf("score: %s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		s := strings.TrimSpace(rec[tcol])
		ts, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(ts) || math.IsInf(ts, 0) {
			return fmt.Errorf("score: %s:%d: column t_s: bad number %q", name, line, s)
		}
		if ts <= prev {
			return fmt.Errorf("score: %s:%d: column t_s: time %g s does not increase (previous %g s)", name, line, ts, prev)
		}
		if nrows == 0 {
			tr.Start = ts
		} else if nrows == 1 {
			tr.Interval = ts - tr.Start
		}
		prev, tr.End = ts, ts
		nrows++
		for j, c := range cols {
			v := strings.TrimSpace(rec[c])
			has := v != "" && !strings.EqualFold(v, "nan")
			if has {
				if _, err := strconv.ParseFloat(v, 64); err != nil {
					return fmt.Errorf("score: %s:%d: column %s: bad number %q", name, line, tr.Clocks[j], v)
				}
			}
			switch {
			case has && open[j]:
				tr.runs[j][len(tr.runs[j])-1][1] = ts
			case has:
				tr.runs[j] = append(tr.runs[j], [2]float64{ts, ts})
				open[j] = true
			default:
				open[j] = false
			}
		}
	}
	if nrows == 0 {
		return fmt.Errorf("score: %s: no epochs", name)
	}
	return nil
}

// hasData reports whether clock j has a sample in [a, b].
func (tr *Truth) hasData(j int, a, b float64) bool {
	runs := tr.runs[j]
	// first run that ends at or after a
	k := sort.Search(len(runs), func(i int) bool { return runs[i][1] >= a })
	return k < len(runs) && runs[k][0] <= b
}

// InGap reports whether fewer than half of the clocks have at least one
// sample within ±halfWindow (s) of time t (s).
func (tr *Truth) InGap(t, halfWindow float64) bool {
	n := 0
	for j := range tr.runs {
		if tr.hasData(j, t-halfWindow, t+halfWindow) {
			n++
		}
	}
	return 2*n < len(tr.runs)
}

// findRMax takes the largest clock radius from stations.csv (x_m,y_m,z_m),
// the position records of orbits.sp3 (km) and the crossing lags
// |t_cross − t0|·v, which bound the projection n·r of the clocks crossed.
func (tr *Truth) findRMax(dir string) error {
	consider := func(r float64, src string) {
		if r > tr.RMax {
			tr.RMax, tr.RMaxSource = r, src
		}
	}
	t, err := openTable(filepath.Join(dir, "stations.csv"), "x_m", "y_m", "z_m")
	switch {
	case errors.Is(err, fs.ErrNotExist):
	case err != nil:
		return err
	default:
		for i := range t.rows {
			var x [3]float64
			for j, c := range []string{"x_m", "y_m", "z_m"} {
				if x[j], err = t.float(i, c); err != nil {
					return err
				}
			}
			consider(math.Sqrt(x[0]*x[0]+x[1]*x[1]+x[2]*x[2]), "stations.csv")
		}
	}
	f, err := os.Open(filepath.Join(dir, "orbits.sp3"))
	switch {
	case errors.Is(err, fs.ErrNotExist):
	case err != nil:
		return fmt.Errorf("score: could not open orbits.sp3: %w", err)
	default:
		r, err := sp3MaxRadius(f, "orbits.sp3")
		f.Close()
		if err != nil {
			return err
		}
		consider(r, "orbits.sp3")
	}
	for _, e := range tr.Events {
		consider(e.MaxLag*e.Speed, "crossings.csv (lag × speed)")
	}
	if tr.RMax == 0 {
		tr.RMax, tr.RMaxSource = fallbackRMax, "fallback (geostationary radius)"
	}
	return nil
}

// sp3MaxRadius returns the largest geocentric radius (m) among the
// position records of an SP3-c/d file: lines starting with 'P', satellite
// id in columns 2–4, x, y, z in km in columns 5–46 (F14.6 each). A
// coordinate of 0 marks a bad or missing position (SP3 convention).
func sp3MaxRadius(r io.Reader, name string) (float64, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4096), 1<<20)
	rmax := 0.0
	for line := 1; sc.Scan(); line++ {
		s := sc.Text()
		if len(s) < 4 || s[0] != 'P' {
			continue
		}
		fields := strings.Fields(s[4:])
		if len(fields) < 3 {
			return 0, fmt.Errorf("score: %s:%d: position record has %d fields, want x y z", name, line, len(fields))
		}
		var x [3]float64
		for j := range x {
			v, err := strconv.ParseFloat(fields[j], 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fmt.Errorf("score: %s:%d: bad coordinate %q km", name, line, fields[j])
			}
			x[j] = v * 1e3
		}
		if x[0] == 0 && x[1] == 0 && x[2] == 0 {
			continue
		}
		rmax = math.Max(rmax, math.Sqrt(x[0]*x[0]+x[1]*x[1]+x[2]*x[2]))
	}
	if err := sc.Err(); err != nil {
		return 0, fmt.Errorf("score: %s: %w", name, err)
	}
	return rmax, nil
}

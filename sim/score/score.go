package score

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Options control Score. The zero value means: default window, every
// candidate counts, no direction test.
type Options struct {
	// Window is the full width of the matching window, s: a candidate
	// matches a wall when |t0_cand − t0| ≤ Window/2. Zero means the default
	// 2·R_max/v_min (see the package doc).
	Window float64
	// Threshold: with HasThreshold, candidates with stat < Threshold count
	// as absent (an injection matched only below it is missed).
	Threshold    float64
	HasThreshold bool
	// DirectionTol is the largest allowed angle between the candidate's and
	// the true direction, rad. Zero disables the direction test; when set,
	// candidates without a direction cannot match.
	DirectionTol float64
	// MaxROC caps the number of ROC rows (default 500); thresholds are then
	// taken evenly from the sorted distinct statistics, keeping both ends.
	MaxROC int
}

// Status of an injection or candidate after matching.
const (
	StatusFound    = "found"     // injection matched by a candidate at or above threshold
	StatusMissed   = "missed"    // injection not matched above threshold
	StatusGapFound = "gap_found" // injection in a gap, matched anyway
	StatusGapMiss  = "gap_missed"
	StatusFalse    = "false" // candidate at or above threshold matching no injection
	StatusBelow    = "below" // unmatched candidate below threshold
)

// A MatchRow is one line of matches.csv: an injection with its candidate,
// or a candidate without an injection.
type MatchRow struct {
	Event     string  // event id; "" for an unmatched candidate
	Candidate int     // candidate file line; 0 for none
	Status    string  // one of the Status constants
	T0        float64 // true t0, s; NaN for an unmatched candidate
	T0Cand    float64 // candidate t0, s; NaN for none
	Stat      float64 // candidate stat; NaN for none
	DeltaT    float64 // t0_cand − t0, s; NaN unless matched
	AngleDeg  float64 // angle between directions, degrees; NaN unless both known
	Thickness float64 // true thickness, m
	Speed     float64 // true speed, m/s
	LambdaEff float64 // true Λ_eff, GeV
	Step      float64 // largest |step| of the injection, s
}

// A ROCPoint is one row of the ROC table.
type ROCPoint struct {
	Threshold   float64 // candidates with stat ≥ Threshold count
	Found       int     // usable injections found
	Efficiency  float64 // Found / usable injections (NaN with none)
	False       int     // unmatched candidates with stat ≥ Threshold
	FalsePerDay float64 // False / span in days
}

// A Result is the outcome of Score.
type Result struct {
	Window       float64 // full matching window used, s
	WindowSource string  // "option" or "2·R_max/v_min"
	RMax         float64 // largest clock radius, m
	RMaxSource   string
	VMin         float64 // slowest injected speed, m/s (NaN without injections)
	Span         float64 // data span, s
	Threshold    float64 // NaN when every candidate counts
	DirectionTol float64 // rad; 0 = none

	Events, InGap, Usable int // injections: all, in gaps, usable (= all − in gaps)
	Found, Missed         int // usable injections found / missed
	GapFound              int // injections in gaps that were matched anyway
	Candidates, Counted   int // candidates read / at or above threshold
	False                 int // counted candidates that match no injection
	FalsePerDay           float64
	Efficiency            float64 // Found/Usable (NaN with none)
	Wilson, CP            Interval

	Cells   []EffRow   // efficiency per grid cell (usable injections)
	CellGap []int      // injections in gaps per cell, parallel to Cells
	ROC     []ROCPoint // by decreasing threshold
	Matches []MatchRow // injections in events.csv order, then unmatched candidates by decreasing stat
}

// DefaultWindow returns 2·R_max/v_min (s) for a truth catalogue, the full
// width of the matching window, and v_min (m/s; NaN without injections,
// then the window is 0).
func DefaultWindow(tr *Truth) (window, vmin float64) {
	vmin = math.Inf(1)
	for _, e := range tr.Events {
		vmin = math.Min(vmin, e.Speed)
	}
	if math.IsInf(vmin, 1) {
		return 0, math.NaN()
	}
	return 2 * tr.RMax / vmin, vmin
}

// speedPoolLimit: with more distinct injected speeds than this, speeds are
// treated as drawn from a prior and pooled in the efficiency cells.
const speedPoolLimit = 16

// Score matches candidates to the injections of tr and computes found,
// missed and false counts, efficiencies per cell with intervals, false
// alarms per day and the ROC table. See the package doc for the rules.
func Score(tr *Truth, cands []Candidate, opt Options) (*Result, error) {
	if opt.Window < 0 || math.IsNaN(opt.Window) || math.IsInf(opt.Window, 0) {
		return nil, fmt.Errorf("score: window %g s must be finite and positive", opt.Window)
	}
	if opt.DirectionTol < 0 || !(opt.DirectionTol <= math.Pi) {
		return nil, fmt.Errorf("score: direction tolerance %g rad must be in [0, π]", opt.DirectionTol)
	}
	if opt.HasThreshold && math.IsNaN(opt.Threshold) {
		return nil, fmt.Errorf("score: threshold is NaN")
	}
	res := &Result{RMax: tr.RMax, RMaxSource: tr.RMaxSource, Span: tr.Span(), Threshold: math.NaN(), DirectionTol: opt.DirectionTol}
	res.Window, res.VMin = DefaultWindow(tr)
	res.WindowSource = "2·R_max/v_min"
	if opt.Window > 0 {
		res.Window, res.WindowSource = opt.Window, "option"
	}
	if opt.HasThreshold {
		res.Threshold = opt.Threshold
	}
	counts := func(stat float64) bool { return !opt.HasThreshold || stat >= opt.Threshold }
	half := res.Window / 2
	cosTol := math.Cos(opt.DirectionTol)

	// Events by t0 for the window search.
	nev := len(tr.Events)
	byT := make([]int, nev)
	for i := range byT {
		byT[i] = i
	}
	sort.SliceStable(byT, func(a, b int) bool { return tr.Events[byT[a]].T0 < tr.Events[byT[b]].T0 })
	t0s := make([]float64, nev)
	for i, k := range byT {
		t0s[i] = tr.Events[k].T0
	}
	// Candidates by decreasing stat, ties by t0 then file line.
	order := make([]int, len(cands))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(a, b int) int {
		ca, cb := &cands[a], &cands[b]
		if c := cmp.Compare(cb.Stat, ca.Stat); c != 0 {
			return c
		}
		if c := cmp.Compare(ca.T0, cb.T0); c != 0 {
			return c
		}
		if c := cmp.Compare(ca.Line, cb.Line); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	evCand := make([]int, nev) // event → candidate index, −1 none
	for i := range evCand {
		evCand[i] = -1
	}
	candEv := make([]int, len(cands))
	for _, ci := range order {
		c := &cands[ci]
		candEv[ci] = -1
		best, bestDt := -1, math.Inf(1)
		lo := sort.SearchFloat64s(t0s, c.T0-half)
		for p := lo; p < nev && t0s[p] <= c.T0+half; p++ {
			k := byT[p]
			if evCand[k] >= 0 {
				continue
			}
			if opt.DirectionTol > 0 && (!c.HasN || dot(c.N, tr.Events[k].N) < cosTol) {
				continue
			}
			if dt := math.Abs(c.T0 - t0s[p]); dt < bestDt {
				best, bestDt = k, dt
			}
		}
		if best >= 0 {
			evCand[best] = ci
			candEv[ci] = best
		}
	}

	// Injections.
	gap := make([]bool, nev)
	speeds := map[float64]bool{}
	for _, e := range tr.Events {
		speeds[e.Speed] = true
	}
	poolSpeed := len(speeds) > speedPoolLimit
	type cellAcc struct {
		row   EffRow
		steps []float64
		gap   int
	}
	cells := map[cellKey]*cellAcc{}
	var cellOrder []cellKey
	res.Events = nev
	res.Matches = make([]MatchRow, 0, nev+len(cands))
	usableStats := make([]float64, 0, nev) // stat of each matched usable injection's candidate
	for k, e := range tr.Events {
		gap[k] = tr.InGap(e.T0, half)
		ci := evCand[k]
		found := ci >= 0 && counts(cands[ci].Stat)
		m := MatchRow{Event: e.ID, Status: StatusMissed, T0: e.T0, T0Cand: math.NaN(), Stat: math.NaN(),
			DeltaT: math.NaN(), AngleDeg: math.NaN(), Thickness: e.Thickness, Speed: e.Speed, LambdaEff: e.LambdaEff, Step: e.MaxStep}
		if ci >= 0 {
			c := cands[ci]
			m.Candidate, m.T0Cand, m.Stat, m.DeltaT = c.Line, c.T0, c.Stat, c.T0-e.T0
			if c.HasN {
				m.AngleDeg = math.Acos(math.Max(-1, math.Min(1, dot(c.N, e.N)))) * 180 / math.Pi
			}
		}
		speed := e.Speed
		if poolSpeed {
			speed = math.NaN()
		}
		key := keyOf(e.Thickness, speed, e.LambdaEff)
		acc, ok := cells[key]
		if !ok {
			acc = &cellAcc{row: EffRow{Thickness: e.Thickness, Speed: speed, LambdaEff: e.LambdaEff}}
			cells[key] = acc
			cellOrder = append(cellOrder, key)
		}
		switch {
		case gap[k]:
			res.InGap++
			acc.gap++
			m.Status = StatusGapMiss
			if found {
				m.Status = StatusGapFound
				res.GapFound++
			}
		default:
			res.Usable++
			acc.row.N++
			if !math.IsNaN(e.MaxStep) {
				acc.steps = append(acc.steps, e.MaxStep)
			}
			if found {
				m.Status = StatusFound
				res.Found++
				acc.row.Found++
			}
			if ci >= 0 {
				usableStats = append(usableStats, cands[ci].Stat)
			}
		}
		res.Matches = append(res.Matches, m)
	}
	res.Missed = res.Usable - res.Found
	var err error
	if res.Wilson, err = Wilson(res.Found, res.Usable, EfficiencyCL); err != nil {
		return nil, err
	}
	if res.CP, err = ClopperPearson(res.Found, res.Usable, EfficiencyCL); err != nil {
		return nil, err
	}
	res.Efficiency = ratio(res.Found, res.Usable)
	for _, k := range cellOrder {
		acc := cells[k]
		acc.row.Step = median(acc.steps)
		if err := acc.row.recompute(); err != nil {
			return nil, err
		}
		res.Cells = append(res.Cells, acc.row)
	}
	// Sort cells, keeping the gap counts aligned.
	gapOf := map[cellKey]int{}
	for _, k := range cellOrder {
		gapOf[k] = cells[k].gap
	}
	SortEff(res.Cells)
	for _, r := range res.Cells {
		res.CellGap = append(res.CellGap, gapOf[keyOf(r.Thickness, r.Speed, r.LambdaEff)])
	}

	// Candidates without an injection.
	days := res.Span / 86400
	res.Candidates = len(cands)
	falseStats := make([]float64, 0, len(cands))
	for _, ci := range order {
		c := cands[ci]
		if counts(c.Stat) {
			res.Counted++
		}
		if candEv[ci] >= 0 {
			continue
		}
		falseStats = append(falseStats, c.Stat)
		st := StatusBelow
		if counts(c.Stat) {
			st = StatusFalse
			res.False++
		}
		res.Matches = append(res.Matches, MatchRow{Candidate: c.Line, Status: st, T0: math.NaN(), T0Cand: c.T0, Stat: c.Stat,
			DeltaT: math.NaN(), AngleDeg: math.NaN(), Thickness: math.NaN(), Speed: math.NaN(), LambdaEff: math.NaN(), Step: math.NaN()})
	}
	res.FalsePerDay = float64(res.False) / days
	res.ROC = roc(usableStats, falseStats, res.Usable, days, opt.MaxROC)
	return res, nil
}

// roc sweeps the threshold over the distinct candidate statistics.
// found and false hold the statistics of matched usable injections and of
// unmatched candidates.
func roc(found, false_ []float64, usable int, days float64, maxRows int) []ROCPoint {
	if maxRows <= 0 {
		maxRows = 500
	}
	all := append(append([]float64(nil), found...), false_...)
	sort.Sort(sort.Reverse(sort.Float64Slice(all)))
	var th []float64
	for i, s := range all {
		if i == 0 || s != all[i-1] {
			th = append(th, s)
		}
	}
	if len(th) > maxRows && maxRows >= 2 {
		pick := make([]float64, maxRows)
		for i := range pick {
			pick[i] = th[i*(len(th)-1)/(maxRows-1)]
		}
		th = pick
	}
	sf := append([]float64(nil), found...)
	sort.Float64s(sf)
	sa := append([]float64(nil), false_...)
	sort.Float64s(sa)
	atLeast := func(s []float64, x float64) int { return len(s) - sort.SearchFloat64s(s, x) }
	out := make([]ROCPoint, 0, len(th))
	for _, x := range th {
		p := ROCPoint{Threshold: x, Found: atLeast(sf, x), False: atLeast(sa, x)}
		p.Efficiency = ratio(p.Found, usable)
		p.FalsePerDay = float64(p.False) / days
		out = append(out, p)
	}
	return out
}

func ratio(k, n int) float64 {
	if n == 0 {
		return math.NaN()
	}
	return float64(k) / float64(n)
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// median returns the median of v (NaN for none); v is reordered.
func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	sort.Float64s(v)
	m := len(v) / 2
	if len(v)%2 == 1 {
		return v[m]
	}
	return (v[m-1] + v[m]) / 2
}

package score

import (
	"bytes"
	"fmt"
	"math"
	"sort"
)

// ReachOptions configure Reach.
type ReachOptions struct {
	// MeanIntervals are the mean times between wall encounters T to draw
	// curves for, s.
	MeanIntervals []float64
	// Span is the observation time T_obs, s.
	Span float64
	// CL is the confidence level of the exclusion (default 0.9).
	CL float64
	// InjectedInterval is the T the table's injections were generated
	// with, s: their amplitude A² = ħc·ρ_DM·v·T·d and so their step
	// ∝ T·d²/Λ_eff² (physics.md §3.3). Zero means "the same as the single
	// entry of MeanIntervals"; it is required with several.
	InjectedInterval float64
}

// Reach statuses.
const (
	ReachLimit       = "limit"                 // Λ_eff excluded up to Lambda
	ReachGridEdge    = "grid_edge"             // even the largest Λ_eff of the grid is excluded: Lambda is a lower bound
	ReachNoLimit     = "no_limit"              // no grid cell reaches the required efficiency
	ReachNotPossible = "no_limit_possible"     // required efficiency > 1: T > T_obs/(−ln(1−CL))
	ReachBoundName   = "clopper_pearson_lower" // efficiency bound used, as written to reach.csv
)

// A ReachPoint is one (T, d) entry of the exclusion curves.
type ReachPoint struct {
	MeanInterval float64 // T, s
	Thickness    float64 // d, m
	Lambda       float64 // excluded Λ_eff (all smaller Λ_eff excluded at CL), GeV; NaN without limit
	Status       string  // one of the Reach statuses
	EpsRequired  float64 // −ln(1−CL)·T/T_obs
	CL           float64
	N, Found     int // pooled counts of the cell at or just below the limit (0 without)
}

// Reach turns an efficiency table into exclusion curves Λ_eff(d) for each
// mean interval T. Per thickness, rows are pooled over speed (counts added)
// and sorted by Λ_eff; the efficiency of each cell is replaced by its
// Clopper–Pearson lower bound at EfficiencyCL (conservative, detection.md
// §2.4 item 7). A cell is excluded when ε_low·T_obs/T ≥ −ln(1−CL) (zero
// observed candidates, Poisson). The table's Λ grid is first rescaled to T:
// the step ∝ T/Λ_eff², so the efficiency at (d, Λ, T) is that of the grid
// cell Λ·√(T_inj/T). The excluded Λ_eff is the largest Λ whose ε_low
// satisfies the condition, interpolated linearly in log Λ between that cell
// and the next larger Λ. Points are ordered by T, then d.
func Reach(rows []EffRow, opt ReachOptions) ([]ReachPoint, error) {
	if opt.CL == 0 {
		opt.CL = 0.9
	}
	if !(opt.CL > 0 && opt.CL < 1) {
		return nil, fmt.Errorf("score: reach: confidence level %g is not in (0, 1)", opt.CL)
	}
	if !(opt.Span > 0) || math.IsInf(opt.Span, 0) {
		return nil, fmt.Errorf("score: reach: observation span %g s must be positive", opt.Span)
	}
	if len(opt.MeanIntervals) == 0 {
		return nil, fmt.Errorf("score: reach: no mean interval given")
	}
	for _, T := range opt.MeanIntervals {
		if !(T > 0) || math.IsInf(T, 0) {
			return nil, fmt.Errorf("score: reach: mean interval %g s must be positive", T)
		}
	}
	tinj := opt.InjectedInterval
	if tinj == 0 {
		if len(opt.MeanIntervals) > 1 {
			return nil, fmt.Errorf("score: reach: %d mean intervals need the injected interval of the table", len(opt.MeanIntervals))
		}
		tinj = opt.MeanIntervals[0]
	}
	if !(tinj > 0) || math.IsInf(tinj, 0) {
		return nil, fmt.Errorf("score: reach: injected interval %g s must be positive", tinj)
	}
	for _, r := range rows {
		if !(r.LambdaEff > 0) || !(r.Thickness > 0) {
			return nil, fmt.Errorf("score: reach: cell thickness=%g m has lambda_eff %g GeV; every cell needs a positive Λ_eff", r.Thickness, r.LambdaEff)
		}
	}
	pooled, err := poolSpeeds(rows)
	if err != nil {
		return nil, err
	}
	if len(pooled) == 0 {
		return nil, fmt.Errorf("score: reach: efficiency table has no rows")
	}
	// Group by thickness.
	var ds []float64
	byD := map[float64][]EffRow{}
	for _, r := range pooled {
		if _, ok := byD[r.Thickness]; !ok {
			ds = append(ds, r.Thickness)
		}
		byD[r.Thickness] = append(byD[r.Thickness], r)
	}
	sort.Float64s(ds)
	f := PoissonZeroFactor(opt.CL)
	Ts := append([]float64(nil), opt.MeanIntervals...)
	sort.Float64s(Ts)
	var out []ReachPoint
	for _, T := range Ts {
		need := f * T / opt.Span
		scale := math.Sqrt(T / tinj)
		for _, d := range ds {
			cells := byD[d]
			sort.Slice(cells, func(i, j int) bool { return cells[i].LambdaEff < cells[j].LambdaEff })
			p := ReachPoint{MeanInterval: T, Thickness: d, Lambda: math.NaN(), EpsRequired: need, CL: opt.CL, Status: ReachNoLimit}
			if need > 1 {
				p.Status = ReachNotPossible
				out = append(out, p)
				continue
			}
			last := -1
			for i, c := range cells {
				if c.N > 0 && c.CP.Low >= need {
					last = i
				}
			}
			switch {
			case last < 0:
			case last == len(cells)-1:
				c := cells[last]
				p.Status, p.Lambda, p.N, p.Found = ReachGridEdge, c.LambdaEff*scale, c.N, c.Found
			default:
				a, b := cells[last], cells[last+1]
				frac := 0.0
				if a.CP.Low > b.CP.Low {
					frac = (a.CP.Low - need) / (a.CP.Low - b.CP.Low)
				}
				la := math.Log(a.LambdaEff) + frac*(math.Log(b.LambdaEff)-math.Log(a.LambdaEff))
				p.Status, p.Lambda, p.N, p.Found = ReachLimit, math.Exp(la)*scale, a.N, a.Found
			}
			out = append(out, p)
		}
	}
	return out, nil
}

// poolSpeeds adds the counts of rows that differ only in speed.
func poolSpeeds(rows []EffRow) ([]EffRow, error) {
	flat := make([]EffRow, len(rows))
	for i, r := range rows {
		r.Speed = math.NaN()
		flat[i] = r
	}
	return MergeEfficiency(flat)
}

// WriteReach writes reach points as CSV: mean_interval_s, thickness_m,
// lambda_eff_gev (empty without limit), status, eps_required, cl,
// efficiency_bound, n, found.
func WriteReach(path string, pts []ReachPoint) error {
	var b bytes.Buffer
	b.WriteString("mean_interval_s,thickness_m,lambda_eff_gev,status,eps_required,cl,efficiency_bound,n,found\n")
	for _, p := range pts {
		fmt.Fprintf(&b, "%s,%s,%s,%s,%s,%s,%s,%d,%d\n", fmtParam(p.MeanInterval), fmtParam(p.Thickness),
			fmtSig(p.Lambda), p.Status, fmtSig(p.EpsRequired), fmtParam(p.CL), ReachBoundName, p.N, p.Found)
	}
	return writeFileAtomic(path, b.Bytes())
}

// fmtSig formats to 6 significant digits, NaN as empty.
func fmtSig(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	return fmt.Sprintf("%.6g", v)
}

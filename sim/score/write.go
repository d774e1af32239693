package score

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
)

// jnum is a float64 that encodes NaN and ±Inf as JSON null.
type jnum float64

func (v jnum) MarshalJSON() ([]byte, error) {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

type jinterval struct {
	Low  jnum `json:"low"`
	High jnum `json:"high"`
}

type jcell struct {
	Thickness jnum      `json:"thickness_m"`
	Speed     jnum      `json:"speed_m_s"` // null = pooled over the speed prior
	LambdaEff jnum      `json:"lambda_eff_gev"`
	Step      jnum      `json:"step_s"`
	N         int       `json:"n"`
	Found     int       `json:"found"`
	InGap     int       `json:"in_gap"`
	Eff       jnum      `json:"eff"`
	Wilson    jinterval `json:"wilson"`
	CP        jinterval `json:"clopper_pearson"`
}

type jfit struct {
	Thickness jnum      `json:"thickness_m"`
	Amplitude string    `json:"amplitude"`
	Mu        jnum      `json:"mu_log10"`
	MuErr     jnum      `json:"mu_err"`
	W         jnum      `json:"w_decades"`
	WErr      jnum      `json:"w_err"`
	H50       jnum      `json:"h50"`
	H50Int    jinterval `json:"h50_interval"`
	H90       jnum      `json:"h90"`
	H90Int    jinterval `json:"h90_interval"`
	CL        float64   `json:"interval_cl"`
}

// fitCL is the confidence level of the h50/h90 intervals in score outputs.
const fitCL = 0.6827

func sortedFits(fits map[float64]Sigmoid) []float64 {
	ds := make([]float64, 0, len(fits))
	for d := range fits {
		ds = append(ds, d)
	}
	sort.Float64s(ds)
	return ds
}

type jsummary struct {
	Window        jnum      `json:"window_s"`
	WindowSource  string    `json:"window_source"`
	RMax          jnum      `json:"r_max_m"`
	RMaxSource    string    `json:"r_max_source"`
	VMin          jnum      `json:"v_min_m_s"`
	Span          jnum      `json:"span_s"`
	Threshold     jnum      `json:"threshold"` // null = every candidate counts
	DirectionTol  jnum      `json:"direction_tol_deg"`
	GapRule       string    `json:"gap_rule"`
	IntervalCL    float64   `json:"interval_cl"`
	Events        int       `json:"injections"`
	InGap         int       `json:"injections_in_gap"`
	GapFound      int       `json:"injections_in_gap_found"`
	Usable        int       `json:"injections_usable"`
	Found         int       `json:"found"`
	Missed        int       `json:"missed"`
	Efficiency    jnum      `json:"efficiency"`
	Wilson        jinterval `json:"wilson"`
	CP            jinterval `json:"clopper_pearson"`
	Candidates    int       `json:"candidates"`
	Counted       int       `json:"candidates_above_threshold"`
	False         int       `json:"false_alarms"`
	FalsePerDay   jnum      `json:"false_alarms_per_day"`
	Cells         []jcell   `json:"cells"`
	Fits          []jfit    `json:"sigmoid_fits"`
	TimeReference string    `json:"time_reference"`
}

const gapRule = "an injection is in a gap when fewer than half of the clocks of the data have a sample within ±window/2 of its t0"

func jiv(iv Interval) jinterval { return jinterval{jnum(iv.Low), jnum(iv.High)} }

func (r *Result) summary() jsummary {
	s := jsummary{
		Window: jnum(r.Window), WindowSource: r.WindowSource, RMax: jnum(r.RMax), RMaxSource: r.RMaxSource,
		VMin: jnum(r.VMin), Span: jnum(r.Span), Threshold: jnum(r.Threshold),
		DirectionTol: jnum(r.DirectionTol * 180 / math.Pi), GapRule: gapRule, IntervalCL: EfficiencyCL,
		Events: r.Events, InGap: r.InGap, GapFound: r.GapFound, Usable: r.Usable, Found: r.Found, Missed: r.Missed,
		Efficiency: jnum(r.Efficiency), Wilson: jiv(r.Wilson), CP: jiv(r.CP),
		Candidates: r.Candidates, Counted: r.Counted, False: r.False, FalsePerDay: jnum(r.FalsePerDay),
		Cells:         []jcell{},
		TimeReference: "seconds since the first epoch of the dataset (GPS time)",
	}
	fits := FitByThickness(r.Cells, fitCL)
	s.Fits = []jfit{}
	for _, d := range sortedFits(fits) {
		g := fits[d]
		s.Fits = append(s.Fits, jfit{jnum(d), "step_s", jnum(g.Mu), jnum(g.MuErr), jnum(g.W), jnum(g.WErr),
			jnum(g.H50), jiv(g.H50Int), jnum(g.H90), jiv(g.H90Int), g.CL})
	}
	for i, c := range r.Cells {
		s.Cells = append(s.Cells, jcell{jnum(c.Thickness), jnum(c.Speed), jnum(c.LambdaEff), jnum(c.Step), c.N, c.Found, r.CellGap[i],
			jnum(c.Eff), jiv(c.Wilson), jiv(c.CP)})
	}
	return s
}

// WriteSummary prints a readable summary of r.
func (r *Result) WriteSummary(w io.Writer) error {
	var b bytes.Buffer
	thr := "none (every candidate counts)"
	if !math.IsNaN(r.Threshold) {
		thr = fmt.Sprintf("stat ≥ %g", r.Threshold)
	}
	fmt.Fprintf(&b, "matching window   %.1f s (%s; R_max %.0f km from %s, v_min %.0f km/s)\n",
		r.Window, r.WindowSource, r.RMax/1e3, r.RMaxSource, r.VMin/1e3)
	if r.DirectionTol > 0 {
		fmt.Fprintf(&b, "direction test    angle ≤ %.3g°\n", r.DirectionTol*180/math.Pi)
	}
	fmt.Fprintf(&b, "threshold         %s\n", thr)
	fmt.Fprintf(&b, "data span         %.4g d\n", r.Span/86400)
	fmt.Fprintf(&b, "injections        %d: %d usable, %d in gaps (%d of them matched; excluded from efficiencies)\n", r.Events, r.Usable, r.InGap, r.GapFound)
	fmt.Fprintf(&b, "found / missed    %d / %d\n", r.Found, r.Missed)
	fmt.Fprintf(&b, "efficiency        %s  Wilson [%s, %s]  Clopper–Pearson [%s, %s] (%.0f %% CL)\n",
		fmtProb(r.Efficiency), fmtProb(r.Wilson.Low), fmtProb(r.Wilson.High), fmtProb(r.CP.Low), fmtProb(r.CP.High), EfficiencyCL*100)
	fmt.Fprintf(&b, "candidates        %d, %d at or above threshold, %d false alarms = %.4g per day\n", r.Candidates, r.Counted, r.False, r.FalsePerDay)
	if len(r.Cells) > 0 {
		fmt.Fprintf(&b, "\n%12s %10s %12s %11s %5s %5s %4s %8s %19s\n", "thickness_km", "speed_km_s", "lambda_gev", "step_s", "n", "found", "gap", "eff", "clopper_pearson")
		for i, c := range r.Cells {
			sp := "pooled"
			if !math.IsNaN(c.Speed) {
				sp = fmt.Sprintf("%.4g", c.Speed/1e3)
			}
			fmt.Fprintf(&b, "%12.4g %10s %12.4g %11.4g %5d %5d %4d %8s [%s, %s]\n", c.Thickness/1e3, sp, c.LambdaEff, c.Step,
				c.N, c.Found, r.CellGap[i], fmtProb(c.Eff), fmtProb(c.CP.Low), fmtProb(c.CP.High))
		}
	}
	if fits := FitByThickness(r.Cells, fitCL); len(fits) > 0 {
		fmt.Fprintf(&b, "\nsigmoid fits in the bias step (%.2f %% profile-likelihood intervals):\n", fitCL*100)
		for _, d := range sortedFits(fits) {
			g := fits[d]
			fmt.Fprintf(&b, "  d = %.4g km: h50 = %.3g s [%.3g, %.3g], h90 = %.3g s [%.3g, %.3g], width %.3g ± %.2g decades\n",
				d/1e3, g.H50, g.H50Int.Low, g.H50Int.High, g.H90, g.H90Int.Low, g.H90Int.High, g.W, g.WErr)
		}
	}
	_, err := w.Write(b.Bytes())
	return err
}

// WriteFiles writes summary.json, matches.csv, efficiency.csv, roc.csv and
// the plots efficiency.png (when any cell has a step amplitude) and roc.png
// (when any ROC point exists) into dir, each atomically. dir is created if
// needed.
func (r *Result) WriteFiles(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("score: could not create output directory: %w", err)
	}
	js, err := json.MarshalIndent(r.summary(), "", "  ")
	if err != nil {
		return fmt.Errorf("score: summary.json: %w", err)
	}
	if err := writeFileAtomic(filepath.Join(dir, "summary.json"), append(js, '\n')); err != nil {
		return err
	}
	var m bytes.Buffer
	m.WriteString("event,candidate_line,status,t0_s,t0_cand_s,stat,delta_t_s,angle_deg,thickness_m,speed_m_s,lambda_eff_gev,step_s\n")
	for _, x := range r.Matches {
		cl := ""
		if x.Candidate > 0 {
			cl = fmt.Sprint(x.Candidate)
		}
		fmt.Fprintf(&m, "%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s\n", x.Event, cl, x.Status, fmtParam(x.T0), fmtParam(x.T0Cand),
			fmtParam(x.Stat), fmtSig(x.DeltaT), fmtSig(x.AngleDeg), fmtParam(x.Thickness), fmtParam(x.Speed), fmtParam(x.LambdaEff), fmtParam(x.Step))
	}
	if err := writeFileAtomic(filepath.Join(dir, "matches.csv"), m.Bytes()); err != nil {
		return err
	}
	if err := WriteEfficiencyFile(filepath.Join(dir, "efficiency.csv"), r.Cells); err != nil {
		return err
	}
	var o bytes.Buffer
	o.WriteString("threshold,found,efficiency,false_alarms,false_alarms_per_day\n")
	for _, p := range r.ROC {
		fmt.Fprintf(&o, "%s,%d,%s,%d,%s\n", fmtParam(p.Threshold), p.Found, fmtProb(p.Efficiency), p.False, fmtSig(p.FalsePerDay))
	}
	if err := writeFileAtomic(filepath.Join(dir, "roc.csv"), o.Bytes()); err != nil {
		return err
	}
	hasStep := false
	for _, c := range r.Cells {
		hasStep = hasStep || (c.Step > 0 && c.N > 0)
	}
	if hasStep {
		fits := FitByThickness(r.Cells, fitCL)
		if err := PlotEfficiency(filepath.Join(dir, "efficiency.png"), r.Cells, fits); err != nil {
			return err
		}
	}
	if len(r.ROC) > 0 && r.Usable > 0 {
		if err := PlotROC(filepath.Join(dir, "roc.png"), r.ROC); err != nil {
			return err
		}
	}
	return nil
}

// FitByThickness fits a sigmoid in the bias step to each thickness of rows
// (pooled over speed; cells without a step are left out). Thicknesses
// whose data do not resolve a curve are absent from the result.
func FitByThickness(rows []EffRow, cl float64) map[float64]Sigmoid {
	pooled, err := poolSpeeds(rows)
	if err != nil {
		return nil
	}
	out := map[float64]Sigmoid{}
	for _, g := range groupByThickness(pooled) {
		var pts []BinPoint
		for _, r := range g {
			if r.Step > 0 && r.N > 0 {
				pts = append(pts, BinPoint{S: r.Step, N: r.N, Found: r.Found})
			}
		}
		if fit, err := FitSigmoid(pts, cl); err == nil {
			out[g[0].Thickness] = fit
		}
	}
	return out
}

package score

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

const yr = 365.25 * 86400

// reachTable: at d = 1e6 m, 100/100 found at Λ = 1e12 GeV and 0/100 at
// 1e13; d = 1e7 m only 100/100 at 1e12 (grid edge); d = 1e5 m 0/100.
// The Clopper–Pearson lower bound of 100/100 at 95 % is 0.025^(1/100)
// (closed form), of 0/100 it is 0.
func reachTable(t *testing.T) []EffRow {
	var rows []EffRow
	for _, c := range []struct {
		d, v, l  float64
		n, found int
	}{
		{1e6, 2e5, 1e12, 60, 60}, {1e6, 3e5, 1e12, 40, 40}, // pooled over speed: 100/100
		{1e6, math.NaN(), 1e13, 100, 0},
		{1e7, math.NaN(), 1e12, 100, 100},
		{1e5, math.NaN(), 1e12, 100, 0},
	} {
		r, err := NewEffRow(c.d, c.v, c.l, math.NaN(), c.n, c.found)
		if err != nil {
			t.Fatal(err)
		}
		rows = append(rows, r)
	}
	return rows
}

func TestReach(t *testing.T) {
	pts, err := Reach(reachTable(t), ReachOptions{MeanIntervals: []float64{1 * yr, 2 * yr, 5 * yr}, Span: 10 * yr, CL: 0.9, InjectedInterval: yr})
	if err != nil {
		t.Fatal(err)
	}
	if len(pts) != 9 {
		t.Fatalf("%d points, want 3 T × 3 d", len(pts))
	}
	low := math.Pow(0.025, 0.01)
	lambda := func(T float64) float64 {
		need := math.Log(10) * T / (10 * yr) // −ln(1−0.9)·T/T_obs
		frac := (low - need) / low           // linear in log10 Λ from 1e12 (ε_low) to 1e13 (0)
		return math.Pow(10, 12+frac) * math.Sqrt(T/yr)
	}
	want := []struct {
		T, d   float64
		status string
		lambda float64
	}{
		{yr, 1e5, ReachNoLimit, math.NaN()},
		{yr, 1e6, ReachLimit, lambda(yr)},
		{yr, 1e7, ReachGridEdge, 1e12},
		{2 * yr, 1e5, ReachNoLimit, math.NaN()},
		{2 * yr, 1e6, ReachLimit, lambda(2 * yr)},
		{2 * yr, 1e7, ReachGridEdge, 1e12 * math.Sqrt(2)},
		{5 * yr, 1e5, ReachNotPossible, math.NaN()}, // 2.303·5/10 > 1
		{5 * yr, 1e6, ReachNotPossible, math.NaN()},
		{5 * yr, 1e7, ReachNotPossible, math.NaN()},
	}
	for i, w := range want {
		p := pts[i]
		if p.MeanInterval != w.T || p.Thickness != w.d || p.Status != w.status ||
			!(scalar.EqualWithinRel(p.Lambda, w.lambda, 1e-9) || math.IsNaN(p.Lambda) && math.IsNaN(w.lambda)) {
			t.Errorf("point %d = %+v, want T %g d %g %s Λ %g", i, p, w.T, w.d, w.status, w.lambda)
		}
	}
	if pts[1].N != 100 || pts[1].Found != 100 {
		t.Errorf("limit cell counts %d/%d, want pooled 100/100", pts[1].Found, pts[1].N)
	}
	// At T = 1 yr, T_obs = 10 yr the limit sits at 10^(12 + (ε−0.2303)/ε) ≈ 5.77e12 GeV.
	if !scalar.EqualWithinRel(pts[1].Lambda, 5.768e12, 1e-3) {
		t.Errorf("Λ(1 yr, 1e6 m) = %g, want ≈ 5.768e12 GeV", pts[1].Lambda)
	}
}

func TestReachErrors(t *testing.T) {
	rows := reachTable(t)
	for name, o := range map[string]ReachOptions{
		"no T":        {Span: yr},
		"no span":     {MeanIntervals: []float64{yr}},
		"bad CL":      {MeanIntervals: []float64{yr}, Span: yr, CL: 1.5},
		"negative T":  {MeanIntervals: []float64{-yr}, Span: yr},
		"two T":       {MeanIntervals: []float64{yr, 2 * yr}, Span: yr},
		"bad T_inj":   {MeanIntervals: []float64{yr}, Span: yr, InjectedInterval: -1},
		"infinite T0": {MeanIntervals: []float64{math.Inf(1)}, Span: yr},
	} {
		if _, err := Reach(rows, o); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	if _, err := Reach(nil, ReachOptions{MeanIntervals: []float64{yr}, Span: yr}); err == nil {
		t.Error("empty table accepted")
	}
}

func TestWriteReach(t *testing.T) {
	pts, err := Reach(reachTable(t), ReachOptions{MeanIntervals: []float64{yr}, Span: 10 * yr})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "reach.csv")
	if err := WriteReach(path, pts); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(path)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) != 4 || !strings.HasPrefix(lines[0], "mean_interval_s,thickness_m,lambda_eff_gev,status") {
		t.Fatalf("reach.csv:\n%s", b)
	}
	if !strings.Contains(lines[1], ",no_limit,") || !strings.Contains(lines[2], ",limit,") || !strings.Contains(lines[2], "clopper_pearson_lower") {
		t.Errorf("reach.csv:\n%s", b)
	}
}

func ExampleReach() {
	// 100 of 100 walls of d = 1000 km found at Λ_eff = 1e12 GeV, none at 1e13.
	a, _ := NewEffRow(1e6, 3e5, 1e12, math.NaN(), 100, 100)
	b, _ := NewEffRow(1e6, 3e5, 1e13, math.NaN(), 100, 0)
	pts, _ := Reach([]EffRow{a, b}, ReachOptions{MeanIntervals: []float64{yr}, Span: 10 * yr, CL: 0.9})
	for _, p := range pts {
		fmt.Printf("T = %.0f yr, d = %.0f km: Λ_eff < %.3g GeV excluded at 90 %% (needs ε ≥ %.3f)\n",
			p.MeanInterval/yr, p.Thickness/1e3, p.Lambda, p.EpsRequired)
	}
	// Output: T = 1 yr, d = 1000 km: Λ_eff < 5.77e+12 GeV excluded at 90 % (needs ε ≥ 0.230)
}

package stability

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestLinearDrift: y = D t gives ADEV = MDEV = Dτ/√2, TDEV = Dτ²/√6 and
// HDEV = OHDEV = 0 (SP 1065 §5.2 and the drift rows of the slope table;
// stability.md §4.3).
func TestLinearDrift(t *testing.T) {
	const (
		n    = 20000
		tau0 = 30.0
		D    = 1e-12 / 86400 // 1/s
	)
	x := make([]float64, n)
	for i := range x {
		tt := float64(i) * tau0
		x[i] = 1e-6 + 3e-11*tt + D*tt*tt/2 // offsets do not matter
	}
	m := []int{1, 3, 10, 100, 1000}
	for _, s := range []Stat{StatADEV, StatOADEV, StatMDEV} {
		r, err := Compute(s, x, tau0, m, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range r {
			if want := D * v.Tau / math.Sqrt2; !scalar.EqualWithinRel(v.Value, want, 1e-6) {
				t.Errorf("%s τ=%g s: %g, want Dτ/√2 = %g", s, v.Tau, v.Value, want)
			}
		}
	}
	// the same through the shared one-pass path
	many, _ := ComputeMany([]Stat{StatOADEV, StatMDEV, StatOHDEV}, x, tau0, func(Stat) []int { return m }, nil)
	for i, s := range []Stat{StatOADEV, StatMDEV} {
		for _, v := range many[i] {
			if want := D * v.Tau / math.Sqrt2; !scalar.EqualWithinRel(v.Value, want, 1e-6) {
				t.Errorf("many %s τ=%g s: %g, want Dτ/√2 = %g", s, v.Tau, v.Value, want)
			}
		}
	}
	for _, v := range many[2] {
		if v.Value > 1e-6*D*v.Tau {
			t.Errorf("many ohdev τ=%g s: %g, want 0", v.Tau, v.Value)
		}
	}
	r, _ := Compute(StatTDEV, x, tau0, m, nil)
	for _, v := range r {
		if want := D * v.Tau * v.Tau / math.Sqrt(6); !scalar.EqualWithinRel(v.Value, want, 1e-6) {
			t.Errorf("tdev τ=%g s: %g, want Dτ²/√6 = %g", v.Tau, v.Value, want)
		}
	}
	for _, s := range []Stat{StatHDEV, StatOHDEV} {
		r, _ := Compute(s, x, tau0, m, nil)
		for _, v := range r {
			// round-off only: far below the Allan value Dτ/√2
			if v.Value > 1e-6*D*v.Tau {
				t.Errorf("%s τ=%g s: %g, want 0 for pure drift", s, v.Tau, v.Value)
			}
		}
	}
}

// TestSinusoidalFM: y = A sin(2π f_m t), sampled exactly in phase, gives
// σ_y(τ) = A sin²(π f_m τ)/(π f_m τ) (SP 1065 periodic FM; stability.md §4.3),
// with its maximum 0.7246 A near τ = 0.3710/f_m.
func TestSinusoidalFM(t *testing.T) {
	const (
		n  = 200000
		A  = 1e-12
		Tm = 137.1 // modulation period, samples (τ0 = 1 s)
	)
	fm := 1 / Tm
	x := make([]float64, n)
	for i := range x {
		x[i] = -A / (2 * math.Pi * fm) * math.Cos(2*math.Pi*fm*float64(i))
	}
	r := OADEV(x, 1, []int{1, 10, 51, 137})
	for _, v := range r {
		u := math.Pi * fm * v.Tau
		want := A * math.Sin(u) * math.Sin(u) / u
		// averaging over a non-integer number of periods leaves ~1/n ripple;
		// at the near-null τ = 137 the absolute scale is A·1e-5
		if !scalar.EqualWithinAbsOrRel(v.Value, want, 2e-4*A, 2e-3) {
			t.Errorf("oadev τ=%g s: %g, want %g", v.Tau, v.Value, want)
		}
	}
	peak := OADEV(x, 1, []int{int(math.Round(0.3710 * Tm))})[0]
	if !scalar.EqualWithinRel(peak.Value, 0.7246*A, 2e-3) {
		t.Errorf("peak σ_y = %g, want 0.7246 A = %g", peak.Value, 0.7246*A)
	}
}

// TestWhiteFMExact: for white y of standard deviation σ, ADEV(mτ0) = σ/√m
// in expectation (SP 1065; stability.md §4.3); with 10⁶ points the
// estimate at m = 1 is within a few 1/√edf.
func TestWhiteFMExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	y := make([]float64, 1_000_000)
	for i := range y {
		y[i] = rng.NormFloat64()
	}
	x := FreqToPhase(y, 1)
	for _, v := range OADEV(x, 1, []int{1, 4, 64}) {
		want := 1 / math.Sqrt(float64(v.M))
		if v.Alpha != 0 {
			t.Errorf("m=%d: identified α = %d, want 0 (WFM)", v.M, v.Alpha)
		}
		// 4σ of the χ² scatter, relative error of a deviation ≈ 1/√(2ν)
		if tol := 4 / math.Sqrt(2*v.EDF); math.Abs(v.Value/want-1) > tol {
			t.Errorf("m=%d: ADEV %g, want %g ± %.2g", v.M, v.Value, want, tol*want)
		}
	}
}

// TestGaps: NaN phase points drop exactly the terms that touch them.
func TestGaps(t *testing.T) {
	x := FreqToPhase(riley1000(), 1)
	full := OADEV(x, 1, []int{1})[0]
	g := append([]float64(nil), x...)
	g[500] = math.NaN()
	r := OADEV(g, 1, []int{1, 10})
	// at m = 1 the point x_500 enters the three terms i = 498, 499, 500
	if r[0].N != full.N-3 {
		t.Errorf("m=1 with one gap: %d terms, want %d", r[0].N, full.N-3)
	}
	// recompute by hand without those terms
	s := 0.0
	for i := 0; i+2 < len(x); i++ {
		if i >= 498 && i <= 500 {
			continue
		}
		d := x[i+2] - 2*x[i+1] + x[i]
		s += d * d
	}
	if want := math.Sqrt(s / (2 * float64(full.N-3))); !scalar.EqualWithinRel(r[0].Value, want, 1e-12) {
		t.Errorf("m=1 with gap: %g, want %g", r[0].Value, want)
	}
	for _, st := range Stats() {
		res, err := Compute(st, g, 1, []int{1, 2, 10, 100}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range res {
			if math.IsNaN(v.Value) || math.IsNaN(v.EDF) {
				t.Errorf("%s m=%d: NaN result with one gap: %+v", st, v.M, v)
			}
		}
	}
	// frequency gap: FreqToPhase marks the phase point after it
	y := riley1000()
	y[10] = math.NaN()
	xp := FreqToPhase(y, 1)
	if !math.IsNaN(xp[11]) || math.IsNaN(xp[12]) || math.IsNaN(xp[10]) {
		t.Errorf("FreqToPhase gap handling: x10=%g x11=%g x12=%g", xp[10], xp[11], xp[12])
	}
}

func TestComputeErrors(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4, 5}
	if _, err := Compute("bogus", x, 1, []int{1}, nil); err == nil {
		t.Error("unknown statistic accepted")
	}
	if _, err := Compute(StatOADEV, x, 0, []int{1}, nil); err == nil {
		t.Error("tau0 = 0 accepted")
	}
	if _, err := Compute(StatOADEV, x, 1, []int{0}, nil); err == nil {
		t.Error("m = 0 accepted")
	}
	if _, err := Compute(StatOADEV, x, 1, []int{1}, &Options{CL: 1.5}); err == nil {
		t.Error("CL = 1.5 accepted")
	}
	// m too large is omitted, not an error
	r, err := Compute(StatOADEV, x, 1, []int{1, 100}, nil)
	if err != nil || len(r) != 1 {
		t.Errorf("m = 100 on 6 points: %v, %d results", err, len(r))
	}
	if got := OctaveTaus(1000, StatOADEV); len(got) != 8 || got[7] != 128 {
		t.Errorf("OctaveTaus(1000, oadev) = %v", got)
	}
	if got := DecadeTaus(1000, StatOADEV); len(got) != 8 || got[7] != 200 {
		t.Errorf("DecadeTaus(1000, oadev) = %v", got)
	}
	if got := AllTaus(100, StatTOTDEV); len(got) != 50 {
		t.Errorf("AllTaus(100, totdev) has %d entries, want 50", len(got))
	}
}

// TestComputeManyMatchesSingle: the shared one-pass evaluation gives the
// same values as the single-statistic estimators, and reproduces the SP 1065
// Table 31 values (1000-point set) for OADEV, MDEV, TDEV and OHDEV.
func TestComputeManyMatchesSingle(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	x := make([]float64, 50000)
	acc := 0.0
	for i := range x {
		acc += 1e-11 + 1e-12*rng.NormFloat64()
		x[i] = 1e-6 + acc // offset and frequency offset stress the recursion
	}
	stats := []Stat{StatOADEV, StatMDEV, StatTDEV, StatOHDEV, StatHDEV}
	grid := func(s Stat) []int { return OctaveTaus(len(x), s) }
	many, err := ComputeMany(stats, x, 1, grid, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, s := range stats {
		single, _ := Compute(s, x, 1, grid(s), nil)
		if len(single) != len(many[i]) {
			t.Fatalf("%s: %d vs %d results", s, len(single), len(many[i]))
		}
		for k := range single {
			if !scalar.EqualWithinRel(single[k].Value, many[i][k].Value, 1e-9) || single[k].N != many[i][k].N || single[k].EDF != many[i][k].EDF {
				t.Errorf("%s m=%d: single %+v, many %+v", s, single[k].M, single[k], many[i][k])
			}
		}
	}
	xr := FreqToPhase(riley1000(), 1)
	want := map[Stat][]float64{ // SP 1065 Table 31
		StatOADEV: {2.922319e-01, 9.159953e-02, 3.241343e-02},
		StatMDEV:  {2.922319e-01, 6.172376e-02, 2.170921e-02},
		StatTDEV:  {1.687202e-01, 3.563623e-01, 1.253382e+00},
		StatOHDEV: {2.943883e-01, 9.581083e-02, 3.237638e-02},
	}
	st := []Stat{StatOADEV, StatMDEV, StatTDEV, StatOHDEV}
	r, _ := ComputeMany(st, xr, 1, func(Stat) []int { return []int{1, 10, 100} }, nil)
	for i, s := range st {
		for k, v := range r[i] {
			if !scalar.EqualWithinRel(v.Value, want[s][k], 1e-6) {
				t.Errorf("many %s m=%d: %.7g, want %.7g", s, v.M, v.Value, want[s][k])
			}
		}
	}
}

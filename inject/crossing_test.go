package inject

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

func randomUnit(rng *rand.Rand) [3]float64 {
	for {
		v := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		if n := math.Sqrt(dot(v, v)); n > 1e-6 {
			return [3]float64{v[0] / n, v[1] / n, v[2] / n}
		}
	}
}

// bisectCrossing is an independent reference: plain bisection of
// N·r(t) − v(t − t0) on a wide bracket to 1e-10 s.
func bisectCrossing(w Wall, tr Trajectory) float64 {
	f := func(t float64) float64 { return dot(w.N, tr(t)) - w.Speed*(t-w.T0) }
	lo, hi := w.T0-1e4, w.T0+1e4
	for hi-lo > 1e-10 {
		m := 0.5 * (lo + hi)
		if f(m) > 0 {
			lo = m
		} else {
			hi = m
		}
	}
	return 0.5 * (lo + hi)
}

// Residual below 1 µs on many random cases (satellites on circular orbits
// from LEO to GEO and rotating ground stations; wall speeds 20–800 km/s),
// and agreement with an independent bisection.
func TestCrossingResidualRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for i := range 400 {
		var tr Trajectory
		var kind string
		if i%4 == 3 {
			tr = station(6.371e6, math.Asin(2*rng.Float64()-1), 2*math.Pi*rng.Float64())
			kind = "station"
		} else {
			a := 7e6 + 3.6e7*rng.Float64()
			tr = circularOrbit(a, math.Pi*rng.Float64(), 2*math.Pi*rng.Float64(), 2*math.Pi*rng.Float64())
			kind = "satellite"
		}
		v := 2e4 + 7.8e5*rng.Float64()
		w := effWall(randomUnit(rng), v, 1e6, 86400*rng.Float64(), 1e9, 1e12, ProfileGaussian)
		c, err := w.Cross("C", "rb", tr)
		if err != nil {
			t.Fatalf("case %d (%s, v=%g m/s): %v", i, kind, v, err)
		}
		res := math.Abs(dot(w.N, tr(c.TCross))-w.Speed*(c.TCross-w.T0)) / w.Speed
		if res >= 1e-6 {
			t.Errorf("case %d (%s): residual %g s", i, kind, res)
		}
		if ref := bisectCrossing(w, tr); math.Abs(ref-c.TCross) > 1e-6 {
			t.Errorf("case %d (%s): t_cross %.9f s, bisection %.9f s", i, kind, c.TCross, ref)
		}
		// v_rel = v − N·ṙ, with ṙ from the analytic orbit speed bound.
		if c.VRel < v-8e3 || c.VRel > v+8e3 {
			t.Errorf("case %d: v_rel %g m/s far from v %g m/s", i, c.VRel, v)
		}
	}
}

// The sweep across a GPS-like constellation lasts about 2a/v (physics.md
// §3.5: a = 26 560 km, 177 s at 300 km/s). Since |N·r| ≤ a, every crossing
// lies within a/v of t0, so the sweep cannot exceed 2a/v; with 6 planes × 30
// satellites it comes within a few per cent of it.
func TestGPSSweepDuration(t *testing.T) {
	const a, v = 26.56e6, 3e5
	rng := rand.New(rand.NewPCG(3, 5))
	for trial := range 5 {
		w := effWall(randomUnit(rng), v, 1e7, 3600, 7.47e9, 1e13, ProfileGaussian)
		first, last := math.Inf(1), math.Inf(-1)
		for plane := range 6 {
			for s := range 30 {
				tr := circularOrbit(a, 55*math.Pi/180, float64(plane)*math.Pi/3, float64(s)*2*math.Pi/30+float64(plane)*0.2)
				c, err := w.Cross("G", "gps-iif-rb", tr)
				if err != nil {
					t.Fatal(err)
				}
				first, last = math.Min(first, c.TCross), math.Max(last, c.TCross)
			}
		}
		sweep := last - first
		if sweep > 2*a/v+1e-6 || sweep < 0.9*2*a/v {
			t.Errorf("trial %d: sweep %.2f s, want ≤ 2a/v = %.2f s and close to it", trial, sweep, 2*a/v)
		}
		if !scalar.EqualWithinAbs(2*a/v, 177, 0.5) {
			t.Errorf("2a/v = %g s, physics.md §3.5 gives 177 s", 2*a/v)
		}
	}
}

// A clock at rest at the geocentre is crossed exactly at t0; a clock at rest
// at distance D along N at t0 + D/v, with v_rel = v.
func TestCrossingStatic(t *testing.T) {
	w := effWall([3]float64{0, 0.6, 0.8}, 2.5e5, 1e6, 42, 1e9, 1e12, ProfileTopHat)
	for _, D := range []float64{0, 1e7, -3e7} {
		pos := [3]float64{5e6, 0.6 * D, 0.8 * D} // x component ⊥ N
		c, err := w.Cross("S", "cs", func(float64) [3]float64 { return pos })
		if err != nil {
			t.Fatal(err)
		}
		if want := 42 + D/2.5e5; !scalar.EqualWithinAbs(c.TCross, want, 1e-9) {
			t.Errorf("D=%g m: t_cross %.12g s, want %.12g s", D, c.TCross, want)
		}
		if !scalar.EqualWithinRel(c.VRel, 2.5e5, 1e-12) {
			t.Errorf("D=%g m: v_rel %g m/s", D, c.VRel)
		}
	}
}

// Earth rotation and satellite motion shift crossing times at the 1 % level
// (physics.md §3.1): a clock moving toward the wall along N at speed u is
// crossed at t0 + D/(v + u) instead of t0 + D/v, with v_rel = v + u.
func TestCrossingMovingClock(t *testing.T) {
	const v, u, D = 3e5, 3.9e3, 2.6e7
	w := effWall([3]float64{1, 0, 0}, v, 1e7, 0, 1e9, 1e12, ProfileGaussian)
	tr := func(t float64) [3]float64 { return [3]float64{D - u*t, 1e6, 0} }
	c, err := w.Cross("M", "rb", tr)
	if err != nil {
		t.Fatal(err)
	}
	if want := D / (v + u); !scalar.EqualWithinAbs(c.TCross, want, 1e-9) {
		t.Errorf("t_cross %.12g s, want %.12g s", c.TCross, want)
	}
	if !scalar.EqualWithinRel(c.VRel, v+u, 1e-12) {
		t.Errorf("v_rel %.12g m/s, want %.12g", c.VRel, v+u)
	}
	// Default (physics.md §3.2): τ = d/v⊥ for every clock.
	if !scalar.EqualWithinRel(c.Tau, 1e7/v, 1e-12) {
		t.Errorf("tau %g s, want d/v = %g s", c.Tau, 1e7/v)
	}
	w.ClockMotion = true
	if c, err = w.Cross("M", "rb", tr); err != nil || !scalar.EqualWithinRel(c.Tau, 1e7/(v+u), 1e-12) {
		t.Errorf("with clock motion: tau %g s, want d/v_rel = %g s (%v)", c.Tau, 1e7/(v+u), err)
	}
}

// Bad walls and trajectories give errors, not panics.
func TestCrossingErrors(t *testing.T) {
	good := effWall([3]float64{1, 0, 0}, 3e5, 1e7, 0, 1e9, 1e12, ProfileGaussian)
	origin := func(float64) [3]float64 { return [3]float64{} }
	for name, mod := range map[string]func(w *Wall){
		"zero speed":      func(w *Wall) { w.Speed = 0 },
		"speed above c":   func(w *Wall) { w.Speed = 4e8 },
		"non-unit normal": func(w *Wall) { w.N = [3]float64{1, 1, 0} },
		"zero thickness":  func(w *Wall) { w.Thickness = 0 },
		"no profile":      func(w *Wall) { w.Profile = 0 },
		"negative A2":     func(w *Wall) { w.A2 = -1 },
		"NaN t0":          func(w *Wall) { w.T0 = math.NaN() },
		"no coupling":     func(w *Wall) { w.Coupling = Coupling{} },
	} {
		w := good
		mod(&w)
		if _, err := w.Cross("C", "rb", origin); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	if _, err := good.Cross("C", "sundial", origin); err == nil {
		t.Error("unknown family accepted")
	}
	if _, err := good.Cross("C", "rb", nil); err == nil {
		t.Error("nil trajectory accepted")
	}
	nan := func(float64) [3]float64 { return [3]float64{math.NaN(), 0, 0} }
	if _, err := good.Cross("C", "rb", nan); err == nil {
		t.Error("NaN trajectory accepted")
	}
	// A clock outrunning the wall along N is never crossed.
	fast := func(t float64) [3]float64 { return [3]float64{1e6 + 4e5*t, 0, 0} }
	if _, err := good.Cross("C", "rb", fast); err == nil {
		t.Error("clock faster than the wall accepted")
	}
}

// The linear approximation within a crossing (doc.go): for a GPS orbit
// (a_max = GM/a² = 0.565 m/s²) the rendered phase differs from the phase
// integrated along the true trajectory, ∫ Scale·s(−x(t)/d) dt, by less than
// the documented bound a_max·k²·d/(2·v_rel²) (k = 3) relative to the step.
func TestLinearApproximationBound(t *testing.T) {
	const a = 26.56e6
	amax := gmEarth / (a * a)
	rng := rand.New(rand.NewPCG(17, 19))
	for _, d := range []float64{1e7, 1e8} {
		for trial := range 4 {
			tr := circularOrbit(a, 55*math.Pi/180, 2*math.Pi*rng.Float64(), 2*math.Pi*rng.Float64())
			w := effWall(randomUnit(rng), 3e5, d, 0, 1e9, 1e11, ProfileGaussian)
			w.ClockMotion = true // compared with the exact path integral, which includes the clock's motion
			c, err := w.Cross("G", "rb", tr)
			if err != nil {
				t.Fatal(err)
			}
			exact := func(tt float64) float64 {
				x := dot(w.N, tr(tt)) - w.Speed*(tt-w.T0)
				return c.Scale * w.Profile.Shape(-x/d)
			}
			bound := amax * 9 * d / (2 * c.VRel * c.VRel)
			worst := 0.0
			acc, prev := 0.0, c.TCross-8*c.Tau
			for k := -8.0; k <= 8; k += 0.5 {
				tt := c.TCross + k*c.Tau
				if tt > prev {
					acc += quad.Fixed(exact, prev, tt, 40, nil, 0)
					prev = tt
				}
				worst = math.Max(worst, math.Abs(acc-c.PhaseAt(tt))/math.Abs(c.Step()))
			}
			if worst > bound {
				t.Errorf("d = %g m, trial %d: phase error %.3g of the step, bound %.3g", d, trial, worst, bound)
			}
			t.Logf("d = %g m: phase error %.3g of the step (bound %.3g)", d, worst, bound)
		}
	}
}

// Ground stations: the Earth is crossed in about 2R_E/v = 42 s at 300 km/s
// (physics.md §3.5, R_E = 6371 km). Station speeds (≤ 465 m/s) shift each
// crossing by at most R_E·465/v² ≈ 0.03 s.
func TestEarthSweepDuration(t *testing.T) {
	const R, v = 6.371e6, 3e5
	rng := rand.New(rand.NewPCG(23, 29))
	w := effWall(randomUnit(rng), v, 1e7, 500, 7.47e9, 1e13, ProfileGaussian)
	first, last := math.Inf(1), math.Inf(-1)
	for i := range 2000 {
		lat, lon := math.Asin(2*rng.Float64()-1), 2*math.Pi*rng.Float64()
		c, err := w.Cross("S", "hmaser", station(R, lat, lon))
		if err != nil {
			t.Fatalf("station %d: %v", i, err)
		}
		first, last = math.Min(first, c.TCross), math.Max(last, c.TCross)
	}
	sweep := last - first
	if sweep > 2*R/v+0.1 || sweep < 0.97*2*R/v {
		t.Errorf("Earth sweep %.2f s, want ≈ 2R/v = %.2f s", sweep, 2*R/v)
	}
	if !scalar.EqualWithinAbs(2*R/v, 42, 0.5) {
		t.Errorf("2R/v = %g s, physics.md §3.5 gives 42 s", 2*R/v)
	}
}

// A trajectory that is NaN before the run start (ephemeris coverage) while
// the wall passed the geocentre 30 s before it: the clock 2e7 m ahead is
// still crossed inside the coverage, and the solver finds it.
func TestCrossingPartialCoverage(t *testing.T) {
	w := effWall([3]float64{1, 0, 0}, 3e5, 1e7, -30, 1e9, 1e12, ProfileGaussian)
	tr := func(t float64) [3]float64 {
		if t < 0 {
			return [3]float64{math.NaN(), math.NaN(), math.NaN()}
		}
		return [3]float64{2e7 - 3e3*t, 1e6, 0}
	}
	c, err := w.Cross("G", "rb", tr)
	if err != nil {
		t.Fatal(err)
	}
	// 2e7 − 3e3·t = 3e5·(t + 30)  ⇒  t = (2e7 − 9e6)/3.03e5
	if want := (2e7 - 9e6) / 3.03e5; !scalar.EqualWithinAbs(c.TCross, want, 1e-9) {
		t.Errorf("t_cross %.9f s, want %.9f s", c.TCross, want)
	}
	never := func(float64) [3]float64 { return [3]float64{math.NaN(), 0, 0} }
	if _, err := w.Cross("G", "rb", never); err == nil {
		t.Error("trajectory without coverage accepted")
	}
}

// Sweep durations 2a/v at 300 km/s for the other constellations of
// physics.md §3.5 (orbit radii from memory there): a dense shell of
// satellites on circular orbits is swept in just under 2a/v.
func TestSweepTable(t *testing.T) {
	rng := rand.New(rand.NewPCG(59, 61))
	for _, tc := range []struct {
		system string
		a      float64 // m
		sweep  float64 // s, physics.md §3.5
	}{
		{"GLONASS", 25.51e6, 170},
		{"BeiDou MEO", 27.906e6, 186},
		{"Galileo", 29.6e6, 197},
		{"BeiDou GEO/IGSO", 42.164e6, 281},
	} {
		w := effWall(randomUnit(rng), 3e5, 1e7, 0, 1e9, 1e12, ProfileGaussian)
		first, last := math.Inf(1), math.Inf(-1)
		for i := range 200 {
			tr := circularOrbit(tc.a, math.Acos(2*rng.Float64()-1), 2*math.Pi*rng.Float64(), 2*math.Pi*float64(i)/200)
			c, err := w.Cross("S", "galileo-phm", tr)
			if err != nil {
				t.Fatal(err)
			}
			first, last = math.Min(first, c.TCross), math.Max(last, c.TCross)
		}
		if got := last - first; got > 2*tc.a/3e5+1e-6 || got < 0.9*tc.sweep {
			t.Errorf("%s: sweep %.1f s, want just under %.0f s", tc.system, got, tc.sweep)
		}
		if !scalar.EqualWithinAbs(2*tc.a/3e5, tc.sweep, 0.5) {
			t.Errorf("%s: 2a/v = %.1f s, physics.md %g s", tc.system, 2*tc.a/3e5, tc.sweep)
		}
	}
}

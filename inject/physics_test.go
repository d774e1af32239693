package inject

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// Worked magnitudes of physics.md §7, from the Derevianko & Pospelov 2014
// amplitude relation A² = ħc·ρ_DM·v·T·d. Inputs: d = 1e7 m, T = 3.156e7 s,
// ρ = 0.4 GeV/cm³, v = 3e5 m/s, Λ_eff = 1e13 GeV. The published figures are
// given to two or three digits, so the tolerance is half a unit of the last
// digit quoted.
func TestWorkedMagnitudes(t *testing.T) {
	const (
		d      = 1e7
		T      = 3.156e7
		rho    = 0.4 * GeVPerCm3
		v      = 3e5
		lambda = 1e13
	)
	a2 := A2FromDensity(rho, v, T, d)
	gamma := 1 / (lambda * lambda)
	h := gamma * a2
	tau := d / v
	wall := effWall([3]float64{1, 0, 0}, v, d, 0, a2, lambda, ProfileGaussian)
	c, err := wall.Cross("G01", "gps-iif-rb", func(float64) [3]float64 { return [3]float64{} })
	if err != nil {
		t.Fatal(err)
	}
	ev, err := wall.Event()
	if err != nil {
		t.Fatal(err)
	}
	// Kink with its own tension normalisation: C = 2 × 3/4 = 3/2 (physics.md §3.3).
	kinkA2, err := AmplitudeSpec{Mode: AmplitudeDensity, RhoDM: rho, VBar: v, MeanInterval: T, KinkTension: true}.
		Resolve(ProfileKink, wall.Coupling, d, v)
	if err != nil {
		t.Fatal(err)
	}
	kink := effWall([3]float64{1, 0, 0}, v, d, 0, kinkA2, lambda, ProfileKink)
	ck, err := kink.Cross("G01", "gps-iif-rb", func(float64) [3]float64 { return [3]float64{} })
	if err != nil {
		t.Fatal(err)
	}
	w11 := wall
	w11.Coupling.LambdaEff = 1e11
	c11, err := w11.Cross("G01", "gps-iif-rb", func(float64) [3]float64 { return [3]float64{} })
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name      string
		got, want float64
		rel       float64
	}{
		{"A² GeV² (§7.1)", a2, 7.47e9, 0.5e-2 / 7.47},
		{"A GeV (§7.1)", math.Sqrt(a2), 8.6e4, 0.05 / 8.6},
		{"peak h (§7.2)", h, 7.5e-17, 0.05 / 7.5},
		{"peak h from the event record (§7.2)", ev.PeakDnu, 7.5e-17, 0.05 / 7.5},
		{"τ = d/v s (§7.3)", tau, 33, 0.5 / 33},
		{"Gaussian step s (§7.4)", c.Step(), 4.4e-15, 0.05 / 4.4},
		{"kink step s, C = 3/2 (§7.4)", -ck.Step(), 3.7e-15, 0.05 / 3.7},
		{"h at Λ = 1e11 GeV (§7.5)", c11.Scale, 7.5e-13, 0.05 / 7.5},
		{"step at Λ = 1e11 GeV s (§7.5)", c11.Step(), 44e-12, 0.5 / 44},
		{"reach for 10 ps GeV (§7.5)", LambdaEffForStep(ProfileGaussian, 10e-12, rho, v, T, d, v), 2.1e11, 0.05 / 2.1},
		{"reach for 30 ps GeV (§7.5)", LambdaEffForStep(ProfileGaussian, 30e-12, rho, v, T, d, v), 1.2e11, 0.05 / 1.2},
		{"reach for 100 ps GeV (§7.5)", LambdaEffForStep(ProfileGaussian, 100e-12, rho, v, T, d, v), 6.6e10, 0.05 / 6.6},
		// §7.6: ρ_in = A²/(ħc·d²) ≈ 3.8e5 GeV/cm³ (ρ_in/ρ_DM = vT/d, §1.2).
		{"ρ_in GeV/cm³ (§7.6)", a2 / (HbarC * d * d) / GeVPerCm3, 3.8e5, 0.05 / 3.8},
		// §1.2: ρ_in/ρ_DM = vT/d ≈ 9.5e5 for d = 1e4 km, T = 1 yr.
		{"ρ_in/ρ_DM (§1.2)", a2 / (HbarC * d * d) / rho, 9.5e5, 0.05 / 9.5},
		{"step via StepFromDensity s (§3.3)", StepFromDensity(ProfileGaussian, gamma, rho, v, T, d, v), 4.4e-15, 0.05 / 4.4},
	} {
		if !scalar.EqualWithinRel(tc.got, tc.want, tc.rel) {
			t.Errorf("%s: got %.4g, want %.3g (rel tol %.2g)", tc.name, tc.got, tc.want, tc.rel)
		}
	}
}

// The natural-unit form of the amplitude relation (physics.md §1.2):
// A² = ρ[GeV⁴]·(v/c)·T[GeV⁻¹]·d[GeV⁻¹] with ρ[GeV⁴] = ρ[GeV/m³]·(ħc)³,
// T[GeV⁻¹] = T/ħ, d[GeV⁻¹] = d/ħc. It must equal the SI form to 1e-9.
func TestAmplitudeNaturalUnits(t *testing.T) {
	rho, v, T, d := 0.3*GeVPerCm3, 2.3e5, 1e6, 3e6
	natural := rho * HbarC * HbarC * HbarC * (v / SpeedOfLight) * (T / Hbar) * (d / HbarC)
	// ħc = ħ·c links the two constants: CODATA ħ and ħc agree to their digits.
	if !scalar.EqualWithinRel(Hbar*SpeedOfLight, HbarC, 1e-9) {
		t.Fatalf("ħ·c = %g GeV·m, ħc = %g GeV·m", Hbar*SpeedOfLight, HbarC)
	}
	if got := A2FromDensity(rho, v, T, d); !scalar.EqualWithinRel(got, natural, 1e-9) {
		t.Errorf("A² SI %g GeV², natural units %g GeV²", got, natural)
	}
}

// The Gaussian step equals √π·Γ·A²·d/v to 1e-12 relative (physics.md §3.3),
// both as Crossing.Step and as the rendered phase far after the crossing.
func TestGaussianStep(t *testing.T) {
	for _, tc := range []struct{ d, v, a2, lambda float64 }{
		{1e7, 3e5, 7.47e9, 1e13},
		{1e5, 3e5, 1e8, 1e11},
		{3e8, 1.5e5, 2e12, 5e12},
	} {
		w := effWall([3]float64{0, 0, 1}, tc.v, tc.d, 100, tc.a2, tc.lambda, ProfileGaussian)
		c, err := w.Cross("X", "rb", func(float64) [3]float64 { return [3]float64{} })
		if err != nil {
			t.Fatal(err)
		}
		want := math.Sqrt(math.Pi) * tc.a2 / (tc.lambda * tc.lambda) * tc.d / tc.v
		if !scalar.EqualWithinRel(c.Step(), want, 1e-12) {
			t.Errorf("d=%g m: step %.16g s, want %.16g s", tc.d, c.Step(), want)
		}
		far := c.TCross + 100*c.Tau
		if got := c.PhaseAt(far); !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("d=%g m: phase after the crossing %.16g s, want %.16g s", tc.d, got, want)
		}
		if got := c.PhaseAt(c.TCross - 100*c.Tau); got != 0 {
			t.Errorf("d=%g m: phase before the crossing %g s, want 0", tc.d, got)
		}
		// physics.md §3.2: b(t) = Γ·A²·(√π/2)·τ·[1 + erf((t − t_j)/τ)]
		tt := c.TCross + 0.37*c.Tau
		b := tc.a2 / (tc.lambda * tc.lambda) * math.Sqrt(math.Pi) / 2 * c.Tau * (1 + math.Erf(0.37))
		if got := c.PhaseAt(tt); !scalar.EqualWithinRel(got, b, 1e-13) {
			t.Errorf("d=%g m: phase at t_j+0.37τ %g s, want %g s", tc.d, got, b)
		}
	}
}

// physics.md §3.2: kink with quadratic coupling, b(t) = −Γ·A²·τ·[1 + tanh((t − t_j)/τ)].
func TestKinkPhaseFormula(t *testing.T) {
	w := effWall([3]float64{0, 1, 0}, 3e5, 1e7, 0, 7.47e9, 1e12, ProfileKink)
	c, err := w.Cross("X", "hmaser", func(float64) [3]float64 { return [3]float64{} })
	if err != nil {
		t.Fatal(err)
	}
	g := 7.47e9 / 1e24
	for _, u := range []float64{-3, -0.5, 0, 0.2, 1.7} {
		want := -g * c.Tau * (1 + math.Tanh(u))
		if got := c.PhaseAt(c.TCross + u*c.Tau); !scalar.EqualWithinAbsOrRel(got, want, 1e-30, 1e-13) {
			t.Errorf("u=%g: phase %g s, want %g s", u, got, want)
		}
	}
}

// Linear kink (physics.md §3.6): the frequency steps by Δy = 2·Γ·A between
// the domains, and the phase far after the crossing follows the sharp ramp
// Δy·(t − t_cross) (ln(1 + e^{2u}) → 2u).
func TestLinearKinkRamp(t *testing.T) {
	const a2, lambda = 1e10, 1e20
	w := effWall([3]float64{1, 1, 0}, 3e5, 3e6, 10, a2, lambda, ProfileKinkLinear)
	c, err := w.Cross("X", "cs", func(float64) [3]float64 { return [3]float64{} })
	if err != nil {
		t.Fatal(err)
	}
	dy := 2 * math.Sqrt(a2) / lambda
	if got := c.FrequencyAt(c.TCross + 50*c.Tau); !scalar.EqualWithinRel(got, dy, 1e-14) {
		t.Errorf("frequency after the crossing %g, want Δy = %g", got, dy)
	}
	tt := c.TCross + 30*c.Tau
	if got, want := c.PhaseAt(tt), dy*(tt-c.TCross); !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("phase at 30τ %g s, want ramp %g s", got, want)
	}
	if p, _ := w.PeakDnu(); !scalar.EqualWithinRel(p, dy, 1e-14) {
		t.Errorf("peak_dnu %g, want Δy %g", p, dy)
	}
	if !math.IsNaN(c.Step()) {
		t.Errorf("linear kink step %g, want NaN", c.Step())
	}
}

// Profile areas C_p of physics.md §1.1 (√π, 2 for the kink dip, 1 for the
// top-hat) against the closed-form cumulative integrals.
func TestProfileAreas(t *testing.T) {
	for _, tc := range []struct {
		p    Profile
		area float64
	}{
		{ProfileGaussian, math.Sqrt(math.Pi)}, // physics.md §1.1
		{ProfileKink, -2},                     // physics.md §1.1 (dip)
		{ProfileTopHat, 1},                    // physics.md §1.1
	} {
		if got := tc.p.Area(); got != tc.area {
			t.Errorf("%v: area %g, want %g", tc.p, got, tc.area)
		}
		if got := tc.p.Cumulative(60) - tc.p.Cumulative(-60); !scalar.EqualWithinRel(got, tc.area, 1e-15) {
			t.Errorf("%v: S(∞) − S(−∞) = %g, want %g", tc.p, got, tc.area)
		}
		if got := tc.p.Between(-60, 60); !scalar.EqualWithinRel(got, tc.area, 1e-15) {
			t.Errorf("%v: Between(−∞, ∞) = %g, want %g", tc.p, got, tc.area)
		}
	}
}

func TestParseProfile(t *testing.T) {
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat, ProfileKinkLinear} {
		q, err := ParseProfile(p.String())
		if err != nil || q != p {
			t.Errorf("round trip of %v: %v, %v", p, q, err)
		}
	}
	if q, err := ParseProfile("box"); err != nil || q != ProfileTopHat {
		t.Errorf("box: %v %v", q, err)
	}
	if _, err := ParseProfile("lorentzian"); err == nil {
		t.Error("unknown profile accepted")
	}
}

func TestParseModes(t *testing.T) {
	for _, m := range []AmplitudeMode{AmplitudeDensity, AmplitudePeak, AmplitudeStep, AmplitudeDirect} {
		if q, err := ParseAmplitudeMode(m.String()); err != nil || q != m {
			t.Errorf("amplitude mode %v: %v %v", m, q, err)
		}
	}
	for _, m := range []CouplingMode{CouplingEff, CouplingPerConstant} {
		if q, err := ParseCouplingMode(m.String()); err != nil || q != m {
			t.Errorf("coupling mode %v: %v %v", m, q, err)
		}
	}
	for _, o := range []Orientation{OrientAlongVelocity, OrientIsotropic} {
		if q, err := ParseOrientation(o.String()); err != nil || q != o {
			t.Errorf("orientation %v: %v %v", o, q, err)
		}
	}
	for _, c := range []Convention{ConventionR, ConventionA} {
		if q, err := ParseConvention(c.String()); err != nil || q != c {
			t.Errorf("convention %v: %v %v", c, q, err)
		}
	}
	if _, err := ParseAmplitudeMode("loud"); err == nil {
		t.Error("unknown amplitude mode accepted")
	}
	if _, err := ParseCouplingMode("strong"); err == nil {
		t.Error("unknown coupling mode accepted")
	}
}

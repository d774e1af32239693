package inject

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// Sensitivity coefficients of physics.md §2.3 for every clock family.
func TestSensitivityTable(t *testing.T) {
	for _, tc := range []struct {
		family   string
		species  string
		conv     Convention
		kα, kme  float64
		kmp, kxq float64
	}{
		{"gps-iir-rb", SpeciesRb87, ConventionR, 2.34, 1, -1, -0.019},   // [FT06, Dinh09]
		{"gps-iif-rb", SpeciesRb87, ConventionA, 4.34, 2, -1, -0.019},   // R + (2, 1)
		{"gps-iif-cs", SpeciesCs133, ConventionR, 2.83, 1, -1, 0.002},   // [FT06, Dinh09]
		{"gps-iii-rb", SpeciesRb87, ConventionR, 2.34, 1, -1, -0.019},   // [FT06, Dinh09]
		{"galileo-phm", SpeciesH, ConventionR, 2.00, 1, -1, -0.100},     // [FT06]
		{"galileo-rafs", SpeciesRb87, ConventionR, 2.34, 1, -1, -0.019}, // [FT06, Dinh09]
		{"beidou3-rb", SpeciesRb87, ConventionR, 2.34, 1, -1, -0.019},   // [FT06, Dinh09]
		{"beidou3-phm", SpeciesH, ConventionA, 4.00, 2, -1, -0.100},     // physics.md §2.3 convention A: H 4.00
		{"glonass-cs", SpeciesCs133, ConventionA, 4.83, 2, -1, 0.002},   // physics.md §2.3 convention A: Cs 4.83
		{"hmaser", SpeciesH, ConventionR, 2.00, 1, -1, -0.100},          // [FT06]
		{"cs", SpeciesCs133, ConventionR, 2.83, 1, -1, 0.002},           // [FT06, Dinh09]
		{"rb", SpeciesRb87, ConventionA, 4.34, 2, -1, -0.019},           // physics.md §2.3 convention A: Rb 4.34
		{"quartz", SpeciesNone, ConventionR, 0, 0, 0, 0},                // no atomic reference
	} {
		c, err := Sensitivity(tc.family, tc.conv)
		if err != nil {
			t.Fatal(err)
		}
		if c.Species != tc.species || c.Convention != tc.conv {
			t.Errorf("%s: species %q convention %v", tc.family, c.Species, c.Convention)
		}
		for _, k := range []struct {
			name      string
			got, want float64
		}{{"K_α", c.KAlpha, tc.kα}, {"K_me", c.KMe, tc.kme}, {"K_mp", c.KMp, tc.kmp}, {"κ_q", c.KXq, tc.kxq}} {
			if !scalar.EqualWithinAbs(k.got, k.want, 1e-12) {
				t.Errorf("%s %v: %s = %g, want %g", tc.family, tc.conv, k.name, k.got, k.want)
			}
		}
		if c.Source == "" {
			t.Errorf("%s: no source", tc.family)
		}
	}
	if len(Families()) != 13 {
		t.Errorf("%d families", len(Families()))
	}
	for _, f := range Families() {
		if _, err := SpeciesOf(f); err != nil {
			t.Error(err)
		}
	}
	if _, err := Sensitivity("sundial", ConventionR); err == nil {
		t.Error("unknown family accepted")
	}
	if _, err := Sensitivity("rb", 0); err == nil {
		t.Error("unset convention accepted")
	}
}

// Rb/Cs ∝ α^{−0.49}·X_q^{−0.021}, the combination of Rb/Cs fountain tests
// (Guéna et al. 2012, physics.md §2.3, from memory), in both conventions
// (the convention-A shift cancels in a ratio).
func TestRbCsRatio(t *testing.T) {
	for _, conv := range []Convention{ConventionR, ConventionA} {
		rb, _ := Sensitivity("rb", conv)
		cs, _ := Sensitivity("cs", conv)
		if d := rb.KAlpha - cs.KAlpha; !scalar.EqualWithinAbs(d, -0.49, 1e-12) {
			t.Errorf("%v: K_α(Rb) − K_α(Cs) = %g, want −0.49", conv, d)
		}
		if d := rb.KXq - cs.KXq; !scalar.EqualWithinAbs(d, -0.021, 1e-12) {
			t.Errorf("%v: κ_q(Rb) − κ_q(Cs) = %g, want −0.021", conv, d)
		}
	}
}

// Γ_eff = Σ K_X·Γ_X (physics.md §2.2): α-only coupling gives
// Λ_eff = Λ_α/√|K_α|; signs and the m_q σ-term enter as documented.
func TestGammaPerConstant(t *testing.T) {
	c := Coupling{Mode: CouplingPerConstant, Alpha: ConstantCoupling{Lambda: 1e12}, Convention: ConventionR}
	l, err := c.LambdaEffFor("gps-iir-rb", 2)
	if err != nil {
		t.Fatal(err)
	}
	if want := 1e12 / math.Sqrt(2.34); !scalar.EqualWithinRel(l, want, 1e-14) {
		t.Errorf("α-only Λ_eff %g GeV, want Λ_α/√K_α = %g", l, want)
	}
	c = Coupling{Mode: CouplingPerConstant, Convention: ConventionA,
		Alpha: ConstantCoupling{Lambda: 1e12, Negative: true},
		Me:    ConstantCoupling{Lambda: 2e12},
		Mq:    ConstantCoupling{Lambda: 5e11}}
	g, err := c.Gamma("hmaser", 2)
	if err != nil {
		t.Fatal(err)
	}
	want := -4.00/1e24 + 2/4e24 + (-0.100-0.05)/25e22
	if !scalar.EqualWithinRel(g, want, 1e-14) {
		t.Errorf("Γ(H, A) = %g GeV⁻², want %g", g, want)
	}
	gl, err := c.Gamma("hmaser", 1)
	if err != nil {
		t.Fatal(err)
	}
	if wl := -4.00/1e12 + 2/2e12 + (-0.150)/5e11; !scalar.EqualWithinRel(gl, wl, 1e-14) {
		t.Errorf("linear Γ(H, A) = %g GeV⁻¹, want %g", gl, wl)
	}
	if g, _ := c.Gamma("quartz", 2); g != 0 {
		t.Errorf("quartz Γ %g, want 0", g)
	}
	eff := Coupling{Mode: CouplingEff, LambdaEff: 1e11, Negative: true}
	if g, _ := eff.Gamma("cs", 2); g != -1e-22 {
		t.Errorf("effective Γ %g, want −1e-22", g)
	}
	for name, bad := range map[string]Coupling{
		"unset":             {},
		"negative Λ_eff":    {Mode: CouplingEff, LambdaEff: -1},
		"nothing coupled":   {Mode: CouplingPerConstant, Convention: ConventionR},
		"no convention":     {Mode: CouplingPerConstant, Alpha: ConstantCoupling{Lambda: 1}},
		"bad report family": {Mode: CouplingPerConstant, Alpha: ConstantCoupling{Lambda: 1}, Convention: ConventionR, ReportFamily: "x"},
		"NaN Λ_me":          {Mode: CouplingPerConstant, Me: ConstantCoupling{Lambda: math.NaN()}, Convention: ConventionR},
	} {
		if err := bad.Validate(); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}

// Dilaton conventions (physics.md §2.1): 1/Λ² = 2π·d⁽²⁾/M_Pl², 1/Λ′ = d·√(4π)/M_Pl.
func TestDilaton(t *testing.T) {
	l := LambdaQuadFromDilaton(3)
	if got := 1 / (l * l); !scalar.EqualWithinRel(got, 2*math.Pi*3/(PlanckMass*PlanckMass), 1e-14) {
		t.Errorf("quadratic: 1/Λ² = %g", got)
	}
	lp := LambdaLinFromDilaton(1e-4)
	if got := 1 / lp; !scalar.EqualWithinRel(got, 1e-4*math.Sqrt(4*math.Pi)/PlanckMass, 1e-14) {
		t.Errorf("linear: 1/Λ′ = %g", got)
	}
}

// Amplitudes given as a peak or as a step reproduce that peak / step.
func TestAmplitudeModes(t *testing.T) {
	c := Coupling{Mode: CouplingPerConstant, Alpha: ConstantCoupling{Lambda: 1e12}, Convention: ConventionR, ReportFamily: "gps-iif-cs"}
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat, ProfileKinkLinear} {
		a2, err := AmplitudeSpec{Mode: AmplitudePeak, PeakDnu: 3e-13}.Resolve(p, c, 1e7, 3e5)
		if err != nil {
			t.Fatal(err)
		}
		w := Wall{ID: 1, N: [3]float64{1, 0, 0}, Speed: 3e5, Thickness: 1e7, Profile: p, A2: a2, Coupling: c}
		pk, err := w.PeakDnu()
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(math.Abs(pk), 3e-13, 1e-13) {
			t.Errorf("%v: |peak| %g, want 3e-13", p, pk)
		}
		if p == ProfileKinkLinear {
			if _, err := (AmplitudeSpec{Mode: AmplitudeStep, Step: 1e-11}).Resolve(p, c, 1e7, 3e5); err == nil {
				t.Error("step amplitude accepted for the linear kink")
			}
			continue
		}
		a2, err = AmplitudeSpec{Mode: AmplitudeStep, Step: 1e-11}.Resolve(p, c, 1e7, 2.2e5)
		if err != nil {
			t.Fatal(err)
		}
		w.A2, w.Speed = a2, 2.2e5
		x, err := w.Cross("C", "gps-iif-cs", func(float64) [3]float64 { return [3]float64{} })
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(math.Abs(x.Step()), 1e-11, 1e-13) {
			t.Errorf("%v: |step| %g s, want 1e-11", p, x.Step())
		}
	}
	for name, s := range map[string]AmplitudeSpec{
		"unset":         {},
		"density no ρ":  {Mode: AmplitudeDensity, VBar: 3e5, MeanInterval: 1},
		"density no v̄": {Mode: AmplitudeDensity, RhoDM: 1, MeanInterval: 1},
		"density no T":  {Mode: AmplitudeDensity, RhoDM: 1, VBar: 1},
		"peak zero":     {Mode: AmplitudePeak},
		"step NaN":      {Mode: AmplitudeStep, Step: math.NaN()},
		"direct -1":     {Mode: AmplitudeDirect, A2: -1},
	} {
		if _, err := s.Resolve(ProfileGaussian, c, 1e7, 3e5); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	// An insensitive reporting clock cannot fix a peak.
	q := c
	q.ReportFamily = "quartz"
	if _, err := (AmplitudeSpec{Mode: AmplitudePeak, PeakDnu: 1e-13}).Resolve(ProfileGaussian, q, 1e7, 3e5); err == nil {
		t.Error("peak amplitude with an insensitive reporting clock accepted")
	}
}

// The truth records carry the DESIGN.md §5 columns.
func TestRecords(t *testing.T) {
	w := effWall([3]float64{0, 0, 1}, 3e5, 1e7, 12.5, 7.47e9, 1e13, ProfileGaussian)
	w.ID = 7
	ev, err := w.Event()
	if err != nil {
		t.Fatal(err)
	}
	if got := ev.Strings(); len(got) != len(EventColumns()) || got[0] != "7" || got[1] != "12.5" || got[4] != "1" || got[7] != "gaussian" || got[8] != "1e+13" {
		t.Errorf("event row %v for columns %v", got, EventColumns())
	}
	c, err := w.Cross("G05", "gps-iif-rb", func(float64) [3]float64 { return [3]float64{0, 0, 3e6} })
	if err != nil {
		t.Fatal(err)
	}
	r := c.Record()
	if r.Event != 7 || r.Clock != "G05" || !scalar.EqualWithinAbs(r.TCross, 22.5, 1e-9) || r.Step != c.Step() {
		t.Errorf("crossing record %+v", r)
	}
	if got := r.Strings(); len(got) != len(CrossingColumns()) || got[1] != "G05" {
		t.Errorf("crossing row %v", got)
	}
}

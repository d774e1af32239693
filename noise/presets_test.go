package noise

import (
	"math"
	"strings"
	"testing"
)

// TestPresetsMatchSources checks that each preset's expected Allan deviation
// (noise terms, sampled at the family's Tau0) lies within 20 % of every
// sourced level it is calibrated to. The targets carry their source (gnss.md
// §5; values marked "from memory" are so marked in the table).
func TestPresetsMatchSources(t *testing.T) {
	names := Families()
	if len(names) < 13 {
		t.Fatalf("Families() = %d names, want the 13 of issue 4", len(names))
	}
	for _, name := range names {
		f, err := LookupFamily(name)
		if err != nil {
			t.Fatal(err)
		}
		if name != strings.ToLower(name) || strings.ContainsAny(name, " _") {
			t.Errorf("family name %q is not lowercase-hyphenated", name)
		}
		m, err := Preset(name)
		if err != nil {
			t.Fatalf("Preset(%q): %v", name, err)
		}
		if err := m.Validate(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		noiseOnly := m
		noiseOnly.Drift = 0
		noiseOnly.Periodic = nil
		for _, p := range f.Targets {
			if p.Source == "" {
				t.Errorf("%s: target at %g s has no source", name, p.Tau)
			}
			got := noiseOnly.ADEV(p.Tau, f.Tau0)
			if r := got / p.ADEV; !(r > 0.8 && r < 1.2) {
				t.Errorf("%s: σ_y(%g s) = %.3g, source %.3g (ratio %.3f, want within 20 %%)", name, p.Tau, got, p.ADEV, r)
			}
			// the full model (with drift and periodic terms) stays within 20 % too
			if r := m.ADEV(p.Tau, f.Tau0) / p.ADEV; !(r > 0.8 && r < 1.2) {
				t.Errorf("%s: full model σ_y(%g s) ratio %.3f to source", name, p.Tau, r)
			}
		}
	}
	for _, want := range []string{"gps-iir-rb", "gps-iif-rb", "gps-iif-cs", "gps-iii-rb", "galileo-phm", "galileo-rafs",
		"beidou3-rb", "beidou3-phm", "glonass-cs", "hmaser", "cs", "rb", "quartz"} {
		if _, err := Preset(want); err != nil {
			t.Errorf("Preset(%q): %v", want, err)
		}
	}
	if _, err := Preset("gps-iv-unobtainium"); err == nil || !strings.Contains(err.Error(), "gps-iv-unobtainium") {
		t.Errorf("unknown family: err = %v, want an error naming it", err)
	}
}

// TestTermAVARDiscreteRatios checks the exact sampled expectations against
// the ratio table of stability.md §1.6 ("exact discrete / asymptotic",
// f_h = 1/(2τ0)), which the reference derived independently.
func TestTermAVARDiscreteRatios(t *testing.T) {
	fpmAsym := func(m float64) float64 { // [1.038 + 3 ln(2π f_h τ)] h/(4π²τ²), τ0 = 1; the table uses the rounded 1.038
		return (1.038 + 3*math.Log(math.Pi*m)) / (4 * math.Pi * math.Pi * m * m)
	}
	for _, c := range []struct {
		term  Term
		m     float64
		ratio float64 // stability.md §1.6 table
	}{
		{FlickerPM, 1, 1.19256}, {FlickerPM, 2, 1.11641}, {FlickerPM, 16, 1.05675}, {FlickerPM, 256, 1.03436}, {FlickerPM, 1024, 1.02870},
		{FlickerFM, 1, 1.44270}, {FlickerFM, 2, 1.15416}, {FlickerFM, 8, 1.01541}, {FlickerFM, 64, 1.00038},
		{RandomWalkFM, 1, 1.5}, {RandomWalkFM, 4, 1.03125}, {RandomWalkFM, 16, 1.00195},
		{WhiteFM, 1, 1}, {WhiteFM, 7, 1},
	} {
		got := TermAVAR(c.term, 1, c.m, 1)
		var asym float64
		if c.term == FlickerPM {
			asym = fpmAsym(c.m)
		} else {
			asym = TermAVAR(c.term, 1, c.m, 0)
		}
		if r := got / asym; math.Abs(r-c.ratio) > 6e-5*c.ratio {
			t.Errorf("%v m=%g: exact/asymptote = %.6f, want %.5f", c.term, c.m, r, c.ratio)
		}
	}
	// WPM: 3Q_d/τ² with Q_d = h_2/(8π²τ0), i.e. the asymptote 3 f_h h/(4π²τ²) exactly.
	if got, want := TermAVAR(WhitePM, 2e-22, 20, 2), 3*0.25*2e-22/(4*math.Pi*math.Pi*400); math.Abs(got/want-1) > 1e-12 {
		t.Errorf("WPM AVAR = %g, want %g", got, want)
	}
}

func TestCalibrateRecoversKnownModel(t *testing.T) {
	// Targets generated from a known h set must give that set back.
	want := [5]float64{3e-24, 0, 2e-23, 1e-28, 5e-33}
	m := ClockModel{H: want}
	var targets []ADEVPoint
	for _, tau := range []float64{1, 3, 10, 30, 100, 300, 1000, 3000, 1e4, 1e5} {
		targets = append(targets, ADEVPoint{Tau: tau, ADEV: m.ADEV(tau, 1), Source: "synthetic"})
	}
	got, err := Calibrate(targets, 1)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-3*want[i]+1e-40 {
			t.Errorf("h_%+d = %g, want %g", Term(i).Alpha(), got[i], want[i])
		}
	}
	for _, bad := range [][]ADEVPoint{nil, {{Tau: -1, ADEV: 1e-12}}, {{Tau: 1, ADEV: 0}}, {{Tau: 0.5, ADEV: 1e-12}}} {
		if _, err := Calibrate(bad, 1); err == nil {
			t.Errorf("Calibrate(%v) accepted bad targets", bad)
		}
	}
	if _, err := Calibrate(targets, 0, WhitePM); err == nil {
		t.Error("Calibrate with WPM and tau0 = 0 should fail")
	}
}

// TestTermMVARDiscreteRatios checks the sampled MVAR expectations against
// the "exact discrete / asymptotic" table of stability.md §1.6 (FFM
// asymptote (27 ln3 − 32 ln2)/8, FPM 3 ln(256/27)/(8π²τ²)).
func TestTermMVARDiscreteRatios(t *testing.T) {
	for _, c := range []struct {
		term  Term
		m     float64
		ratio float64
	}{
		{FlickerPM, 1, 1.58071}, {FlickerPM, 2, 1.20435}, {FlickerPM, 16, 1.00617}, {FlickerPM, 256, 1.00004},
		{WhiteFM, 1, 2}, {WhiteFM, 4, 1.0625},
		{FlickerFM, 1, 2.13852}, {FlickerFM, 8, 1.01196}, {FlickerFM, 64, 1.00018},
		{RandomWalkFM, 1, 1.81818}, {RandomWalkFM, 2, 1.13636}, {RandomWalkFM, 16, 1.00178},
	} {
		got := TermMVAR(c.term, 1, c.m, 1)
		var asym float64
		if c.term == FlickerPM {
			asym = 3 * math.Log(256.0/27) / (8 * math.Pi * math.Pi * c.m * c.m)
		} else {
			asym = TermMVAR(c.term, 1, c.m, 0)
		}
		if r := got / asym; math.Abs(r-c.ratio) > 6e-5*c.ratio {
			t.Errorf("%v m=%g: exact/asymptote = %.6f, want %.5f", c.term, c.m, r, c.ratio)
		}
	}
	// m = 1: MVAR equals AVAR for every term (the estimators coincide)
	for term := WhitePM; term <= RandomWalkFM; term++ {
		if a, m := TermAVAR(term, 1e-22, 2, 2), TermMVAR(term, 1e-22, 2, 2); math.Abs(m/a-1) > 1e-6 {
			t.Errorf("%v: MVAR(τ0)/AVAR(τ0) = %.8f, want 1", term, m/a)
		}
	}
}

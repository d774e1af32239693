package sim

import (
	"math"
	"testing"

	"wallcross/scenarios"
)

// TestCheckLinkDelay: in check-link-delay the clocks do not respond, so
// the true clock solutions are zero; the wall's delay on the links
// (permittivity-only, n − 1 = −½·δα/α, physics.md §6) reaches the
// estimated clocks at the level of the link delays themselves.
func TestCheckLinkDelay(t *testing.T) {
	s, err := scenarios.Resolve("check-link-delay")
	if err != nil {
		t.Fatal(err)
	}
	d, err := Run(Config{Scenario: s}, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i, b := range d.Bias {
		if b != 0 {
			t.Fatalf("clock solution %d = %g s: the clock response is off", i, b)
		}
	}
	for _, c := range d.Crossings {
		if c.Step != 0 {
			t.Fatalf("%s has step %g s with the clock response off", c.Clock, c.Step)
		}
	}
	ll := d.LinkLevel
	if ll == nil || len(ll.Links) == 0 || ll.Estimated == nil {
		t.Fatalf("no link level: %+v", ll)
	}
	// peak n − 1 = −½ · peak δα/α; with Λ_eff read as Λ_α, peak δα/α is the
	// event's peak δν/ν of a unit-sensitivity clock.
	if want := -0.5 * d.Events[0].PeakDnu; math.Abs(ll.PeakIndex[0]/want-1) > 1e-12 {
		t.Errorf("peak index %g, want %g", ll.PeakIndex[0], want)
	}
	maxDelay := 0.0
	for _, l := range ll.Links {
		maxDelay = math.Max(maxDelay, math.Abs(l.Delay))
		if math.Abs(l.CosIncidence) > 1 || l.ElevationDeg < 10-1e-9 {
			t.Fatalf("link %+v", l)
		}
	}
	// Thin-wall estimate (physics.md §6): |n−1|·√π·d/(c·|cos|) ≥ 2.2e-14 s
	// at normal incidence; the largest delay lies between that and a few
	// times more (oblique links).
	normal := math.Abs(ll.PeakIndex[0]) * math.Sqrt(math.Pi) * d.Events[0].Thickness / 299792458
	if maxDelay < normal*(1-1e-6) || maxDelay > 20*normal {
		t.Errorf("largest link delay %g s; normal-incidence delay %g s", maxDelay, normal)
	}
	maxEst := 0.0
	for _, e := range ll.Estimated {
		if !math.IsNaN(e) {
			maxEst = math.Max(maxEst, math.Abs(e))
		}
	}
	t.Logf("largest link delay %.3g s (normal incidence %.3g s); largest estimated clock %.3g s", maxDelay, normal, maxEst)
	if maxEst < 0.1*maxDelay || maxEst > 2*maxDelay {
		t.Errorf("estimated clocks reach %g s for link delays up to %g s", maxEst, maxDelay)
	}
	// Without the delay, clocks with their noise on and noise-free
	// observations: the estimate is the truth (≤ 1 ps).
	s.Links.Delay = false
	s.Noise.Off = false
	d2, err := Run(Config{Scenario: s}, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i, e := range d2.LinkLevel.Estimated {
		if math.IsNaN(e) {
			continue
		}
		worst = math.Max(worst, math.Abs(e-d2.Bias[i]))
	}
	t.Logf("noisy clocks, noise-free observations: estimate − truth ≤ %.2g s", worst)
	if worst > 1e-12 {
		t.Errorf("wall-free noise-free estimate differs from the truth by %g s, want ≤ 1 ps", worst)
	}
}

package search

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSweepVetoReferenceJump: a phase jump of the reference clock puts the
// same step in every series at one instant. Without the veto the bank
// reports it as a loud candidate; with it the candidate is dropped (its
// clock-by-clock amplitude is near zero, its sweep χ² large), and a loud
// wall in the same network is kept with both part amplitudes near its
// step (detection.md §3: step-in-all-sensors vs sweep discrimination).
func TestSweepVetoReferenceJump(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	o := defaultSynth()
	o.epochs = 480
	sn, phase := newSynth(rng, o)
	// The wall in the first half, the jump in the second.
	const step = 3e-10
	w := testWall(120*o.step, randomUnit(rng), 300e3, 1e5, step)
	sn.injectWall(t, o, w, phase)
	kj := 360
	for k := kj; k < o.epochs; k++ {
		phase[sn.ref][k] += 3e-10
	}
	sn.finish(rng, o, phase)
	cfg := Config{Directions: 600, Speeds: []float64{250e3, 300e3, 360e3}, Thicknesses: []float64{0}, Threshold: 8}
	near := func(cs []Candidate, t0 float64) *Candidate {
		for i := range cs {
			if math.Abs(cs[i].T0-t0) < 300 {
				return &cs[i]
			}
		}
		return nil
	}
	off := cfg
	off.SweepVeto = -1
	res0, err := Search(sn.net, off)
	if err != nil {
		t.Fatal(err)
	}
	jump := near(res0.Candidates, float64(kj)*o.step)
	if jump == nil {
		t.Fatalf("without the veto the reference jump gives no candidate: %+v", res0.Candidates)
	}
	t.Logf("jump without veto: stat %.1f, own %.3g s, ref %.3g s, sweep χ² %.3g", jump.Stat, jump.OwnAmp, jump.RefAmp, jump.SweepChi2)
	res, err := Search(sn.net, cfg)
	if err != nil {
		t.Fatal(err)
	}
	if c := near(res.Candidates, float64(kj)*o.step); c != nil {
		t.Errorf("the reference jump survives the veto: %+v", *c)
	}
	if near(res.Vetoed, float64(kj)*o.step) == nil {
		t.Errorf("the reference jump is not among the vetoed candidates: %+v", res.Vetoed)
	}
	wall := near(res.Candidates, w.T0)
	if wall == nil {
		t.Fatalf("the wall was lost: candidates %+v, vetoed %+v", res.Candidates, res.Vetoed)
	}
	t.Logf("wall: stat %.1f, own %.3g s, ref %.3g s, sweep χ² %.3g (step %.3g s)", wall.Stat, wall.OwnAmp, wall.RefAmp, wall.SweepChi2, step)
	for _, a := range []float64{wall.OwnAmp, wall.RefAmp} {
		if r := math.Abs(a) / step; r < 0.7 || r > 1.3 {
			t.Errorf("wall part amplitude %.3g s against step %.3g s", a, step)
		}
	}
}

// TestSweepChi2Null: for walls that the bank matches, the sweep χ² is
// χ² with one degree of freedom plus the bank's mismatch; at moderate SNR
// it should rarely pass the default veto (25).
func TestSweepChi2Null(t *testing.T) {
	o := defaultSynth()
	n := 12
	if raceEnabled {
		n = 4
	}
	var chi []float64
	for trial := range n {
		rng := rand.New(rand.NewPCG(61, uint64(trial)))
		sn, phase := newSynth(rng, o)
		w := testWall(float64(o.epochs/2)*o.step, randomUnit(rng), 300e3, 1e5, 1e-10)
		sn.injectWall(t, o, w, phase)
		sn.finish(rng, o, phase)
		res, err := Search(sn.net, Config{Directions: 600, Speeds: []float64{250e3, 300e3, 360e3}, Thicknesses: []float64{0}, Threshold: 6})
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range append(res.Candidates, res.Vetoed...) {
			if math.Abs(c.T0-w.T0) < 300 && !math.IsNaN(c.SweepChi2) {
				chi = append(chi, c.SweepChi2)
				t.Logf("trial %d: stat %.1f, sweep χ² %.2f, own/ref %.2f", trial, c.Stat, c.SweepChi2, c.OwnAmp/c.RefAmp)
			}
		}
		for _, c := range res.Vetoed {
			if math.Abs(c.T0-w.T0) < 300 {
				t.Errorf("trial %d: wall vetoed (stat %.1f, χ² %.3g, own %.3g, ref %.3g)", trial, c.Stat, c.SweepChi2, c.OwnAmp, c.RefAmp)
			}
		}
	}
	if len(chi) < n/2 {
		t.Fatalf("only %d of %d walls gave a sweep χ²", len(chi), n)
	}
	// χ²₁ has median 0.45; allow the bank's mismatch on top.
	if m := medianInPlace(chi); m > 3 {
		t.Errorf("median sweep χ² of matched walls %.2f", m)
	}
}

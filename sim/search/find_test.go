package search

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSearchFindsWall injects one thin wall (rendered by package inject) at
// a network SNR of 12 into seeded white-frequency noise and checks that the
// pipeline finds it at the right time, with a median direction error ≤ 15°
// over the trials.
func TestSearchFindsWall(t *testing.T) {
	trials, dirs := 6, 0 // 0: the default bank (≈ 1,750 directions here)
	if raceEnabled {
		trials, dirs = 2, 400
	}
	var dirErr []float64
	for trial := range trials {
		rng := rand.New(rand.NewPCG(100, uint64(trial)))
		o := defaultSynth()
		sn, phase := newSynth(rng, o)
		n := randomUnit(rng)
		v := 200e3 + 200e3*rng.Float64()
		t0 := 4000 + 2000*rng.Float64()
		// Scale a unit wall to network SNR 12.
		w := testWall(t0, n, v, 1e5, 1e-11)
		unit := append([][]float64(nil), phase...)
		for j := range unit {
			unit[j] = make([]float64, o.epochs)
		}
		cs := sn.injectWall(t, o, w, unit)
		snr1 := sn.optimalSNR(o, cs)
		step := 1e-11 * 12 / snr1
		w = testWall(t0, n, v, 1e5, step)
		cs = sn.injectWall(t, o, w, phase)
		sn.finish(rng, o, phase)
		res, err := Search(sn.net, Config{Directions: dirs, Thicknesses: []float64{0}, T0Window: [2]float64{t0 - 600, t0 + 600}})
		if err != nil {
			t.Fatal(err)
		}
		if len(res.Candidates) == 0 {
			t.Fatalf("trial %d: no candidate (optimal SNR %.1f, largest stat %.2f)", trial, sn.optimalSNR(o, cs), slices.Max(res.Stat))
		}
		best := res.Candidates[0]
		for _, c := range res.Candidates {
			if c.Stat > best.Stat {
				best = c
			}
		}
		de := angle(best.N, n)
		dirErr = append(dirErr, de)
		t.Logf("trial %d: optimal SNR %.1f, found stat %.2f at t0 %.0f s (true %.1f), direction error %.1f°, speed %.0f km/s (true %.0f), step %.3g s (true %.3g), %d directions",
			trial, sn.optimalSNR(o, cs), best.Stat, best.T0, t0, de, best.Speed/1e3, v/1e3, best.Amplitude, step, len(res.Directions))
		// Timing: the sweep is resolved to about one sample interval.
		if math.Abs(best.T0-t0) > 2*o.step {
			t.Errorf("trial %d: t0 %g s, true %g s", trial, best.T0, t0)
		}
		if best.Stat < 7 {
			t.Errorf("trial %d: stat %.2f for a wall of optimal SNR 12", trial, best.Stat)
		}
		if r := best.Amplitude / step; r < 0.5 || r > 1.5 {
			t.Errorf("trial %d: fitted step %g s, injected %g s", trial, best.Amplitude, step)
		}
	}
	slices.Sort(dirErr)
	med := dirErr[len(dirErr)/2]
	if len(dirErr)%2 == 0 {
		med = 0.5 * (dirErr[len(dirErr)/2-1] + dirErr[len(dirErr)/2])
	}
	t.Logf("median direction error %.1f° over %d trials (%v)", med, trials, dirErr)
	if med > 15 {
		t.Fatalf("median direction error %.1f° > 15°", med)
	}
}

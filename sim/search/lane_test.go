package search

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestLaneFormMatchesPerElement checks the lane form of the crossing table
// against the per-element one it replaces: every lane-form clock gives the
// same crossing interval at every grid point, and the statistic's
// numerators and denominators agree with the per-element path (forced by
// worker.perElement) for thin walls, with gaps, the reference clock's own
// crossing, 1, 2 and 3 t0 points per interval and a t0 window.
func TestLaneFormMatchesPerElement(t *testing.T) {
	for _, tc := range []struct {
		sub    int
		window [2]float64
	}{{1, [2]float64{}}, {2, [2]float64{}}, {3, [2]float64{}}, {2, [2]float64{1234, 9876}}} {
		sub := tc.sub
		t.Run(fmt.Sprintf("sub%d-window%g", sub, tc.window[0]), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(31, uint64(sub)))
			o := synthOpts{planes: 4, perPlane: 3, stations: 10, epochs: 400, step: 30,
				sigmaSat: 1e-12, sigmaSta: 7e-13, sigmaRef: 5e-13, gapFrac: 0.02}
			sn, phase := newSynth(rng, o)
			sn.finish(rng, o, phase)
			cfg := Config{Directions: 40, Speeds: []float64{150e3, 300e3, 700e3}, Thicknesses: []float64{0},
				Couplings: []string{CouplingEff, "alpha"}, T0Substeps: sub, T0Window: tc.window}
			s, err := newSearcher(sn.net, cfg)
			if err != nil {
				t.Fatal(err)
			}
			// Crossing intervals.
			w := s.newWorker()
			w.keepX = true // fill ci for every clock
			nLane, nAll := 0, 0
			for d := range s.dirs {
				s.project(w, d)
				w.resetCrossings()
				for m0 := 0; m0 < s.nT0; m0 += blockLen {
					nb := min(blockLen, s.nT0-m0)
					for vi, v := range cfg.Speeds {
						s.blockCrossings(w, m0, nb, vi, 1/v, false)
						for c := range s.nScan() {
							nAll++
							if !w.uni[c] {
								continue
							}
							nLane++
							for j := range nb { // by position (lane-major)
								want := int(w.ci[c*blockLen+j])
								got := w.base[j] + int(w.dl[c*maxSub+int(w.jlane[j])])
								if got != want || w.jmm[j]%sub != int(w.jlane[j]) {
									t.Fatalf("dir %d block %d speed %g clock %d point %d: lane form gives interval %d, per element %d", d, m0, v, c, w.jmm[j], got, want)
								}
							}
						}
					}
				}
			}
			t.Logf("%d of %d clock-blocks in lane form", nLane, nAll)
			if nLane < nAll/2 {
				t.Errorf("only %d of %d clock-blocks in lane form", nLane, nAll)
			}
			// Statistic.
			type key struct{ m, id int }
			collect := func(perElement bool) map[key][2]float64 {
				out := map[key][2]float64{}
				w := s.newWorker()
				w.perElement = perElement
				w.visit = func(m, id int, num, den float64) { out[key{m, id}] = [2]float64{num, den} }
				for d := range s.dirs {
					s.scanDirection(w, d)
				}
				return out
			}
			lane, elem := collect(false), collect(true)
			if len(lane) != len(elem) || len(lane) == 0 {
				t.Fatalf("%d lane-path values, %d per-element values", len(lane), len(elem))
			}
			worst := 0.0
			for k, e := range elem {
				l := lane[k]
				for i := range 2 {
					scale := math.Max(math.Abs(e[i]), math.Abs(l[i]))
					if scale == 0 {
						continue
					}
					worst = math.Max(worst, math.Abs(l[i]-e[i])/scale)
				}
			}
			t.Logf("largest relative difference lane vs per element: %.2g", worst)
			if worst > 1e-9 {
				t.Errorf("lane and per-element paths differ by %.2g relative", worst)
			}
		})
	}
}

package search

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"wallcross/inject"
)

// TestCrossingAgainstInject compares the bank's two-step fixed point on
// tabulated projections with the bracketing solver of package inject
// (inject.Wall.Cross) on the exact trajectories.
func TestCrossingAgainstInject(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	o := defaultSynth()
	pos := o.posFunc()
	nclk := o.planes*o.perPlane + o.stations
	tab := make([][]float64, nclk)
	worst := 0.0
	for trial := range 40 {
		n := randomUnit(rng)
		v := []float64{150e3, 300e3, 700e3}[trial%3]
		t0 := 1000 + 8000*rng.Float64()
		epochs := 400
		for j := range nclk {
			tab[j] = make([]float64, epochs)
			for k := range epochs {
				r := pos(j, float64(k)*o.step)
				tab[j][k] = n[0]*r[0] + n[1]*r[1] + n[2]*r[2]
			}
		}
		w := testWall(t0, n, v, 1e5, 1e-10)
		for j := range nclk {
			c, err := w.Cross("x", "rb", func(tt float64) [3]float64 { return pos(j, tt) })
			if err != nil {
				t.Fatal(err)
			}
			k0 := int(t0/o.step + 0.5)
			got := crossing(tab[j], k0, t0, 1/v, 1/o.step, float64(epochs-1)-1e-9) * o.step
			worst = math.Max(worst, math.Abs(got-c.TCross))
		}
	}
	// Budget: 0.01 s, far below the 30-s sample interval (one Newton step
	// on the interpolated projection; the interpolation's chord error is
	// ≈ a(ωτ0)²/8 ≈ 64 m, 0.4 ms at 150 km/s).
	if worst > 0.01 {
		t.Fatalf("largest crossing-time difference from inject.Wall.Cross: %.3g s", worst)
	}
	t.Logf("largest crossing-time difference from inject.Wall.Cross: %.3g s", worst)
}

// TestBlockCrossingsAgainstInject checks the bank's quadratic interpolation
// of crossing times over a t0 block against inject.Wall.Cross at the
// slowest speed and one t0 per interval (the longest blocks).
func TestBlockCrossingsAgainstInject(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	o := defaultSynth()
	o.epochs = 300
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	s, err := newSearcher(sn.net, Config{Directions: 8, Speeds: []float64{150e3}, Thicknesses: []float64{0}, T0Substeps: 1})
	if err != nil {
		t.Fatal(err)
	}
	w := s.newWorker()
	w.keepX = true
	scan := append(slices.Clone(s.prep.noise.Data), sn.ref)
	worst := 0.0
	for d := range s.dirs {
		n := s.dirs[d]
		s.project(w, d)
		w.resetCrossings()
		for m0 := 0; m0 < s.nT0; m0 += blockLen {
			nb := min(blockLen, s.nT0-m0)
			s.blockCrossings(w, m0, nb, 0, 1/150e3, true)
			for _, mm := range []int{1, nb / 4, nb / 2, nb - 2} {
				if mm < 0 || mm >= nb {
					continue
				}
				wall := testWall(s.t0(m0+mm), n, 150e3, 1e5, 1e-10)
				for c, j := range scan {
					cr, err := wall.Cross("x", "rb", func(tt float64) [3]float64 { return sn.net.Pos(j, tt) })
					if err != nil {
						t.Fatal(err)
					}
					if cr.TCross < 0 || cr.TCross > float64(o.epochs-1)*o.step {
						continue // outside the data: the table is extrapolated linearly there
					}
					worst = math.Max(worst, math.Abs(w.x[c*blockLen+mm]*o.step-cr.TCross))
				}
			}
		}
	}
	t.Logf("largest block-interpolated crossing-time error: %.3g s", worst)
	if worst > 0.05 {
		t.Fatalf("block-interpolated crossing times differ from inject.Wall.Cross by up to %.3g s", worst)
	}
}

// TestStatisticAgainstDense checks the scan's numerator uᵀC⁻¹y and
// denominator uᵀC⁻¹u (shift-and-add with the Sherman–Morrison buffer)
// against a direct computation: templates from inject's exact crossing
// times, per-interval dense covariance inverted by gonum, gaps and the
// reference clock's own crossing included.
func TestStatisticAgainstDense(t *testing.T) {
	// With gaps (W and γ change from interval to interval) and without
	// (the thin scan's constant-W path), at two and one t0 per interval.
	// And with a t0 window that does not start at the first epoch.
	for _, tc := range []struct {
		name   string
		gaps   float64
		sub    int
		window [2]float64
	}{{"gaps-sub2", 0.05, 2, [2]float64{}}, {"nogaps-sub1", 0, 1, [2]float64{}}, {"nogaps-sub2", 0, 2, [2]float64{}},
		{"nogaps-sub1-window", 0, 1, [2]float64{500, 2000}}} {
		t.Run(tc.name, func(t *testing.T) { statisticAgainstDense(t, tc.gaps, tc.sub, tc.window) })
	}
}

func statisticAgainstDense(t *testing.T, gaps float64, sub int, window [2]float64) {
	rng := rand.New(rand.NewPCG(21, 22))
	o := synthOpts{planes: 2, perPlane: 3, stations: 4, epochs: 80, step: 30,
		sigmaSat: 1e-12, sigmaSta: 7e-13, sigmaRef: 5e-13, gapFrac: gaps}
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	cfg := Config{Directions: 5, Speeds: []float64{200e3, 450e3}, Thicknesses: []float64{0, 1.5e7},
		Couplings: []string{CouplingEff, "alpha"}, T0Substeps: sub, Clip: -1, T0Window: window}
	s, err := newSearcher(sn.net, cfg)
	if err != nil {
		t.Fatal(err)
	}
	type key struct{ m, id int }
	got := map[key][2]float64{}
	w := s.newWorker()
	w.visit = func(m, id int, num, den float64) { got[key{m, id}] = [2]float64{num, den} }
	for d := range s.dirs {
		s.scanDirection(w, d)
	}
	// The data as the search sees it: centred pseudo-frequencies.
	nm := s.prep.noise
	ys := make([][]float64, len(nm.Data))
	for i, j := range nm.Data {
		ys[i] = PseudoFrequency(sn.net.Bias[j], o.step)
		_, med := RobustScale(ys[i], nil)
		for k := range ys[i] {
			ys[i][k] -= med
		}
	}
	checked := 0
	for id := range len(s.dirs) * len(cfg.Speeds) * len(cfg.Thicknesses) * len(cfg.Couplings) {
		d, vi, th, cl := s.unpackID(id)
		tau := cfg.Thicknesses[th] / cfg.Speeds[vi]
		lo := s.kern[vi][th].lo
		for m := 0; m < s.nT0; m += 7 {
			t0 := s.t0(m)
			wall := testWall(t0, s.dirs[d], cfg.Speeds[vi], 1e3, 1e-10)
			// Spike interval per clock (scan order: data clocks, then the reference).
			scan := append(slices.Clone(nm.Data), sn.ref)
			idx := make([]int, len(scan))
			phase := make([]float64, len(scan))
			skip := false
			for c, j := range scan {
				cr, err := wall.Cross("x", "rb", func(tt float64) [3]float64 { return sn.net.Pos(j, tt) })
				if err != nil {
					t.Fatal(err)
				}
				x := cr.TCross / o.step
				if math.Abs(x-math.Round(x)) < 0.01 {
					skip = true // too close to an interval boundary to compare
				}
				if xb := x * phaseBins; tau > 0 && math.Abs(xb-math.Round(xb)) < 0.05 {
					skip = true // too close to a phase-bin boundary
				}
				idx[c] = int(math.Floor(x))
				// The bank quantises the crossing phase to bin centres.
				phase[c] = (math.Floor((x-math.Floor(x))*phaseBins) + 0.5) / phaseBins
			}
			if skip {
				continue
			}
			K := func(c int) float64 { return sn.net.sensitivity(scan[c], cfg.Couplings[cl]) }
			// tmpl is the unit-step frequency template of scan clock c in interval k.
			tmpl := func(c, k int) float64 {
				if tau == 0 {
					if idx[c] == k {
						return K(c) / o.step
					}
					return 0
				}
				o2 := k - idx[c]
				if o2 < lo || o2 > -lo {
					return 0
				}
				ua := (float64(o2) - phase[c]) * o.step / tau
				ub := (float64(o2) + 1 - phase[c]) * o.step / tau
				return K(c) * inject.ProfileGaussian.Between(ua, ub) / math.Sqrt(math.Pi) / o.step
			}
			var num, den float64
			for k := range s.nInt {
				var u, y, sig2 []float64
				gr := tmpl(len(scan)-1, k)
				for i := range nm.Data {
					if math.IsNaN(ys[i][k]) {
						continue
					}
					u = append(u, tmpl(i, k)-gr)
					y = append(y, ys[i][k])
					sig2 = append(sig2, nm.Sigma[i]*nm.Sigma[i])
				}
				if len(u) == 0 {
					continue
				}
				cu := make([]float64, len(u))
				denseInverseApply(cu, u, sig2, nm.SigmaRef*nm.SigmaRef)
				for i := range u {
					num += cu[i] * y[i]
					den += cu[i] * u[i]
				}
			}
			g := got[key{m, id}]
			if math.Abs(g[0]-num) > 1e-6*math.Sqrt(den)*1e0+1e-9*math.Abs(num) || math.Abs(g[1]-den) > 1e-8*den {
				t.Fatalf("template %d at t0 = %g s: scan num, den = %g, %g; dense %g, %g", id, t0, g[0], g[1], num, den)
			}
			checked++
		}
	}
	if checked < 100 {
		t.Fatalf("only %d template evaluations compared", checked)
	}
	t.Logf("%d template evaluations agree with the dense computation", checked)
}

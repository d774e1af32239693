package search

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
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

// TestStatisticAgainstDense checks the scan's numerator uᵀC⁻¹y and
// denominator uᵀC⁻¹u (shift-and-add with the Sherman–Morrison buffer)
// against a direct computation: templates from inject's exact crossing
// times, per-interval dense covariance inverted by gonum, gaps and the
// reference clock's own crossing included.
func TestStatisticAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	o := synthOpts{planes: 2, perPlane: 3, stations: 4, epochs: 80, step: 30,
		sigmaSat: 1e-12, sigmaSta: 7e-13, sigmaRef: 5e-13, gapFrac: 0.05}
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	cfg := Config{Directions: 5, Speeds: []float64{200e3, 450e3}, Thicknesses: []float64{0},
		Couplings: []string{CouplingEff, "alpha"}, T0Substeps: 2, Clip: -1}
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
	for id := range len(s.dirs) * len(cfg.Speeds) * len(cfg.Couplings) {
		d, vi, _, cl := s.unpackID(id)
		for m := 0; m < s.nT0; m += 7 {
			t0 := s.t0(m)
			wall := testWall(t0, s.dirs[d], cfg.Speeds[vi], 1e3, 1e-10)
			// Spike interval per clock (scan order: data clocks, then the reference).
			scan := append(slices.Clone(nm.Data), sn.ref)
			idx := make([]int, len(scan))
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
				idx[c] = int(math.Floor(x))
			}
			if skip {
				continue
			}
			K := func(c int) float64 { return sn.net.sensitivity(scan[c], cfg.Couplings[cl]) }
			var num, den float64
			for k := range s.nInt {
				var u, y, sig2 []float64
				gr := 0.0
				if idx[len(scan)-1] == k {
					gr = K(len(scan)-1) / o.step
				}
				for i := range nm.Data {
					if math.IsNaN(ys[i][k]) {
						continue
					}
					g := 0.0
					if idx[i] == k {
						g = K(i) / o.step
					}
					u = append(u, g-gr)
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

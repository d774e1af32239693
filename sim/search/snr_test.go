package search

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSignalSNR checks NoiseModel.SignalSNR on a network with gaps and one
// thick Gaussian wall: against a dense per-interval covariance inverted by
// gonum with the same fitted noise model (to 1e-9), against the true noise
// model of the simulation (the fitted scales are estimates: within 10 %),
// and against the statistic the bank reaches on the noisy data (mean
// over realisations within ρ_opt − 15 % … ρ_opt + 3: the bank's grid and
// clipping lose a little, noise adds N(0, 1)).
func TestSignalSNR(t *testing.T) {
	o := defaultSynth()
	o.gapFrac = 0.01
	var diff, opt []float64
	trials := 4
	if raceEnabled {
		trials = 2
	}
	for trial := range trials {
		rng := rand.New(rand.NewPCG(41, uint64(trial)))
		sn, phase := newSynth(rng, o)
		n := randomUnit(rng)
		w := testWall(float64(o.epochs/2)*o.step, n, 300e3, 3e7, 8e-10)
		// The signal alone, rendered by inject into zero phases.
		sig := make([][]float64, len(phase))
		for j := range sig {
			sig[j] = make([]float64, o.epochs)
		}
		cs := sn.injectWall(t, o, w, sig)
		for j := range phase {
			for k := range phase[j] {
				phase[j][k] += sig[j][k]
			}
		}
		sn.finish(rng, o, phase)
		signal := make([][]float64, len(sig))
		for j := range sig {
			signal[j] = make([]float64, o.epochs)
			for k := range signal[j] {
				signal[j][k] = sig[j][k] - sig[sn.ref][k]
			}
		}
		cfg := Config{Directions: 400, Speeds: []float64{300e3}, Thicknesses: []float64{0, 3e7}}
		nm, err := FitNoise(sn.net, cfg)
		if err != nil {
			t.Fatal(err)
		}
		got, err := nm.SignalSNR(sn.net, signal)
		if err != nil {
			t.Fatal(err)
		}
		// Dense reference with the fitted model.
		sig2 := make([]float64, len(nm.Data))
		for i := range sig2 {
			sig2[i] = nm.Sigma[i] * nm.Sigma[i]
		}
		var q float64
		for k := range o.epochs - 1 {
			var idx []int
			var v []float64
			for i, j := range nm.Data {
				d := sn.net.Bias[j]
				if math.IsNaN(d[k]) || math.IsNaN(d[k+1]) {
					continue
				}
				idx = append(idx, i)
				v = append(v, (signal[j][k+1]-signal[j][k])/o.step)
			}
			if len(v) == 0 {
				continue
			}
			s2 := make([]float64, len(idx))
			for a, i := range idx {
				s2[a] = sig2[i]
			}
			out := make([]float64, len(v))
			denseInverseApply(out, v, s2, nm.SigmaRef*nm.SigmaRef)
			for a := range v {
				q += v[a] * out[a]
			}
		}
		if d := math.Abs(got - math.Sqrt(q)); d > 1e-9*got {
			t.Fatalf("trial %d: SignalSNR %.12g, dense %.12g", trial, got, math.Sqrt(q))
		}
		truth := sn.optimalSNR(o, cs)
		if r := got / truth; r < 0.9 || r > 1.1 {
			t.Errorf("trial %d: SignalSNR %.3g with the fitted model, %.3g with the true one", trial, got, truth)
		}
		res, err := Search(sn.net, cfg)
		if err != nil {
			t.Fatal(err)
		}
		best := 0.0
		for m, st := range res.Stat {
			if tt := res.T0First + float64(m)*res.T0Step; math.Abs(tt-w.T0) < 300 {
				best = math.Max(best, st)
			}
		}
		t.Logf("trial %d: ρ_opt %.2f (true model %.2f), bank %.2f", trial, got, truth, best)
		diff, opt = append(diff, best-got), append(opt, got)
	}
	var md, mo float64
	for i := range diff {
		md += diff[i] / float64(len(diff))
		mo += opt[i] / float64(len(opt))
	}
	if md > 3 || md < -0.15*mo {
		t.Errorf("bank statistic − ρ_opt averages %.2f at ρ_opt ≈ %.1f", md, mo)
	}
}

package search

import (
	"fmt"
	"math"
)

// FitNoise returns the noise model the search fits to net with cfg (the
// per-clock scales, the common reference term and the optional AR filter),
// without scanning the bank.
func FitNoise(net *Network, cfg Config) (NoiseModel, error) {
	s, err := newSearcher(net, cfg)
	if err != nil {
		return NoiseModel{}, err
	}
	return s.prep.noise, nil
}

// SignalSNR returns the optimal matched-filter SNR of a known signal in
// the network under the noise model nm (FitNoise, or Result.Noise):
//
//	ρ_opt = sqrt(Σ_k s_kᵀ C⁻¹ s_k),
//
// the largest expected statistic any template can reach, where s_k is the
// vector of the signal's pseudo-frequencies over the data clocks at
// interval k (after nm's AR filter) and C = diag(σ_j²) + σ_r²·11ᵀ over the
// clocks present in net at k (detection.md §1.2, §1.5 item 4). signal has
// the layout of net.Bias: one series per clock, in s, relative to the same
// reference as the data (for a simulated trial, the biases with the wall
// minus those without it). Intervals where the data or the signal are
// absent are left out. A template that matches the signal exactly gives a
// statistic distributed as N(ρ_opt, 1); the bank's grid loses a little.
func (nm NoiseModel) SignalSNR(net *Network, signal [][]float64) (float64, error) {
	if len(signal) != len(net.Clocks) {
		return 0, fmt.Errorf("search: signal has %d series for %d clocks", len(signal), len(net.Clocks))
	}
	if len(nm.Data) != len(nm.Sigma) {
		return 0, fmt.Errorf("search: noise model has %d clocks but %d scales", len(nm.Data), len(nm.Sigma))
	}
	nInt := net.Epochs() - 1
	es := make([][]float64, len(nm.Data))
	sig2 := make([]float64, len(nm.Data))
	for i, j := range nm.Data {
		if len(signal[j]) != net.Epochs() {
			return 0, fmt.Errorf("search: signal of clock %q has %d epochs, want %d", net.Clocks[j].ID, len(signal[j]), net.Epochs())
		}
		y := PseudoFrequency(signal[j], net.Step)
		d := PseudoFrequency(net.Bias[j], net.Step)
		for k := range y {
			if math.IsNaN(d[k]) {
				y[k] = math.NaN()
			}
		}
		if len(nm.AR) > 1 {
			y = filterAR(y, nm.AR)
		}
		es[i] = y
		sig2[i] = nm.Sigma[i] * nm.Sigma[i]
	}
	sr2 := nm.SigmaRef * nm.SigmaRef
	col := make([]float64, len(es))
	res := make([]float64, len(es))
	var q float64
	for k := range nInt {
		for i := range es {
			col[i] = es[i][k]
		}
		ApplyInverse(res, col, sig2, sr2)
		for i, v := range col {
			if !math.IsNaN(v) {
				q += v * res[i]
			}
		}
	}
	return math.Sqrt(q), nil
}

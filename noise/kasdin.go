package noise

import (
	"gonum.org/v1/gonum/dsp/fourier"
)

// KasdinImpulse returns the first n impulse-response coefficients of the
// Kasdin–Walter discrete power-law filter H(z) = (1 − z⁻¹)^(−a/2):
// h_0 = 1, h_k = h_{k−1}·(a/2 + k − 1)/k (Kasdin 1995, Proc. IEEE 83(5)
// eq. (116); stability.md §3.1). White noise of variance Q_d through this
// filter has the one-sided PSD 2Q_dτ0/|2 sin(πfτ0)|^a.
func KasdinImpulse(a float64, n int) []float64 {
	h := make([]float64, n)
	if n == 0 {
		return h
	}
	h[0] = 1
	for k := 1; k < n; k++ {
		h[k] = h[k-1] * (a/2 + float64(k-1)) / float64(k)
	}
	return h
}

// SmoothLen returns the smallest L ≥ n whose only prime factors are 2, 3
// and 5, the lengths for which gonum's FFTPACK transform is fast.
func SmoothLen(n int) int {
	if n <= 1 {
		return 1
	}
	best := 1
	for best < n {
		best *= 2
	}
	for p5 := 1; p5 < best; p5 *= 5 {
		for p35 := p5; p35 < best; p35 *= 3 {
			l := p35
			for l < n {
				l *= 2
			}
			if l < best {
				best = l
			}
		}
	}
	return best
}

// flickerConv holds the convolution input buffer for the a = 1 Kasdin filter.
type flickerConv struct {
	v []float64 // length L, first n entries are the filter input
	n int
}

// input returns a zeroed input buffer of padded length L ≥ 2n.
func (g *flickerConv) input(n int) []float64 {
	g.n = n
	g.v = make([]float64, SmoothLen(2*n))
	return g.v[:n]
}

// apply adds the linear convolution of the input with the a = 1 impulse
// response (first n outputs) to x.
func (g *flickerConv) apply(x []float64) {
	n, l := g.n, len(g.v)
	fft := fourier.NewFFT(l)
	// spectrum of the impulse response, zero-padded
	in := g.v
	vc := fft.Coefficients(nil, in)
	h := in // reuse the real buffer for h
	hk := 1.0
	for k := range h {
		if k < n {
			h[k] = hk
			hk *= (0.5 + float64(k)) / float64(k+1)
		} else {
			h[k] = 0
		}
	}
	hc := fft.Coefficients(nil, h)
	for i := range vc {
		vc[i] *= hc[i]
	}
	out := fft.Sequence(in, vc)
	inv := 1 / float64(l)
	for k := range x {
		x[k] += out[k] * inv
	}
	g.v = nil
}

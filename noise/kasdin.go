package noise

import (
	"fmt"
	"math"
	"math/rand/v2"

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

// flickerConv holds the convolution buffers for the a = 1 Kasdin filter.
// Its zh (impulse-response spectrum) and zv buffers may be kept between
// calls of the same length (see Generator).
type flickerConv struct {
	v  []float64    // filter input, length n
	n  int          // series length
	l  int          // padded length L ≥ 2n, a power of two
	zv []complex128 // L/2 packed input / product buffer
	zh []complex128 // L/2 packed spectrum of the impulse response (nil until computed)
}

// convLen returns the padded length L of the linear convolution of two
// length-n sequences: the smallest power of two ≥ 2n. Packed into L/2
// complex values, gonum's radix-2 transform is about twice as fast as its
// FFTPACK real transform of a 5-smooth length (measured here) and needs
// 16·L bytes for the two spectra, less than FFTPACK's spectra and work
// space even when L is up to twice the 5-smooth length.
func convLen(n int) int {
	p := 2
	for p < 2*n {
		p *= 2
	}
	return p
}

// input returns a zeroed input buffer of length n for the caller to fill.
func (g *flickerConv) input(n int) []float64 {
	if g.n != n || g.zv == nil {
		g.n, g.l = n, convLen(n)
		g.zv, g.zh = nil, nil
	}
	if cap(g.v) >= n {
		g.v = g.v[:n]
		clear(g.v)
	} else {
		g.v = make([]float64, n)
	}
	return g.v
}

// apply adds the linear convolution of the input with the a = 1 impulse
// response (first n outputs) to x.
func (g *flickerConv) apply(x []float64) { g.applyPacked(x) }

// applyPacked does the convolution of apply with real sequences packed two
// samples per complex value (z_k = v_2k + i v_2k+1) into half-length radix-2
// complex FFTs (the standard real-FFT packing, e.g. Press et al., Numerical
// Recipes §12.3, from memory). Peak memory: two M = L/2 complex buffers.
func (g *flickerConv) applyPacked(x []float64) {
	n, l := g.n, g.l
	m := l / 2
	if g.zv == nil {
		g.zv = make([]complex128, m)
	}
	zv := g.zv
	clear(zv)
	for k, v := range g.v {
		if k&1 == 0 {
			zv[k/2] = complex(v, 0)
		} else {
			zv[k/2] = complex(real(zv[k/2]), v)
		}
	}
	if g.zh == nil {
		zh := make([]complex128, m)
		hk := 1.0
		for k := range n {
			if k&1 == 0 {
				zh[k/2] = complex(hk, 0)
			} else {
				zh[k/2] = complex(real(zh[k/2]), hk)
			}
			hk *= (0.5 + float64(k)) / float64(k+1)
		}
		fourier.CoefficientsRadix2(zh)
		g.zh = zh
	}
	zh := g.zh
	fourier.CoefficientsRadix2(zv)
	// unpack: V_j = E_j + W^j O_j with E_j = (Z_j + Z*_{M−j})/2,
	// O_j = (Z_j − Z*_{M−j})/(2i), W = exp(−2πi/L); multiply by H_j; repack
	// Z'_j = E'_j + i O'_j with E'_j = (P_j + P*_{M−j})/2,
	// O'_j = (P_j − P*_{M−j})/(2W^j). Pairs (j, M−j) are done together.
	spec := func(z []complex128, j, jc int, w complex128) complex128 {
		a, b := z[j], cmplxConj(z[jc])
		return (a+b)*0.5 + w*(a-b)*complex(0, -0.5)
	}
	// j = 0 and j = M (both real)
	{
		e, o := real(zv[0]), imag(zv[0])
		he, ho := real(zh[0]), imag(zh[0])
		p0 := (e + o) * (he + ho)
		pm := (e - o) * (he - ho)
		zv[0] = complex((p0+pm)/2, (p0-pm)/2)
	}
	const anchor = 256
	var w complex128
	ws, wc := math.Sincos(-2 * math.Pi / float64(l))
	step := complex(wc, ws)
	for j := 1; j <= m/2; j++ {
		if (j-1)%anchor == 0 {
			s, c := math.Sincos(-2 * math.Pi * float64(j) / float64(l))
			w = complex(c, s)
		} else {
			w *= step
		}
		jc := m - j
		wc := -cmplxConj(w) // W^{M−j} = −conj(W^j)
		pj := spec(zv, j, jc, w) * spec(zh, j, jc, w)
		pc := pj
		if jc != j {
			pc = spec(zv, jc, j, wc) * spec(zh, jc, j, wc)
		}
		// 1/W^j = conj(W^j) since |W| = 1
		zv[j] = (pj+cmplxConj(pc))*0.5 + (pj-cmplxConj(pc))*cmplxConj(w)*complex(0, 0.5)
		if jc != j {
			zv[jc] = (pc+cmplxConj(pj))*0.5 + (pc-cmplxConj(pj))*cmplxConj(wc)*complex(0, 0.5)
		}
	}
	fourier.SequenceRadix2(zv)
	inv := 1 / float64(m)
	for k := range x {
		if k&1 == 0 {
			x[k] += real(zv[k/2]) * inv
		} else {
			x[k] += imag(zv[k/2]) * inv
		}
	}
}

func cmplxConj(c complex128) complex128 { return complex(real(c), -imag(c)) }

// Generator produces phase series of one fixed length n, keeping the FFT
// buffers and the filter spectrum between calls: for many clocks of the
// same length it saves one of the three FFTs and all large allocations but
// the result. It is not safe for concurrent use; give each worker its own.
// Its output is bit-for-bit that of ClockModel.Phase.
type Generator struct {
	n    int
	conv flickerConv
}

// NewGenerator returns a Generator for series of n samples. Memory held
// between calls: 8n (input) + 16L (two spectra) bytes, L = power of two ≥ 2n,
// once a model with a flicker term has been generated.
func NewGenerator(n int) *Generator {
	if n < 0 {
		panic(fmt.Sprintf("noise: NewGenerator: n = %d < 0", n))
	}
	return &Generator{n: n}
}

// Phase returns n samples of the phase of m (see ClockModel.Phase).
func (g *Generator) Phase(m ClockModel, rng *rand.Rand, tau0 float64) []float64 {
	return m.phase(rng, g.n, tau0, &g.conv)
}

package noise

import (
	"fmt"
	"math/rand/v2"
	"sync"

	"wallcross/internal/fft"
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

// flickerConv holds the buffers of the linear convolution with the a = 1
// Kasdin filter: the series of n samples is zero-padded to L ≥ 2n reals,
// packed two per complex value into an M = L/2-point transform (package
// internal/fft, whose spectra stay in bit-reversed order), multiplied by the
// kernel spectrum and transformed back; only the first half of the
// transform is non-zero on input and only the first half is needed on
// output, so both transforms are pruned. Its z buffer and kernel may be
// kept between calls (see Generator).
type flickerConv struct {
	n     int          // series length
	m     int          // packed transform length M = L/2
	plan  *fft.Plan    // M-point plan
	z     []complex128 // packed input / product buffer, M values (nil until needed)
	dirty bool         // z holds a previous result
	kern  *kernelSpec  // nil until first needed
}

// convLen returns the padded length L of the linear convolution of two
// length-n sequences: the smallest power of two ≥ 2n, at least 8.
func convLen(n int) int {
	p := 8
	for p < 2*n {
		p *= 2
	}
	return p
}

// input returns a zeroed input buffer of length n for the caller to fill:
// the first n reals of the packed transform buffer.
func (g *flickerConv) input(n int) []float64 {
	if g.n != n || g.plan == nil {
		m := convLen(n) / 2
		if m != g.m {
			g.m, g.z, g.kern, g.dirty = m, nil, nil, false
			g.plan = fft.NewPlan(m)
		}
		g.n = n
	}
	if g.z == nil {
		g.z = make([]complex128, g.m)
	}
	f := fft.Floats(g.z)
	if g.dirty {
		clear(f[:g.m]) // the second half is never read (ForwardHalfZero)
		g.dirty = false
	}
	return f[:n]
}

// apply adds the linear convolution of the input with the a = 1 impulse
// response (first n outputs) to x. The kernel is truncated after M samples:
// that leaves every output k < n ≤ M unchanged (they use h_j, j ≤ k only)
// and still no product wraps round the circular length L = 2M, so the
// kernel spectrum depends on M alone.
func (g *flickerConv) apply(x []float64) {
	if g.kern == nil {
		g.kern = kernelFor(g.m)
	}
	g.plan.ForwardHalfZero(g.z)
	g.plan.MultiplyPacked(g.z, g.kern.coef)
	g.plan.InverseFirstHalf(g.z)
	g.dirty = true
	f := fft.Floats(g.z)[:len(x)]
	for k, v := range f {
		x[k] += v
	}
}

// kernelSpec is the packed spectrum of the a = 1 Kasdin impulse response
// (first M samples) in the coefficient form of fft.Plan.MultiplyPacked,
// normalised by 1/M. It is read-only once built.
type kernelSpec struct {
	m    int
	coef []complex128
}

// kernelCacheMax bounds the process-wide kernel cache (16 bytes per packed
// value: 64 MiB holds M ≤ 2^22, series up to 2^22 samples).
const kernelCacheMax = 64 << 20

// kernelCache keeps the kernel of the last length used by ClockModel.Phase,
// so that repeated series of one length skip the kernel transform; longer
// kernels are rebuilt per call unless a Generator keeps them.
var kernelCache struct {
	sync.Mutex
	k *kernelSpec
}

// kernelFor returns the kernel spectrum for the packed length m.
func kernelFor(m int) *kernelSpec {
	kernelCache.Lock()
	k := kernelCache.k
	kernelCache.Unlock()
	if k != nil && k.m == m {
		return k
	}
	z := make([]complex128, m)
	h := fft.Floats(z)[:m]
	hk := 1.0
	for j := range h {
		h[j] = hk
		hk *= (0.5 + float64(j)) / float64(j+1)
	}
	p := fft.NewPlan(m)
	p.ForwardHalfZero(z)
	p.KernelCoefficients(z, 1/float64(m))
	k = &kernelSpec{m: m, coef: z}
	if 16*m <= kernelCacheMax {
		kernelCache.Lock()
		kernelCache.k = k
		kernelCache.Unlock()
	}
	return k
}

// Generator produces phase series of one fixed length n, keeping the FFT
// buffer and the filter spectrum between calls: for many clocks of the same
// length it saves the kernel transform (when ClockModel.Phase's own cache
// does not hold it) and all large allocations but the result. It is not
// safe for concurrent use; give each worker its own (they share the cached
// kernel, which is read-only). Its output is bit-for-bit that of
// ClockModel.Phase.
type Generator struct {
	n    int
	conv flickerConv
}

// NewGenerator returns a Generator for series of n samples. Memory held
// between calls, once a model with a flicker term has been generated:
// 8L bytes of transform buffer plus the 8L-byte kernel spectrum, L = the
// power of two ≥ 2n (32 bytes per sample when n is a power of two, 54 for
// n = 10⁷).
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

// Package fft is a power-of-two complex FFT made for the convolutions of
// package noise: the forward transform takes natural order and leaves the
// spectrum in bit-reversed order, the inverse takes bit-reversed order and
// returns natural order, so a convolution never permutes. Both are radix-4
// (one radix-2 stage when log2 n is odd). Stages larger than leafMax run
// level by level over the whole array, two levels per pass where possible,
// their twiddles built per chunk of 256 butterflies (one Sincos per chunk
// and one product per twiddle) and shared by all blocks of the level; then
// every leafMax block runs its remaining stages in cache with precomputed
// twiddle tables. Pruned variants skip the zero second half of the input
// (ForwardHalfZero) and the unwanted second half of the output
// (InverseFirstHalf), the shapes of a zero-padded linear convolution.
//
// On amd64 CPUs with AVX the butterflies and the twiddle products run two
// at a time in 256-bit registers (kernel_amd64.s). They do the same
// operations in the same order as the Go loops, with no fused multiply-add,
// so every CPU gives the same bits (TestVectorKernelsSameBits).
//
// Transforms are unnormalised: Forward computes X_k = Σ x_j e^(−2πijk/n) and
// Inverse x_j = Σ X_k e^(+2πijk/n), so Inverse(Forward(x)) = n·x.
package fft

import (
	"fmt"
	"math"
	"math/bits"
	"sync"
	"unsafe"
)

// leafMax is the largest stage size with a precomputed twiddle table
// (3/4·leafMax complex values over all those stages ≈ leafMax·16 bytes).
const leafMax = 1 << 12

// chunk is the number of butterflies sharing one directly computed twiddle
// in the large stages.
const chunk = 256

// Plan holds the twiddle tables for transforms of one length. It is
// immutable after NewPlan and safe for concurrent use.
type Plan struct {
	n    int
	logN int
	// small[l] holds (w, w², w³) interleaved, w = e^(−2πij/s), j < s/4, for
	// the stage of size s = 2^l ≤ leafMax.
	small [][][3]complex128
	// smallV[l] is small[l] in the layout of the vector kernels (putTw),
	// for s ≥ 8, when useAVX.
	smallV [][]float64
	// fine[l][t][r−1] holds e^(−2πirt/s), t < chunk, r = 1, 2, 3, for the
	// stages s = 2^l > leafMax.
	fine []*[chunk][3]complex128
	// fineV[l] is fine[l] in the vector layout, when avx.
	fineV []*[12 * chunk]float64
	// avx selects the 256-bit vector butterflies (kernel_amd64.s), which
	// give the same bits as the Go loops.
	avx bool
	// brev holds e^(−iπ·rev_8(t)/256), t < 256, for the pointwise step of
	// the real convolution (see MultiplyPacked).
	brev [chunk]complex128
}

var plans sync.Map // int → *Plan

// NewPlan returns the plan for length n, a power of two ≥ 1. Plans are
// small (twiddle tables of under 1 MiB even at n = 2^24) and cached
// process-wide.
func NewPlan(n int) *Plan {
	if n < 1 || n&(n-1) != 0 {
		panic(fmt.Sprintf("fft: length %d is not a power of two", n))
	}
	if p, ok := plans.Load(n); ok {
		return p.(*Plan)
	}
	p := newPlan(n, useAVX)
	q, _ := plans.LoadOrStore(n, p)
	return q.(*Plan)
}

// newPlan builds a plan, with or without the vector kernels.
func newPlan(n int, avx bool) *Plan {
	p := &Plan{n: n, logN: bits.TrailingZeros(uint(n)), avx: avx}
	p.small = make([][][3]complex128, p.logN+1)
	p.fine = make([]*[chunk][3]complex128, p.logN+1)
	p.fineV = make([]*[12 * chunk]float64, p.logN+1)
	p.smallV = make([][]float64, p.logN+1)
	for l := 2; l <= p.logN; l++ {
		s := 1 << l
		if s <= leafMax {
			q := s / 4
			t := make([][3]complex128, q)
			for j := range q {
				for r := 1; r <= 3; r++ {
					t[j][r-1] = expi(-2 * math.Pi * float64(r*j) / float64(s))
				}
			}
			p.small[l] = t
			if avx && q >= 2 {
				v := make([]float64, 12*q)
				for j := range q {
					putTw(v, j, t[j][0], t[j][1], t[j][2])
				}
				p.smallV[l] = v
			}
		} else {
			t := new([chunk][3]complex128)
			for j := range t {
				for r := 1; r <= 3; r++ {
					t[j][r-1] = expi(-2 * math.Pi * float64(r*j) / float64(s))
				}
			}
			p.fine[l] = t
			if avx {
				v := new([12 * chunk]float64)
				for j := range t {
					putTw(v[:], j, t[j][0], t[j][1], t[j][2])
				}
				p.fineV[l] = v
			}
		}
	}
	for t := range chunk {
		r := bits.Reverse8(uint8(t))
		p.brev[t] = expi(-math.Pi * float64(r) / chunk)
	}
	return p
}

// Len returns the transform length.
func (p *Plan) Len() int { return p.n }

// useAVX is whether NewPlan's plans use the vector kernels.
var useAVX = hasAVX()

// putTw stores the twiddles of butterfly j in the vector-kernel layout: per
// pair (j, j+1) 24 values, [w1r(j) w1r(j) w1r(j+1) w1r(j+1)], the same for
// w1i, w2r, w2i, w3r, w3i.
func putTw(v []float64, j int, w1, w2, w3 complex128) {
	b := 24*(j/2) + 2*(j%2)
	v = v[b : b+22]
	v[0], v[1] = real(w1), real(w1)
	v[4], v[5] = imag(w1), imag(w1)
	v[8], v[9] = real(w2), real(w2)
	v[12], v[13] = imag(w2), imag(w2)
	v[16], v[17] = real(w3), real(w3)
	v[20], v[21] = imag(w3), imag(w3)
}

func expi(t float64) complex128 {
	s, c := math.Sincos(t)
	return complex(c, s)
}

// Floats returns the float64 view of z: element 2k is real(z[k]) and 2k+1
// is imag(z[k]) (the memory layout of complex128, two float64 values).
func Floats(z []complex128) []float64 {
	if len(z) == 0 {
		return nil
	}
	return unsafe.Slice((*float64)(unsafe.Pointer(unsafe.SliceData(z))), 2*len(z))
}

func (p *Plan) check(x []complex128) {
	if len(x) != p.n {
		panic(fmt.Sprintf("fft: length %d, plan for %d", len(x), p.n))
	}
}

// Forward replaces x by its DFT in bit-reversed order: afterwards x[k]
// holds X_rev(k), rev reversing the log2 n bits of k.
func (p *Plan) Forward(x []complex128) {
	p.check(x)
	p.dif(x, false)
}

// ForwardHalfZero is Forward for an x whose second half is zero; that half
// is not read (it may hold anything on entry).
func (p *Plan) ForwardHalfZero(x []complex128) {
	p.check(x)
	if p.n < 4 {
		clear(x[(p.n+1)/2:])
		p.dif(x, false)
		return
	}
	p.dif(x, true)
}

// Inverse replaces the bit-reversed spectrum x (as left by Forward) by the
// unnormalised inverse DFT in natural order.
func (p *Plan) Inverse(x []complex128) {
	p.check(x)
	p.dit(x, false)
}

// InverseFirstHalf is Inverse computing only the first half of the output;
// the second half of x is left undefined.
func (p *Plan) InverseFirstHalf(x []complex128) {
	p.check(x)
	p.dit(x, p.n >= 4)
}

// dif is the decimation-in-frequency transform: the stages larger than
// leafMax level by level over the whole array, two levels per pass where
// possible (bigPair), each level's twiddles built once and applied to all
// its blocks; then every leafMax block on its own, in cache.
func (p *Plan) dif(x []complex128, halfZero bool) {
	n := len(x)
	if n <= leafMax {
		if halfZero {
			clear(x[(n+1)/2:])
		}
		p.difLeaf(x)
		return
	}
	s := n
	for ; s > leafMax; s /= 16 {
		if s/4 > leafMax {
			p.bigPair(x, s, true, halfZero && s == n)
		} else {
			p.bigStage(x, s, true, halfZero && s == n)
			s *= 4 // one level only
		}
	}
	leaf := n
	for leaf > leafMax {
		leaf /= 4
	}
	for b := 0; b < n; b += leaf {
		p.difLeaf(x[b : b+leaf])
	}
}

// dit is the inverse of dif: leaf blocks first, then the large levels in
// the reverse order and the same pairs; with firstHalf the last level
// writes only the first half of x.
func (p *Plan) dit(x []complex128, firstHalf bool) {
	n := len(x)
	if n <= leafMax {
		p.ditLeaf(x)
		return
	}
	leaf := n
	for leaf > leafMax {
		leaf /= 4
	}
	for b := 0; b < n; b += leaf {
		p.ditLeaf(x[b : b+leaf])
	}
	var groups []int // sizes s of the groups of dif, negative for single levels
	for s := n; s > leafMax; s /= 16 {
		if s/4 > leafMax {
			groups = append(groups, s)
		} else {
			groups = append(groups, -s)
			s *= 4
		}
	}
	for i := len(groups) - 1; i >= 0; i-- {
		if s := groups[i]; s > 0 {
			p.bigPair(x, s, false, firstHalf && s == n)
		} else {
			p.bigStage(x, -s, false, firstHalf && -s == n)
		}
	}
}

// mulNegI returns −i·z.
func mulNegI(z complex128) complex128 { return complex(imag(z), -real(z)) }

// mulI returns i·z.
func mulI(z complex128) complex128 { return complex(-imag(z), real(z)) }

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }

// cmul is the complex product a·b with every real product rounded on its
// own (the explicit conversions forbid fused multiply-adds, which the
// compiler may otherwise use, e.g. with GOAMD64=v3), the arithmetic of the
// vector kernels.
func cmul(a, b complex128) complex128 {
	return complex(float64(real(a)*real(b))-float64(imag(a)*imag(b)),
		float64(real(a)*imag(b))+float64(imag(a)*real(b)))
}

// twChunk holds the twiddles of one chunk of 256 butterflies of a large
// stage, for the Go loops (w) and in the vector layout (tv).
type twChunk struct {
	w  [chunk][3]complex128
	tv [12 * chunk]float64
}

// genTw fills tc for the butterflies j0 … j0+255 of the stage of size s:
// w_r = e^(∓2πir·j0/s)·e^(∓2πir·t/s), r = 1, 2, 3 (one product each, from
// Sincos and the fine tables); inverse twiddles are the conjugates. With
// avx only tc.tv is filled, by twGenAVX, in the kernel's layout (putTw),
// forward as they are and inverse conjugated back (the kernel multiplies
// by the conjugate of its table), with the same products as the Go loop.
func (p *Plan) genTw(tc *twChunk, s, j0 int, forward bool) {
	fine := p.fine[bits.TrailingZeros(uint(s))]
	sign := -1.0
	if !forward {
		sign = 1
	}
	a := sign * 2 * math.Pi * float64(j0) / float64(s)
	b1, b2, b3 := expi(a), expi(2*a), expi(3*a)
	if p.avx {
		// the same products as below, in the kernel's layout
		base := [6]float64{real(b1), imag(b1), real(b2), imag(b2), real(b3), imag(b3)}
		twGenAVX(&tc.tv[0], &p.fineV[bits.TrailingZeros(uint(s))][0], &base[0], chunk/2, !forward)
		return
	}
	w := &tc.w
	if forward {
		for t := range w {
			f := &fine[t]
			w[t] = [3]complex128{cmul(b1, f[0]), cmul(b2, f[1]), cmul(b3, f[2])}
		}
	} else {
		for t := range w {
			f := &fine[t]
			w[t] = [3]complex128{cmul(b1, conj(f[0])), cmul(b2, conj(f[1])), cmul(b3, conj(f[2]))}
		}
	}
}

// butterflies applies one chunk of radix-4 butterflies to the chunk-long
// columns starting at x[o], x[o+d], x[o+2d], x[o+3d]. Forward, the output
// of residue r goes to column rev2(r) (0, 2, 1, 3), which makes the final
// order bit-reversed, and flag means the last two columns are zero and not
// read; inverse, flag means only the first two columns are written.
func (p *Plan) butterflies(tc *twChunk, x []complex128, o, d int, forward, flag bool) {
	x0 := x[o : o+chunk]
	x1 := x[o+d : o+d+chunk]
	x2 := x[o+2*d : o+2*d+chunk]
	x3 := x[o+3*d : o+3*d+chunk]
	switch {
	case p.avx && forward && flag:
		dif4HalfZeroAVX(&x0[0], &x1[0], &x2[0], &x3[0], &tc.tv[0], chunk/2)
	case p.avx && forward:
		dif4AVX(&x0[0], &x1[0], &x2[0], &x3[0], &tc.tv[0], chunk/2)
	case p.avx:
		dit4AVX(&x0[0], &x1[0], &x2[0], &x3[0], &tc.tv[0], chunk/2, !flag)
	case forward && flag:
		difHalfZeroGo(x0, x1, x2, x3, &tc.w)
	case forward:
		difGo(x0, x1, x2, x3, &tc.w)
	default:
		ditGo(x0, x1, x2, x3, &tc.w, !flag)
	}
}

// bigStage is one radix-4 stage of size s > leafMax over every block of x,
// forward (DIF) or inverse (DIT); flag as for butterflies, at the top level.
func (p *Plan) bigStage(x []complex128, s int, forward, flag bool) {
	q := s / 4
	tc := new(twChunk)
	for j0 := 0; j0 < q; j0 += chunk {
		p.genTw(tc, s, j0, forward)
		for b := 0; b < len(x); b += s {
			p.butterflies(tc, x, b+j0, q, forward, flag)
		}
	}
}

// bigPair does the stages of sizes s and s/4 (both > leafMax) in one pass:
// for each chunk of columns j0 … j0+255 of the 16 rows of stride s/16, the
// four level-s butterfly chunks at j0 + r·m (r = s/16) and then the four
// level-s/4 chunks at j0 of each quarter, while those 16 chunks are in
// cache (the reverse for the inverse). The butterflies and twiddles are
// those of two bigStage calls.
func (p *Plan) bigPair(x []complex128, s int, forward, flag bool) {
	q, r := s/4, s/16
	tcs := new([5]twChunk)
	for j0 := 0; j0 < r; j0 += chunk {
		for m := range 4 {
			p.genTw(&tcs[m], s, j0+r*m, forward)
		}
		p.genTw(&tcs[4], q, j0, forward)
		for b := 0; b < len(x); b += s {
			if forward {
				for m := range 4 {
					p.butterflies(&tcs[m], x, b+r*m+j0, q, true, flag)
				}
				for m := range 4 {
					p.butterflies(&tcs[4], x, b+q*m+j0, r, true, false)
				}
				continue
			}
			for m := range 4 {
				p.butterflies(&tcs[4], x, b+q*m+j0, r, false, false)
			}
			for m := range 4 {
				p.butterflies(&tcs[m], x, b+r*m+j0, q, false, flag)
			}
		}
	}
}

// difGo is the radix-4 DIF butterfly loop of bigStage.
func difGo(x0, x1, x2, x3 []complex128, w *[chunk][3]complex128) {
	x0, x1, x2, x3 = x0[:chunk], x1[:chunk], x2[:chunk], x3[:chunk]
	for t := range x0 {
		w1, w2, w3 := w[t][0], w[t][1], w[t][2]
		a0, a1, a2, a3 := x0[t], x1[t], x2[t], x3[t]
		t0, t1 := a0+a2, a0-a2
		t2, t3 := a1+a3, mulNegI(a1-a3)
		x0[t] = t0 + t2
		x1[t] = cmul(t0-t2, w2)
		x2[t] = cmul(t1+t3, w1)
		x3[t] = cmul(t1-t3, w3)
	}
}

// difHalfZeroGo is difGo with a2 = a3 = 0 (not read).
func difHalfZeroGo(x0, x1, x2, x3 []complex128, w *[chunk][3]complex128) {
	x0, x1, x2, x3 = x0[:chunk], x1[:chunk], x2[:chunk], x3[:chunk]
	for t := range x0 {
		w1, w2, w3 := w[t][0], w[t][1], w[t][2]
		a0, a1 := x0[t], x1[t]
		ia1 := mulNegI(a1)
		x0[t] = a0 + a1
		x1[t] = cmul(a0-a1, w2)
		x2[t] = cmul(a0+ia1, w1)
		x3[t] = cmul(a0-ia1, w3)
	}
}

// ditGo is the radix-4 DIT butterfly loop of bigStage (w already
// conjugated); without full only x0 and x1 are written.
func ditGo(x0, x1, x2, x3 []complex128, w *[chunk][3]complex128, full bool) {
	x0, x1, x2, x3 = x0[:chunk], x1[:chunk], x2[:chunk], x3[:chunk]
	for t := range x0 {
		w1, w2, w3 := w[t][0], w[t][1], w[t][2]
		c0 := x0[t]
		c1 := cmul(x2[t], w1)
		c2 := cmul(x1[t], w2)
		c3 := cmul(x3[t], w3)
		t0, t1 := c0+c2, c0-c2
		t2, t3 := c1+c3, mulI(c1-c3)
		x0[t] = t0 + t2
		x1[t] = t1 + t3
		if full {
			x2[t] = t0 - t2
			x3[t] = t1 - t3
		}
	}
}

// difLeaf is the iterative DIF of x (len(x) ≤ leafMax) with the tables.
func (p *Plan) difLeaf(x []complex128) {
	n := len(x)
	s := n
	for ; s >= 8; s /= 4 {
		l := bits.TrailingZeros(uint(s))
		tw := p.small[l]
		q := s / 4
		if tv := p.smallV[l]; p.avx && tv != nil {
			for b := 0; b < n; b += s {
				dif4AVX(&x[b], &x[b+q], &x[b+2*q], &x[b+3*q], &tv[0], q/2)
			}
			continue
		}
		for b := 0; b < n; b += s {
			x0, x1, x2, x3 := x[b:b+q], x[b+q:b+2*q], x[b+2*q:b+3*q], x[b+3*q:b+s]
			x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
			tw := tw[:len(x0)]
			for j := range x0 {
				w1, w2, w3 := tw[j][0], tw[j][1], tw[j][2]
				a0, a1, a2, a3 := x0[j], x1[j], x2[j], x3[j]
				t0, t1 := a0+a2, a0-a2
				t2, t3 := a1+a3, mulNegI(a1-a3)
				x0[j] = t0 + t2
				x1[j] = cmul(t0-t2, w2)
				x2[j] = cmul(t1+t3, w1)
				x3[j] = cmul(t1-t3, w3)
			}
		}
	}
	switch s {
	case 4:
		if p.avx {
			dif4ptAVX(&x[0], n/4)
			break
		}
		for b := 0; b+3 < n; b += 4 {
			v := x[b : b+4 : b+4]
			a0, a1, a2, a3 := v[0], v[1], v[2], v[3]
			t0, t1 := a0+a2, a0-a2
			t2, t3 := a1+a3, mulNegI(a1-a3)
			v[0] = t0 + t2
			v[1] = t0 - t2
			v[2] = t1 + t3
			v[3] = t1 - t3
		}
	case 2:
		for b := 0; b+1 < n; b += 2 {
			v := x[b : b+2 : b+2]
			v[0], v[1] = v[0]+v[1], v[0]-v[1]
		}
	}
}

// ditLeaf is the inverse of difLeaf (conjugate twiddles, stages reversed).
func (p *Plan) ditLeaf(x []complex128) {
	n := len(x)
	s := 4
	if bits.TrailingZeros(uint(n))%2 == 1 {
		for b := 0; b+1 < n; b += 2 {
			v := x[b : b+2 : b+2]
			v[0], v[1] = v[0]+v[1], v[0]-v[1]
		}
		s = 8
	} else if n >= 4 && p.avx {
		dit4ptAVX(&x[0], n/4)
		s = 16
	} else if n >= 4 {
		for b := 0; b+3 < n; b += 4 {
			v := x[b : b+4 : b+4]
			c0, c1, c2, c3 := v[0], v[2], v[1], v[3]
			t0, t1 := c0+c2, c0-c2
			t2, t3 := c1+c3, mulI(c1-c3)
			v[0] = t0 + t2
			v[1] = t1 + t3
			v[2] = t0 - t2
			v[3] = t1 - t3
		}
		s = 16
	}
	for ; s <= n; s *= 4 {
		l := bits.TrailingZeros(uint(s))
		tw := p.small[l]
		q := s / 4
		if tv := p.smallV[l]; p.avx && tv != nil {
			for b := 0; b < n; b += s {
				dit4AVX(&x[b], &x[b+q], &x[b+2*q], &x[b+3*q], &tv[0], q/2, true)
			}
			continue
		}
		for b := 0; b < n; b += s {
			x0, x1, x2, x3 := x[b:b+q], x[b+q:b+2*q], x[b+2*q:b+3*q], x[b+3*q:b+s]
			x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
			tw := tw[:len(x0)]
			for j := range x0 {
				w1, w2, w3 := conj(tw[j][0]), conj(tw[j][1]), conj(tw[j][2])
				c0 := x0[j]
				c1 := cmul(x2[j], w1)
				c2 := cmul(x1[j], w2)
				c3 := cmul(x3[j], w3)
				t0, t1 := c0+c2, c0-c2
				t2, t3 := c1+c3, mulI(c1-c3)
				x0[j] = t0 + t2
				x1[j] = t1 + t3
				x2[j] = t0 - t2
				x3[j] = t1 - t3
			}
		}
	}
}

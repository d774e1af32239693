// Package fft is a power-of-two complex FFT made for the convolutions of
// package noise: the forward transform takes natural order and leaves the
// spectrum in bit-reversed order, the inverse takes bit-reversed order and
// returns natural order, so a convolution never permutes. Both are radix-4
// (one radix-2 stage when log2 n is odd) and recursive: each top-level
// stage splits the array into four independent quarters, so once a quarter
// fits in cache all its remaining stages run there (a cache-oblivious
// depth-first order). Stages of sizes up to leafMax use precomputed
// twiddle tables; larger stages build their twiddles from a 256-entry table
// and one Sincos per 256 butterflies. Pruned variants skip the zero second
// half of the input (ForwardHalfZero) and the unwanted second half of the
// output (InverseFirstHalf), the shapes of a zero-padded linear convolution.
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
	// fine[l] holds e^(−2πit/s), t < chunk, for the stages s = 2^l > leafMax.
	fine [][]complex128
	// brev holds e^(−iπ·rev_8(t)/256), t < 256, for the pointwise step of
	// the real convolution (see MultiplyPacked).
	brev [chunk]complex128
}

var plans sync.Map // int → *Plan

// NewPlan returns the plan for length n, a power of two ≥ 1. Plans are
// small (about 64 KiB at most) and cached process-wide.
func NewPlan(n int) *Plan {
	if n < 1 || n&(n-1) != 0 {
		panic(fmt.Sprintf("fft: length %d is not a power of two", n))
	}
	if p, ok := plans.Load(n); ok {
		return p.(*Plan)
	}
	p := &Plan{n: n, logN: bits.TrailingZeros(uint(n))}
	p.small = make([][][3]complex128, p.logN+1)
	p.fine = make([][]complex128, p.logN+1)
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
		} else {
			t := make([]complex128, chunk)
			for j := range t {
				t[j] = expi(-2 * math.Pi * float64(j) / float64(s))
			}
			p.fine[l] = t
		}
	}
	for t := range chunk {
		r := bits.Reverse8(uint8(t))
		p.brev[t] = expi(-math.Pi * float64(r) / chunk)
	}
	q, _ := plans.LoadOrStore(n, p)
	return q.(*Plan)
}

// Len returns the transform length.
func (p *Plan) Len() int { return p.n }

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

// dif is the recursive decimation-in-frequency transform.
func (p *Plan) dif(x []complex128, halfZero bool) {
	s := len(x)
	if s <= leafMax {
		if halfZero {
			clear(x[(s+1)/2:])
		}
		p.difLeaf(x)
		return
	}
	l := bits.TrailingZeros(uint(s))
	difStage(x, p.fine[l], halfZero)
	q := s / 4
	for r := range 4 {
		p.dif(x[r*q:(r+1)*q], false)
	}
}

// dit is the recursive decimation-in-time inverse.
func (p *Plan) dit(x []complex128, firstHalf bool) {
	s := len(x)
	if s <= leafMax {
		p.ditLeaf(x)
		return
	}
	q := s / 4
	for r := range 4 {
		p.dit(x[r*q:(r+1)*q], false)
	}
	l := bits.TrailingZeros(uint(s))
	ditStage(x, p.fine[l], firstHalf)
}

// mulNegI returns −i·z.
func mulNegI(z complex128) complex128 { return complex(imag(z), -real(z)) }

// mulI returns i·z.
func mulI(z complex128) complex128 { return complex(-imag(z), real(z)) }

func conj(z complex128) complex128 { return complex(real(z), -imag(z)) }

// difStage is one radix-4 DIF stage over all of x (size s = len(x) > leafMax)
// with twiddles w^j = base(j0)·fine[j−j0]. The output of residue r goes to
// quarter rev2(r) (0, 2, 1, 3), which makes the final order bit-reversed.
// With halfZero the second half of x is taken as zero and not read.
func difStage(x []complex128, fine []complex128, halfZero bool) {
	s := len(x)
	q := s / 4
	x0, x1, x2, x3 := x[:q], x[q:2*q], x[2*q:3*q], x[3*q:]
	for j0 := 0; j0 < q; j0 += chunk {
		base := expi(-2 * math.Pi * float64(j0) / float64(s))
		b0 := x0[j0 : j0+chunk]
		b1, b2, b3, fn := x1[j0:j0+len(b0)], x2[j0:j0+len(b0)], x3[j0:j0+len(b0)], fine[:len(b0)]
		if halfZero {
			for t := range b0 {
				w1 := base * fn[t]
				w2 := w1 * w1
				w3 := w2 * w1
				a0, a1 := b0[t], b1[t]
				ia1 := mulNegI(a1)
				b0[t] = a0 + a1
				b1[t] = (a0 - a1) * w2
				b2[t] = (a0 + ia1) * w1
				b3[t] = (a0 - ia1) * w3
			}
			continue
		}
		for t := range b0 {
			w1 := base * fn[t]
			w2 := w1 * w1
			w3 := w2 * w1
			a0, a1, a2, a3 := b0[t], b1[t], b2[t], b3[t]
			t0, t1 := a0+a2, a0-a2
			t2, t3 := a1+a3, mulNegI(a1-a3)
			b0[t] = t0 + t2
			b1[t] = (t0 - t2) * w2
			b2[t] = (t1 + t3) * w1
			b3[t] = (t1 - t3) * w3
		}
	}
}

// ditStage is the inverse (conjugate) of difStage; with firstHalf only the
// first two quarters of the output are written.
func ditStage(x []complex128, fine []complex128, firstHalf bool) {
	s := len(x)
	q := s / 4
	x0, x1, x2, x3 := x[:q], x[q:2*q], x[2*q:3*q], x[3*q:]
	for j0 := 0; j0 < q; j0 += chunk {
		base := expi(2 * math.Pi * float64(j0) / float64(s))
		b0 := x0[j0 : j0+chunk]
		b1, b2, b3, fn := x1[j0:j0+len(b0)], x2[j0:j0+len(b0)], x3[j0:j0+len(b0)], fine[:len(b0)]
		for t := range b0 {
			w1 := base * conj(fn[t])
			w2 := w1 * w1
			w3 := w2 * w1
			c0 := b0[t]
			c1 := b2[t] * w1
			c2 := b1[t] * w2
			c3 := b3[t] * w3
			t0, t1 := c0+c2, c0-c2
			t2, t3 := c1+c3, mulI(c1-c3)
			b0[t] = t0 + t2
			b1[t] = t1 + t3
			if !firstHalf {
				b2[t] = t0 - t2
				b3[t] = t1 - t3
			}
		}
	}
}

// difLeaf is the iterative DIF of x (len(x) ≤ leafMax) with the tables.
func (p *Plan) difLeaf(x []complex128) {
	n := len(x)
	s := n
	for ; s >= 8; s /= 4 {
		tw := p.small[bits.TrailingZeros(uint(s))]
		q := s / 4
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
				x1[j] = (t0 - t2) * w2
				x2[j] = (t1 + t3) * w1
				x3[j] = (t1 - t3) * w3
			}
		}
	}
	switch s {
	case 4:
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
		tw := p.small[bits.TrailingZeros(uint(s))]
		q := s / 4
		for b := 0; b < n; b += s {
			x0, x1, x2, x3 := x[b:b+q], x[b+q:b+2*q], x[b+2*q:b+3*q], x[b+3*q:b+s]
			x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
			tw := tw[:len(x0)]
			for j := range x0 {
				w1, w2, w3 := conj(tw[j][0]), conj(tw[j][1]), conj(tw[j][2])
				c0 := x0[j]
				c1 := x2[j] * w1
				c2 := x1[j] * w2
				c3 := x3[j] * w3
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

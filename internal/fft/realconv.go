package fft

import (
	"math"
	"math/bits"
)

// Real sequences of length 2m are handled packed two samples per complex
// value, z_k = v_2k + i·v_2k+1, in an m-point transform (the standard
// real-FFT packing, e.g. Press et al., Numerical Recipes §12.3). With
// Z = DFT_m(z), the length-2m spectrum is V_j = E_j + W^j O_j, W = e^(−iπ/m),
// E_j = (Z_j + Z*_(m−j))/2, O_j = (Z_j − Z*_(m−j))/(2i). Multiplying by the
// spectrum H of a real kernel and repacking works on the pairs (j, m−j)
// only, and collapses (derived here) to
//
//	Z'_j     = (S_j − D_j sin θ_j)·Z_j + i D_j cos θ_j · Z*_(m−j)
//	Z'_(m−j) = (S_j + D_j sin θ_j)*·Z_(m−j) + i D_j* cos θ_j · Z*_j
//
// with θ_j = πj/m, S_j = (H_j + H_(j+m))/2 = E^h_j and
// D_j = (H_j − H_(j+m))/2 = W^j O^h_j from the packed kernel spectrum Z^h.
// In the bit-reversed order of Forward the partner of position p = 2^s + u
// (u < 2^s) is 2^(s+1) − 1 − u, the mirror inside the same octave block, and
// j = rev(p) = 2^(b−1−s)·(2·rev_s(u) + 1) for m = 2^b, so both ends of every
// pair are reached by two sequential sweeps.

// KernelCoefficients turns z, the Forward spectrum of a packed real kernel
// h (z_k = h_2k + i·h_2k+1, len(z) = p.Len()), into the coefficients used by
// MultiplyPacked, all multiplied by scale (1/m for a normalised inverse).
// For each pair the first position receives S_j and its mirror D_j.
func (p *Plan) KernelCoefficients(z []complex128, scale float64) {
	p.check(z)
	z[0] = complex(real(z[0])*scale, imag(z[0])*scale)
	if p.n < 2 {
		return
	}
	z[1] *= complex(scale, 0)
	for s := 1; s < p.logN; s++ {
		lo := 1 << s
		for u := range lo / 2 {
			pp, pc := lo+u, 2*lo-1-u
			w := p.pairTwiddle(s, u)
			zj, zc := z[pp], conj(z[pc])
			e := (zj + zc) * 0.5
			o := mulNegI(zj-zc) * 0.5
			z[pp] = e * complex(scale, 0)
			z[pc] = w * o * complex(scale, 0)
		}
	}
}

// pairTwiddle returns W^j = e^(−iθ_j) for the pair at u < 2^(s−1) of block s.
func (p *Plan) pairTwiddle(s, u int) complex128 {
	r := bits.Reverse64(uint64(u)) >> (64 - s)
	return expi(-2 * math.Pi * float64(2*r+1) / float64(uint64(4)<<s))
}

// MultiplyPacked replaces z, the Forward spectrum of a packed real sequence
// v, by the Forward spectrum of the packed circular convolution (length 2m)
// of v with the kernel whose coefficients KernelCoefficients left in coef.
func (p *Plan) MultiplyPacked(z, coef []complex128) {
	p.check(z)
	p.check(coef)
	{
		c := coef[0]
		sv, dv := real(c), imag(c)
		zj := z[0]
		z[0] = complex(sv*real(zj)+dv*imag(zj), sv*imag(zj)+dv*real(zj))
	}
	if p.n < 2 {
		return
	}
	z[1] *= coef[1]
	for s := 1; s < p.logN; s++ {
		lo := 1 << s
		half := lo / 2
		if half < chunk {
			for u := range half {
				multiplyPair(z, coef, lo+u, 2*lo-1-u, p.pairTwiddle(s, u))
			}
			continue
		}
		// u = hi·256 + t: θ_j/(2π) = rev_8(t)/512 + (2·rev_(s−8)(hi) + 1)/2^(s+2)
		brev := &p.brev
		for hi := 0; hi < half/chunk; hi++ {
			r := bits.Reverse64(uint64(hi)) >> (64 - (s - 8))
			base := expi(-2 * math.Pi * float64(2*r+1) / float64(uint64(4)<<s))
			u0 := hi * chunk
			zl := z[lo+u0 : lo+u0+chunk]
			cl := coef[lo+u0 : lo+u0+chunk]
			// mirrors: pc = 2lo−1−u runs downwards from 2lo−1−u0
			top := 2*lo - u0
			zh := z[top-chunk : top]
			ch := coef[top-chunk : top]
			for t := range zl {
				w := base * brev[t]
				sn, cs := -imag(w), real(w)
				sj, dj := cl[t], ch[chunk-1-t]
				ds := complex(real(dj)*sn, imag(dj)*sn)
				dc := complex(real(dj)*cs, imag(dj)*cs)
				zj, zc := zl[t], zh[chunk-1-t]
				a := sj - ds
				ac := conj(sj + ds)
				beta := mulI(dc)
				zl[t] = a*zj + beta*conj(zc)
				zh[chunk-1-t] = ac*zc - conj(beta)*conj(zj)
			}
		}
	}
}

func multiplyPair(z, coef []complex128, pp, pc int, w complex128) {
	sn, cs := -imag(w), real(w)
	sj, dj := coef[pp], coef[pc]
	ds := complex(real(dj)*sn, imag(dj)*sn)
	dc := complex(real(dj)*cs, imag(dj)*cs)
	zj, zc := z[pp], z[pc]
	a := sj - ds
	ac := conj(sj + ds)
	beta := mulI(dc)
	z[pp] = a*zj + beta*conj(zc)
	z[pc] = ac*zc - conj(beta)*conj(zj)
}

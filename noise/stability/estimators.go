package stability

import "math"

// The estimators below work on phase x (s) sampled at τ0 and return the
// variance (not the deviation) and the number of valid terms. A term that
// touches a NaN (gap) is skipped and the normalisation uses the number of
// terms actually summed (SP 1065 §5.15 "gaps", common practice).

func hasNaN(x []float64) bool {
	for _, v := range x {
		if v != v {
			return true
		}
	}
	return false
}

// avarNonOverlap: SP 1065 §5.2.2 phase form,
// σ² = Σ_k (x_{(k+2)m} − 2x_{(k+1)m} + x_{km})² / (2τ²(K−1)).
func avarNonOverlap(x []float64, m int, tau float64) (float64, int) {
	s, n := 0.0, 0
	for i := 0; i+2*m < len(x); i += m {
		d := x[i+2*m] - 2*x[i+m] + x[i]
		if d == d {
			s += d * d
			n++
		}
	}
	return s / (2 * tau * tau * float64(n)), n
}

// avarOverlap: SP 1065 §5.2.4 phase form,
// σ² = Σ_{i=0}^{N−2m−1} (x_{i+2m} − 2x_{i+m} + x_i)² / (2τ²(N−2m)).
func avarOverlap(x []float64, m int, tau float64, gaps bool) (float64, int) {
	nt := len(x) - 2*m
	if nt <= 0 {
		return math.NaN(), 0
	}
	if gaps {
		s, n := 0.0, 0
		for i := range nt {
			d := x[i+2*m] - 2*x[i+m] + x[i]
			if d == d {
				s += d * d
				n++
			}
		}
		return s / (2 * tau * tau * float64(n)), n
	}
	a, b, c := x[:nt], x[m:m+nt], x[2*m:2*m+nt]
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= nt; i += 4 {
		d0 := c[i] - 2*b[i] + a[i]
		d1 := c[i+1] - 2*b[i+1] + a[i+1]
		d2 := c[i+2] - 2*b[i+2] + a[i+2]
		d3 := c[i+3] - 2*b[i+3] + a[i+3]
		s0 += d0 * d0
		s1 += d1 * d1
		s2 += d2 * d2
		s3 += d3 * d3
	}
	for ; i < nt; i++ {
		d := c[i] - 2*b[i] + a[i]
		s0 += d * d
	}
	return (s0 + s1 + s2 + s3) / (2 * tau * tau * float64(nt)), nt
}

// mvar: SP 1065 §5.2.5 phase form,
// Mod σ² = Σ_{j=0}^{N−3m} [Σ_{i=j}^{j+m−1} d_i]² / (2m²τ²(N−3m+1)),
// d_i = x_{i+2m} − 2x_{i+m} + x_i, with the window sum updated recursively
// (Bregni 2001 style, stability.md §2.3) and recomputed from scratch every
// refresh windows to bound round-off. buf is scratch of length ≥ N−2m.
// (Gap-free data normally go through fusedPass instead.)
func mvar(x []float64, m int, tau float64, buf []float64) (float64, int) {
	nd := len(x) - 2*m // number of second differences
	nw := len(x) - 3*m + 1
	if nw <= 0 {
		return math.NaN(), 0
	}
	refresh := max(1<<16, 8*m)
	fm := float64(m)
	norm := 2 * fm * fm * tau * tau
	d := buf[:nd]
	a, b, c := x[:nd], x[m:m+nd], x[2*m:2*m+nd]
	for i := range d {
		d[i] = c[i] - 2*b[i] + a[i]
	}
	s, n := 0.0, 0
	var win float64
	nanIn := 0
	sinceRefresh := 0
	for j := 0; j < nw; j++ {
		if j == 0 || sinceRefresh == refresh {
			win, nanIn, sinceRefresh = 0, 0, 0
			for _, v := range d[j : j+m] {
				if v == v {
					win += v
				} else {
					nanIn++
				}
			}
		} else {
			in, out := d[j+m-1], d[j-1]
			if in == in {
				win += in
			} else {
				nanIn++
			}
			if out == out {
				win -= out
			} else {
				nanIn--
			}
		}
		sinceRefresh++
		if nanIn == 0 {
			s += win * win
			n++
		}
	}
	return s / (norm * float64(n)), n
}

// hvarNonOverlap: SP 1065 §5.2.8 phase form,
// Hσ² = Σ_k (x_{(k+3)m} − 3x_{(k+2)m} + 3x_{(k+1)m} − x_{km})² / (6τ²(K−2)).
func hvarNonOverlap(x []float64, m int, tau float64) (float64, int) {
	s, n := 0.0, 0
	for i := 0; i+3*m < len(x); i += m {
		d := x[i+3*m] - 3*x[i+2*m] + 3*x[i+m] - x[i]
		if d == d {
			s += d * d
			n++
		}
	}
	return s / (6 * tau * tau * float64(n)), n
}

// hvarOverlap: SP 1065 §5.2.9 phase form,
// Σ_{i=0}^{N−3m−1} (x_{i+3m} − 3x_{i+2m} + 3x_{i+m} − x_i)² / (6τ²(N−3m)).
func hvarOverlap(x []float64, m int, tau float64, gaps bool) (float64, int) {
	nt := len(x) - 3*m
	if nt <= 0 {
		return math.NaN(), 0
	}
	if gaps {
		s, n := 0.0, 0
		for i := range nt {
			d := x[i+3*m] - 3*x[i+2*m] + 3*x[i+m] - x[i]
			if d == d {
				s += d * d
				n++
			}
		}
		return s / (6 * tau * tau * float64(n)), n
	}
	a, b, c, e := x[:nt], x[m:m+nt], x[2*m:2*m+nt], x[3*m:3*m+nt]
	var s0, s1 float64
	i := 0
	for ; i+2 <= nt; i += 2 {
		d0 := e[i] - 3*c[i] + 3*b[i] - a[i]
		d1 := e[i+1] - 3*c[i+1] + 3*b[i+1] - a[i+1]
		s0 += d0 * d0
		s1 += d1 * d1
	}
	for ; i < nt; i++ {
		d := e[i] - 3*c[i] + 3*b[i] - a[i]
		s0 += d * d
	}
	return (s0 + s1) / (6 * tau * tau * float64(nt)), nt
}

// totvar: SP 1065 §5.2.11 total variance with the phase series extended by
// reflection about both end points (1-based: x*_{1−j} = 2x_1 − x_{1+j},
// x*_{N+j} = 2x_N − x_{N−j}),
// Totvar = Σ_{i=2}^{N−1} (x*_{i−m} − 2x*_i + x*_{i+m})² / (2τ²(N−2)).
func totvar(x []float64, m int, tau float64) (float64, int) {
	n := len(x)
	if n < 3 || m > n-1 {
		return math.NaN(), 0
	}
	last := n - 1
	at := func(j int) float64 { // 0-based index into the reflected series
		switch {
		case j < 0:
			return 2*x[0] - x[-j]
		case j > last:
			return 2*x[last] - x[2*last-j]
		}
		return x[j]
	}
	s, cnt := 0.0, 0
	for i := 1; i < last; i++ {
		var d float64
		if i-m >= 0 && i+m <= last {
			d = x[i-m] - 2*x[i] + x[i+m]
		} else {
			d = at(i-m) - 2*x[i] + at(i+m)
		}
		if d == d {
			s += d * d
			cnt++
		}
	}
	return s / (2 * tau * tau * float64(cnt)), cnt
}

// fusedPass returns, for gap-free phase x and averaging factor m (with
// len(x) > 3m), the three sums
//
//	a = Σ_{i<N−2m} (x_{i+2m} − 2x_{i+m} + x_i)²                  (OAVAR)
//	w = Σ_{j<N−3m+1} S_j²,  S_j = Σ_{i=j}^{j+m−1} (x_{i+2m} − 2x_{i+m} + x_i)   (MVAR)
//	h = Σ_{i<N−3m} (x_{i+3m} − 3x_{i+2m} + 3x_{i+m} − x_i)²       (OHVAR)
//
// in one pass: the third difference both is the Hadamard term and advances
// the MVAR window, S_{j+1} = S_j + (third difference at j). The window is
// recomputed exactly every refresh steps to bound round-off.
func fusedPass(x []float64, m int) (a, w, h float64) {
	n := len(x)
	n3 := n - 3*m // number of third differences
	refresh := max(1<<16, 8*m)
	exact := func(j int) float64 {
		s := 0.0
		for i := j; i < j+m; i++ {
			s += float64(x[i+2*m]-float64(2*x[i+m])) + x[i]
		}
		return s
	}
	var a0, a1, h0, h1, w0, w1 float64
	for blk := 0; blk < n3; blk += refresh {
		end := min(blk+refresh, n3)
		S := exact(blk)
		xa, xb, xc, xd := x[blk:end], x[blk+m:end+m], x[blk+2*m:end+2*m], x[blk+3*m:end+3*m]
		// S advances by d2_{j+m} − d2_j, with both second differences
		// evaluated by the same expression (explicit float64 conversions
		// forbid fused multiply-adds), so the rounding errors of the d2
		// cancel exactly and do not accumulate in S (stability.md §2.3).
		for k := range xa {
			d2 := float64(xc[k]-float64(2*xb[k])) + xa[k]
			d2p := float64(xd[k]-float64(2*xc[k])) + xb[k]
			d3 := d2p - d2 // = x_{j+3m} − 3x_{j+2m} + 3x_{j+m} − x_j
			if k&1 == 0 {
				a0 += d2 * d2
				h0 += d3 * d3
				w0 += S * S
			} else {
				a1 += d2 * d2
				h1 += d3 * d3
				w1 += S * S
			}
			S += d3
		}
	}
	// the last MVAR window S_{N−3m} and the last m OAVAR terms
	S := exact(n3)
	w0 += S * S
	for i := n3; i < n-2*m; i++ {
		d2 := x[i+2*m] - 2*x[i+m] + x[i]
		a0 += d2 * d2
	}
	return a0 + a1, w0 + w1, h0 + h1
}

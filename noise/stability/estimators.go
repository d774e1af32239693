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
// few windows to bound round-off. buf is scratch of length ≥ N−2m.
func mvar(x []float64, m int, tau float64, buf []float64) (float64, int) {
	nd := len(x) - 2*m // number of second differences
	nw := len(x) - 3*m + 1
	if nw <= 0 {
		return math.NaN(), 0
	}
	d := buf[:nd]
	for i := range d {
		v := x[i+2*m] - 2*x[i+m] + x[i]
		d[i] = v
	}
	refresh := max(1<<16, 8*m)
	s, n := 0.0, 0
	var win float64
	nanIn := 0
	for i := range m {
		if v := d[i]; v == v {
			win += v
		} else {
			nanIn++
		}
	}
	for j := 0; j < nw; j++ {
		if j > 0 {
			if j%refresh == 0 {
				win, nanIn = 0, 0
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
		}
		if nanIn == 0 {
			s += win * win
			n++
		}
	}
	fm := float64(m)
	return s / (2 * fm * fm * tau * tau * float64(n)), n
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

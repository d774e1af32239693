package stability

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// EDF by the Greenhall–Riley algorithm: C.A. Greenhall & W.J. Riley,
// "Uncertainty of stability variances based on finite differences", 35th
// PTTI (2003), eqs. (7)–(13) and Tables 1–3 (structure and table values as
// transcribed in stability.md §2.7).
//
// alpha is the power-law exponent of S_y (−4 … 2, α + 2d > 1), d the
// difference order (2 Allan, 3 Hadamard), f the bandwidth factor (1 for the
// modified variances, m for the unmodified ones; +Inf allowed), s the
// stride factor (1 non-overlapped, m overlapped), n the number of phase
// points. It returns NaN when the estimator is undefined.
func edfGreenhallRiley(alpha, d, m int, f, s float64, n int) float64 {
	if alpha+2*d <= 1 || alpha < -4 || alpha > 2 || m < 1 {
		return math.NaN()
	}
	fm := float64(m)
	l := fm/f + fm*float64(d)
	if float64(n) < l {
		return math.NaN()
	}
	mm := 1 + math.Floor(s*(float64(n)-l)/fm) // M
	j := math.Min(mm, float64(d+1)*s)         // J
	const jmax = 100.0
	r := mm / s
	var inv float64
	switch {
	case f == 1: // modified variances, any α
		switch {
		case j <= jmax:
			inv = grBasicSum(j, mm, s, 1, alpha, d) / (mm * sq(grSz(0, 1, alpha, d)))
		case r > float64(d+1):
			a0, a1 := grTable1(alpha, d)
			inv = (a0 - a1/r) / r
		default:
			mp := jmax / r
			inv = grBasicSum(jmax, jmax, mp, 1, alpha, d) / (jmax * sq(grSz(0, 1, alpha, d)))
		}
	case alpha <= 0:
		switch {
		case j <= jmax:
			ff := fm
			if fm*float64(d+1) > jmax {
				ff = math.Inf(1)
			}
			inv = grBasicSum(j, mm, s, ff, alpha, d) / (mm * sq(grSz(0, ff, alpha, d)))
		case r > float64(d+1):
			a0, a1 := grTable2(alpha, d)
			inv = (a0 - a1/r) / r
		default:
			mp := jmax / r
			inf := math.Inf(1)
			inv = grBasicSum(jmax, jmax, mp, inf, alpha, d) / (jmax * sq(grSz(0, inf, alpha, d)))
		}
	case alpha == 1:
		switch {
		case j <= jmax:
			inv = grBasicSum(j, mm, s, fm, alpha, d) / (mm * sq(grSz(0, fm, alpha, d)))
		case r > float64(d+1):
			a0, a1 := grTable2(alpha, d)
			b0, b1 := grTable3(d)
			inv = (a0 - a1/r) / (r * sq(b0+b1*math.Log(fm)))
		default:
			// Edge case (J > J_max but r ≤ d+1): the J_max variant with F = m.
			mp := jmax / r
			inv = grBasicSum(jmax, jmax, mp, fm, alpha, d) / (jmax * sq(grSz(0, fm, alpha, d)))
		}
	default: // alpha == 2, unmodified
		k := math.Ceil(r)
		c2d := binom(2*d, d)
		if k > float64(d) {
			a0 := binom(4*d, 2*d) / (c2d * c2d)
			a1 := float64(d) / 2
			inv = (a0 - a1/r) / mm
		} else {
			sum := 0.0
			for kk := -int(k) + 1; kk < int(k); kk++ {
				w := binom(2*d, d+kk) / c2d
				sum += (1 - math.Abs(float64(kk))/r) * w * w
			}
			inv = sum / mm
		}
	}
	if !(inv > 0) {
		return math.NaN()
	}
	return 1 / inv
}

func sq(v float64) float64 { return v * v }

func binom(n, k int) float64 {
	if k < 0 || k > n {
		return 0
	}
	r := 1.0
	for i := 1; i <= k; i++ {
		r = r * float64(n-k+i) / float64(i)
	}
	return r
}

// grSw is the generalised autocovariance sw(t) of Greenhall–Riley eq. (8).
func grSw(t float64, alpha int) float64 {
	at := math.Abs(t)
	lg := func(p float64) float64 {
		if t == 0 {
			return 0
		}
		return math.Pow(at, p) * math.Log(at)
	}
	switch alpha {
	case 2:
		return -at
	case 1:
		return lg(2)
	case 0:
		return at * at * at
	case -1:
		return lg(4)
	case -2:
		return math.Pow(at, 5)
	case -3:
		return lg(6)
	case -4:
		return math.Pow(at, 7)
	}
	return math.NaN()
}

// grSx: sx(t, F, α) = F²[2sw(t) − sw(t−1/F) − sw(t+1/F)], and sw(t, α+2)
// for F = ∞.
func grSx(t, f float64, alpha int) float64 {
	if math.IsInf(f, 1) {
		return grSw(t, alpha+2)
	}
	h := 1 / f
	return f * f * (2*grSw(t, alpha) - grSw(t-h, alpha) - grSw(t+h, alpha))
}

// grSz: sz(t, F, α, d) = Σ_{k=−d}^{d} (−1)^k C(2d, d+k) sx(t−k).
func grSz(t, f float64, alpha, d int) float64 {
	s := 0.0
	for k := -d; k <= d; k++ {
		c := binom(2*d, d+k)
		if k%2 != 0 {
			c = -c
		}
		s += c * grSx(t-float64(k), f, alpha)
	}
	return s
}

// grBasicSum: sz(0)² + (1 − J/M) sz(J/S)² + 2 Σ_{j=1}^{J−1} (1 − j/M) sz(j/S)².
func grBasicSum(j, mm, s, f float64, alpha, d int) float64 {
	sum := sq(grSz(0, f, alpha, d))
	sum += (1 - j/mm) * sq(grSz(j/s, f, alpha, d))
	for i := 1.0; i < j; i++ {
		sum += 2 * (1 - i/mm) * sq(grSz(i/s, f, alpha, d))
	}
	return sum
}

// grTable1: (a0, a1) for the modified variances (GR 2003 Table 1).
func grTable1(alpha, d int) (float64, float64) {
	t := map[[2]int][2]float64{
		{2, 1}: {2.0 / 3, 1.0 / 3}, {2, 2}: {7.0 / 9, 0.5}, {2, 3}: {22.0 / 25, 2.0 / 3},
		{1, 1}: {0.840, 0.345}, {1, 2}: {0.997, 0.616}, {1, 3}: {1.141, 0.843},
		{0, 1}: {1.079, 0.368}, {0, 2}: {1.033, 0.607}, {0, 3}: {1.184, 0.848},
		{-1, 2}: {1.048, 0.534}, {-1, 3}: {1.180, 0.816},
		{-2, 2}: {1.302, 0.535}, {-2, 3}: {1.175, 0.777},
		{-3, 3}: {1.194, 0.703},
		{-4, 3}: {1.489, 0.702},
	}
	v, ok := t[[2]int{alpha, d}]
	if !ok {
		return math.NaN(), math.NaN()
	}
	return v[0], v[1]
}

// grTable2: (a0, a1) for the unmodified variances (GR 2003 Table 2).
func grTable2(alpha, d int) (float64, float64) {
	t := map[[2]int][2]float64{
		{2, 1}: {1.5, 0.5}, {2, 2}: {35.0 / 18, 1}, {2, 3}: {231.0 / 100, 1.5},
		{1, 1}: {78.6, 25.2}, {1, 2}: {790, 410}, {1, 3}: {9950, 6520},
		{0, 1}: {2.0 / 3, 1.0 / 6}, {0, 2}: {2.0 / 3, 1.0 / 3}, {0, 3}: {7.0 / 9, 0.5},
		{-1, 2}: {0.852, 0.375}, {-1, 3}: {0.997, 0.617},
		{-2, 2}: {1.079, 0.368}, {-2, 3}: {1.033, 0.607},
		{-3, 3}: {1.053, 0.553},
		{-4, 3}: {1.302, 0.535},
	}
	v, ok := t[[2]int{alpha, d}]
	if !ok {
		return math.NaN(), math.NaN()
	}
	return v[0], v[1]
}

// grTable3: (b0, b1) for α = 1 unmodified variances (GR 2003 Table 3).
func grTable3(d int) (float64, float64) {
	switch d {
	case 1:
		return 6, 4
	case 2:
		return 15.23, 12
	case 3:
		return 47.8, 40
	}
	return math.NaN(), math.NaN()
}

// edfTotdev: ν = b·(N/m) − c, SP 1065 Table 7 (WFM, FFM, RWFM); the white
// and flicker PM cases, not in the table, use the WFM row.
func edfTotdev(alpha, m, n int) float64 {
	b, c := 1.50, 0.0
	switch alpha {
	case -1:
		b, c = 1.17, 0.22
	case -2:
		b, c = 0.93, 0.36
	}
	v := b*float64(n)/float64(m) - c
	if !(v > 0) {
		return math.NaN()
	}
	return v
}

// ConfidenceInterval returns the χ² interval of a deviation dev with edf
// equivalent degrees of freedom at two-sided confidence level cl
// (SP 1065 eq. (45)): [dev·√(ν/χ²_{(1+cl)/2}(ν)), dev·√(ν/χ²_{(1−cl)/2}(ν))].
// It returns NaNs when edf is not positive.
func ConfidenceInterval(dev, edf, cl float64) (lo, hi float64) {
	if !(edf > 0) || math.IsInf(edf, 0) || !(cl > 0 && cl < 1) {
		return math.NaN(), math.NaN()
	}
	c := distuv.ChiSquared{K: edf}
	lo = dev * math.Sqrt(edf/c.Quantile((1+cl)/2))
	hi = dev * math.Sqrt(edf/c.Quantile((1-cl)/2))
	return lo, hi
}

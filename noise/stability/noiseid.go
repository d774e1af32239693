package stability

import (
	"fmt"
	"math"
)

// minIDPoints is the fewest points the lag-1 autocorrelation method uses
// (Riley & Greenhall 2004: "at least about 30").
const minIDPoints = 30

// maxIDPoints caps the series length the identification looks at.
const maxIDPoints = 1 << 15

// IdentifyNoise estimates the dominant power-law noise type at averaging
// factor m by the lag-1 autocorrelation method (W.J. Riley & C.A. Greenhall,
// "Power law noise identification using the lag 1 autocorrelation",
// EFTF 2004; SP 1065 §5.6; stability.md §2.8).
//
// data is phase (isPhase = true; decimated by m) or fractional frequency
// (block-averaged by m); NaN points are dropped. dmax is the largest number
// of differences (2 for the Allan family, 3 for Hadamard). It returns the
// integer exponent α of S_y ∝ f^α and the non-integer estimate.
func IdentifyNoise(data []float64, m int, isPhase bool, dmax int) (alpha int, est float64, err error) {
	if m < 1 {
		return 0, math.NaN(), fmt.Errorf("stability: noise id: averaging factor %d < 1", m)
	}
	// At most maxIDPoints consecutive decimated points are used: the lag-1
	// estimate then has a standard error ≈ 1/√maxIDPoints = 0.006, far below
	// the 0.25-wide decision bins, and the cost stays O(1) per τ.
	var z []float64
	if isPhase {
		z = make([]float64, 0, min(maxIDPoints, len(data)/m+1))
		for i := 0; i < len(data) && len(z) < maxIDPoints; i += m {
			if v := data[i]; v == v {
				z = append(z, v)
			}
		}
	} else {
		z = make([]float64, 0, min(maxIDPoints, len(data)/m+1))
		for i := 0; i+m <= len(data) && len(z) < maxIDPoints; i += m {
			s, k := 0.0, 0
			for _, v := range data[i : i+m] {
				if v == v {
					s += v
					k++
				}
			}
			if k == m {
				z = append(z, s/float64(m))
			}
		}
	}
	if len(z) < minIDPoints {
		return 0, math.NaN(), fmt.Errorf("stability: noise id: %d points at m = %d, need ≥ %d", len(z), m, minIDPoints)
	}
	if isPhase {
		detrend(z, 2)
	} else {
		detrend(z, 1)
	}
	d := 0
	var delta float64
	for {
		r1 := lag1(z)
		delta = r1 / (1 + r1)
		if delta < 0.25 || d >= dmax || len(z) < minIDPoints/2 {
			break
		}
		for i := 0; i+1 < len(z); i++ {
			z[i] = z[i+1] - z[i]
		}
		z = z[:len(z)-1]
		d++
	}
	p := -2 * (delta + float64(d))
	alpha = -int(math.Round(2*delta)) - 2*d
	est = p
	if isPhase {
		alpha += 2
		est += 2
	}
	return alpha, est, nil
}

// lag1 returns the lag-1 autocorrelation Σ(z_i − z̄)(z_{i+1} − z̄)/Σ(z_i − z̄)².
func lag1(z []float64) float64 {
	mean := 0.0
	for _, v := range z {
		mean += v
	}
	mean /= float64(len(z))
	num, den := 0.0, 0.0
	for i, v := range z {
		dv := v - mean
		den += dv * dv
		if i+1 < len(z) {
			num += dv * (z[i+1] - mean)
		}
	}
	if den == 0 {
		return 0
	}
	return num / den
}

// detrend removes the least-squares polynomial of the given degree (≤ 2)
// in the sample index from z, in place, using the orthogonal basis 1, u,
// u² − mean(u²) in the centred, scaled index u ∈ [−1, 1].
func detrend(z []float64, deg int) {
	n := len(z)
	c := float64(n-1) / 2
	inv := 1 / math.Max(c, 1)
	mu2 := 0.0
	for i := range n {
		u := (float64(i) - c) * inv
		mu2 += u * u
	}
	mu2 /= float64(n)
	var num, den [3]float64
	for i, v := range z {
		u := (float64(i) - c) * inv
		p := [3]float64{1, u, u*u - mu2}
		for k := 0; k <= deg; k++ {
			num[k] += p[k] * v
			den[k] += p[k] * p[k]
		}
	}
	var a [3]float64
	for k := 0; k <= deg; k++ {
		if den[k] > 0 {
			a[k] = num[k] / den[k]
		}
	}
	for i := range z {
		u := (float64(i) - c) * inv
		z[i] -= a[0] + a[1]*u + a[2]*(u*u-mu2)
	}
}

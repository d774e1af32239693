package stability

import (
	"fmt"
	"math"
)

// minIDPoints is the fewest points the lag-1 autocorrelation method uses
// (Riley & Greenhall 2004: "at least about 30").
const minIDPoints = 30

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
	var z []float64
	if isPhase {
		for i := 0; i < len(data); i += m {
			if v := data[i]; v == v {
				z = append(z, v)
			}
		}
	} else {
		for i := 0; i+m <= len(data); i += m {
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
// in the sample index from z, in place.
func detrend(z []float64, deg int) {
	n := len(z)
	// orthogonal polynomials in the centred, scaled index u ∈ [−1, 1]
	c := float64(n-1) / 2
	sc := math.Max(c, 1)
	u := func(i int) float64 { return (float64(i) - c) / sc }
	// p0 = 1, p1 = u, p2 = u² − mean(u²)
	mu2 := 0.0
	for i := range n {
		mu2 += u(i) * u(i)
	}
	mu2 /= float64(n)
	basis := []func(float64) float64{
		func(float64) float64 { return 1 },
		func(v float64) float64 { return v },
		func(v float64) float64 { return v*v - mu2 },
	}
	for k := 0; k <= deg && k < len(basis); k++ {
		num, den := 0.0, 0.0
		for i := range n {
			p := basis[k](u(i))
			num += p * z[i]
			den += p * p
		}
		if den == 0 {
			continue
		}
		a := num / den
		for i := range n {
			z[i] -= a * basis[k](u(i))
		}
	}
}

package stability

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// Stat names a stability statistic.
type Stat string

// The statistics (NIST SP 1065 §5.2).
const (
	StatADEV   Stat = "adev"   // Allan deviation, non-overlapping
	StatOADEV  Stat = "oadev"  // overlapping Allan deviation
	StatMDEV   Stat = "mdev"   // modified Allan deviation
	StatTDEV   Stat = "tdev"   // time deviation, s
	StatHDEV   Stat = "hdev"   // Hadamard deviation, non-overlapping
	StatOHDEV  Stat = "ohdev"  // overlapping Hadamard deviation
	StatTOTDEV Stat = "totdev" // total deviation
)

// Stats lists all statistics in a fixed order.
func Stats() []Stat {
	return []Stat{StatADEV, StatOADEV, StatMDEV, StatTDEV, StatHDEV, StatOHDEV, StatTOTDEV}
}

// ParseStat parses a statistic name (case-insensitive).
func ParseStat(s string) (Stat, error) {
	t := Stat(strings.ToLower(strings.TrimSpace(s)))
	for _, v := range Stats() {
		if t == v {
			return t, nil
		}
	}
	return "", fmt.Errorf("stability: unknown statistic %q (known: adev, oadev, mdev, tdev, hdev, ohdev, totdev)", s)
}

// stopRatio is the conventional largest averaging factor m_max = ⌊N/ratio⌋
// per statistic (Riley, "evolution of a classic stability tool", Table III,
// as quoted in stability.md §2.9).
func (s Stat) stopRatio() int {
	switch s {
	case StatADEV, StatHDEV:
		return 5
	case StatTOTDEV:
		return 2
	}
	return 4
}

// Result is one point of a stability curve.
type Result struct {
	Tau    float64 // averaging time τ = mτ0, s
	M      int     // averaging factor m
	N      int     // number of terms in the estimate (after gaps)
	Value  float64 // deviation (dimensionless; seconds for TDEV)
	CILow  float64 // lower confidence bound (same unit as Value)
	CIHigh float64 // upper confidence bound
	EDF    float64 // equivalent degrees of freedom
	Alpha  int     // power-law exponent α of S_y used for the EDF
}

// Options control Compute. The zero value means: 1σ (68.27 %) intervals and
// noise identified at each τ.
type Options struct {
	// CL is the two-sided confidence level of the intervals; 0 means
	// erf(1/√2) = 0.682689 (a "1σ" interval).
	CL float64
	// Alpha, if non-nil, fixes the power-law exponent used for the EDF
	// instead of identifying it at each τ by the lag-1 autocorrelation.
	Alpha *int
}

// OneSigma is the two-sided probability of a ±1σ normal interval, erf(1/√2).
const OneSigma = 0.6826894921370859

// Compute evaluates statistic s of the phase series x (s; NaN = gap),
// sampled at tau0 seconds, at the averaging factors m. Factors for which
// the statistic is undefined (too few points) are omitted. EDF: Greenhall–
// Riley for ADEV, OADEV, MDEV, TDEV, HDEV and OHDEV; SP 1065 Table 7 for
// TOTDEV. Noise identification at each τ uses the lag-1 autocorrelation of
// the decimated phase; where fewer than 30 points remain, the exponent found
// at the largest identifiable τ is carried on.
func Compute(s Stat, x []float64, tau0 float64, m []int, opt *Options) ([]Result, error) {
	r, err := ComputeMany([]Stat{s}, x, tau0, func(Stat) []int { return m }, opt)
	if err != nil {
		return nil, err
	}
	return r[0], nil
}

// ComputeMany evaluates several statistics of one phase series, statistic
// stats[i] at the averaging factors grid(stats[i]), and returns the results
// in the order of stats (see Compute). For gap-free data, MVAR (MDEV/TDEV),
// and OAVAR and OHVAR when two of the three are wanted at the same m, come
// from one shared pass over x.
func ComputeMany(stats []Stat, x []float64, tau0 float64, grid func(Stat) []int, opt *Options) ([][]Result, error) {
	for _, s := range stats {
		if _, err := ParseStat(string(s)); err != nil {
			return nil, err
		}
	}
	if !(tau0 > 0) || math.IsInf(tau0, 0) {
		return nil, fmt.Errorf("stability: sample interval %g s must be positive and finite", tau0)
	}
	cl := OneSigma
	var fixed *int
	if opt != nil {
		if opt.CL != 0 {
			if !(opt.CL > 0 && opt.CL < 1) {
				return nil, fmt.Errorf("stability: confidence level %g must be in (0, 1)", opt.CL)
			}
			cl = opt.CL
		}
		fixed = opt.Alpha
		if fixed != nil && (*fixed < -4 || *fixed > 2) {
			return nil, fmt.Errorf("stability: noise exponent α = %d outside −4 … 2", *fixed)
		}
	}
	grids := make([][]int, len(stats))
	var all []int
	seen := map[int]bool{}
	for i, s := range stats {
		grids[i] = grid(s)
		for _, mi := range grids[i] {
			if mi < 1 {
				return nil, fmt.Errorf("stability: averaging factor %d < 1", mi)
			}
			if !seen[mi] {
				seen[mi] = true
				all = append(all, mi)
			}
		}
	}
	gaps := hasNaN(x)
	nValid := len(x)
	if gaps {
		nValid = 0
		for _, xv := range x {
			if xv == xv {
				nValid++
			}
		}
	}
	// one shared pass per m for the overlapping family on gap-free data
	type fusedVals struct{ oavar, mvar, ohvar float64 }
	fused := map[int]fusedVals{}
	if !gaps {
		want := map[int]int{} // m → number of distinct fused-family variances wanted
		for _, fam := range [][]Stat{{StatOADEV}, {StatMDEV, StatTDEV}, {StatOHDEV}} {
			fm := map[int]bool{}
			for i, s := range stats {
				if slices.Contains(fam, s) {
					for _, mi := range grids[i] {
						fm[mi] = true
					}
				}
			}
			for mi := range fm {
				want[mi]++
			}
		}
		mvarWanted := map[int]bool{}
		for i, s := range stats {
			if s == StatMDEV || s == StatTDEV {
				for _, mi := range grids[i] {
					mvarWanted[mi] = true
				}
			}
		}
		for _, mi := range all {
			// the shared pass is also the fastest MVAR on its own
			if (want[mi] >= 2 || mvarWanted[mi]) && len(x)-3*mi > 0 {
				a, mv, h := fusedPass(x, mi)
				tau := float64(mi) * tau0
				fm := float64(mi)
				n := len(x)
				fused[mi] = fusedVals{
					oavar: a / (2 * tau * tau * float64(n-2*mi)),
					mvar:  mv / (2 * fm * fm * tau * tau * float64(n-3*mi+1)),
					ohvar: h / (6 * tau * tau * float64(n-3*mi)),
				}
			}
		}
	}
	// noise identification once per (m, dmax)
	type idKey struct{ m, dmax int }
	ids := map[idKey]int{}
	idOK := map[idKey]bool{}
	identify := func(mi, dmax int) {
		k := idKey{mi, dmax}
		if _, done := idOK[k]; done {
			return
		}
		a, _, err := IdentifyNoise(x, mi, true, dmax)
		ids[k], idOK[k] = a, err == nil
	}
	var buf []float64
	out := make([][]Result, len(stats))
	for si, s := range stats {
		dmax := 2
		if s == StatHDEV || s == StatOHDEV {
			dmax = 3
		}
		lastAlpha, haveAlpha := 0, false
		res := make([]Result, 0, len(grids[si]))
		for _, mi := range grids[si] {
			tau := float64(mi) * tau0
			var v float64
			var cnt int
			f, haveFused := fused[mi]
			switch s {
			case StatADEV:
				v, cnt = avarNonOverlap(x, mi, tau)
			case StatOADEV:
				if haveFused {
					v, cnt = f.oavar, len(x)-2*mi
				} else {
					v, cnt = avarOverlap(x, mi, tau, gaps)
				}
			case StatMDEV, StatTDEV:
				if haveFused {
					v, cnt = f.mvar, len(x)-3*mi+1
				} else {
					if buf == nil && len(x)-2*mi > 0 {
						buf = make([]float64, len(x))
					}
					v, cnt = mvar(x, mi, tau, buf)
				}
			case StatHDEV:
				v, cnt = hvarNonOverlap(x, mi, tau)
			case StatOHDEV:
				if haveFused {
					v, cnt = f.ohvar, len(x)-3*mi
				} else {
					v, cnt = hvarOverlap(x, mi, tau, gaps)
				}
			case StatTOTDEV:
				v, cnt = totvar(x, mi, tau)
			}
			if cnt <= 0 || math.IsNaN(v) {
				continue
			}
			dev := math.Sqrt(v)
			if s == StatTDEV {
				dev *= tau / math.Sqrt(3) // SP 1065 §5.2.6: σ_x = (τ/√3)·Mod σ_y
			}
			alpha := lastAlpha
			if fixed != nil {
				alpha = *fixed
			} else {
				identify(mi, dmax)
				k := idKey{mi, dmax}
				if idOK[k] {
					alpha, lastAlpha, haveAlpha = ids[k], ids[k], true
				} else if !haveAlpha {
					alpha = 0 // nothing identifiable yet: assume white FM
				}
			}
			alpha = clampAlpha(alpha, dmax)
			var edf float64
			fm := float64(mi)
			switch s {
			case StatADEV:
				edf = edfGreenhallRiley(alpha, 2, mi, fm, 1, nValid)
			case StatOADEV:
				edf = edfGreenhallRiley(alpha, 2, mi, fm, fm, nValid)
			case StatMDEV, StatTDEV:
				edf = edfGreenhallRiley(alpha, 2, mi, 1, fm, nValid)
			case StatHDEV:
				edf = edfGreenhallRiley(alpha, 3, mi, fm, 1, nValid)
			case StatOHDEV:
				edf = edfGreenhallRiley(alpha, 3, mi, fm, fm, nValid)
			case StatTOTDEV:
				edf = edfTotdev(alpha, mi, nValid)
			}
			lo, hi := ConfidenceInterval(dev, edf, cl)
			res = append(res, Result{Tau: tau, M: mi, N: cnt, Value: dev, CILow: lo, CIHigh: hi, EDF: edf, Alpha: alpha})
		}
		out[si] = res
	}
	return out, nil
}

// clampAlpha keeps α inside the range where the variance family converges
// (α + 2d > 1, α ≤ 2).
func clampAlpha(a, d int) int {
	lo := 2 - 2*d
	if a < lo {
		return lo
	}
	if a > 2 {
		return 2
	}
	return a
}

func must(r []Result, err error) []Result {
	if err != nil {
		return nil
	}
	return r
}

// ADEV returns the non-overlapping Allan deviation of phase x (s) sampled
// at tau0 (s) at the averaging factors m; nil if tau0 or m is invalid.
func ADEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatADEV, x, tau0, m, nil))
}

// OADEV returns the overlapping Allan deviation (see ADEV).
func OADEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatOADEV, x, tau0, m, nil))
}

// MDEV returns the modified Allan deviation (see ADEV).
func MDEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatMDEV, x, tau0, m, nil))
}

// TDEV returns the time deviation in seconds (see ADEV).
func TDEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatTDEV, x, tau0, m, nil))
}

// HDEV returns the non-overlapping Hadamard deviation (see ADEV).
func HDEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatHDEV, x, tau0, m, nil))
}

// OHDEV returns the overlapping Hadamard deviation (see ADEV).
func OHDEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatOHDEV, x, tau0, m, nil))
}

// TOTDEV returns the total deviation (see ADEV).
func TOTDEV(x []float64, tau0 float64, m []int) []Result {
	return must(Compute(StatTOTDEV, x, tau0, m, nil))
}

// FreqToPhase integrates fractional frequency y (sampled at tau0 s) to
// phase (s): x_0 = 0, x_{i+1} = x_i + τ0·y_i, so len(x) = len(y) + 1. A gap
// y_i = NaN makes x_{i+1} NaN; the integration bridges it at the mean
// frequency of the valid data (common practice), so that later phase points
// stay defined.
func FreqToPhase(y []float64, tau0 float64) []float64 {
	mean, k := 0.0, 0
	for _, v := range y {
		if v == v {
			mean += v
			k++
		}
	}
	if k > 0 {
		mean /= float64(k)
	}
	x := make([]float64, len(y)+1)
	acc := 0.0
	for i, v := range y {
		if v == v {
			acc += tau0 * v
			x[i+1] = acc
		} else {
			acc += tau0 * mean
			x[i+1] = math.NaN()
		}
	}
	return x
}

// OctaveTaus returns m = 1, 2, 4, … up to the conventional maximum for
// statistic s and n phase points (m ≤ n/ratio, ratio 5 for ADEV/HDEV, 2 for
// TOTDEV, 4 otherwise; stability.md §2.9).
func OctaveTaus(n int, s Stat) []int {
	var out []int
	mmax := n / s.stopRatio()
	for m := 1; m <= mmax; m *= 2 {
		out = append(out, m)
	}
	return out
}

// DecadeTaus returns m = 1, 2, 5, 10, 20, 50, … up to the conventional
// maximum (see OctaveTaus).
func DecadeTaus(n int, s Stat) []int {
	var out []int
	mmax := n / s.stopRatio()
	for dec := 1; dec <= mmax; dec *= 10 {
		for _, k := range []int{1, 2, 5} {
			if m := k * dec; m <= mmax {
				out = append(out, m)
			}
		}
	}
	return out
}

// AllTaus returns every m = 1 … the conventional maximum (see OctaveTaus).
// The cost of a statistic on this grid grows as n².
func AllTaus(n int, s Stat) []int {
	mmax := n / s.stopRatio()
	out := make([]int, 0, max(mmax, 0))
	for m := 1; m <= mmax; m++ {
		out = append(out, m)
	}
	return out
}

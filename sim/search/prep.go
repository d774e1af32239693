package search

import (
	"fmt"
	"math"
	"slices"
	"sort"
)

// madScale is 1/Φ⁻¹(3/4), the factor that turns the median absolute
// deviation of Gaussian data into its standard deviation (checked against
// gonum's distuv.Normal quantile in TestMADScale).
const madScale = 1.482602218505602

// PseudoFrequency returns y(k) = [b(k+1) − b(k)]/step for k = 0..len(b)−2
// (dimensionless, for bias b in s and step in s). An interval with a
// missing (NaN) end is NaN, so differencing restarts after every gap.
func PseudoFrequency(b []float64, step float64) []float64 {
	if len(b) < 2 {
		return nil
	}
	y := make([]float64, len(b)-1)
	for k := range y {
		y[k] = (b[k+1] - b[k]) / step // NaN propagates from either end
	}
	return y
}

// RobustScale returns the normalised median absolute deviation
// 1.4826·median|x − median(x)| of the non-NaN values of x, and their median;
// both NaN when x has no value. scratch may be nil.
func RobustScale(x []float64, scratch []float64) (scale, median float64) {
	s := scratch[:0]
	for _, v := range x {
		if !math.IsNaN(v) {
			s = append(s, v)
		}
	}
	if len(s) == 0 {
		return math.NaN(), math.NaN()
	}
	med := medianInPlace(s)
	for i, v := range s {
		s[i] = math.Abs(v - med)
	}
	return madScale * medianInPlace(s), med
}

// medianInPlace returns the median of s (no NaN), reordering s. It selects
// the middle order statistic (Hoare's quickselect, expected O(n)) rather
// than sorting; the value is the same.
func medianInPlace(s []float64) float64 {
	n := len(s)
	hi := selectKth(s, n/2)
	if n%2 == 1 {
		return hi
	}
	// s[:n/2] now holds the n/2 smallest values.
	return 0.5 * (slices.Max(s[:n/2]) + hi)
}

// selectKth reorders s so that s[k] is its k-th smallest value (0-based),
// every value before it ≤ s[k] and every value after it ≥ s[k], and returns
// s[k]. Pivots are medians of three; after 64 rounds (adversarial input) it
// sorts what remains, which bounds the cost at O(n log n).
func selectKth(s []float64, k int) float64 {
	lo, hi := 0, len(s)-1
	for round := 0; lo < hi; round++ {
		if round == 64 {
			slices.Sort(s[lo : hi+1])
			break
		}
		mid := lo + (hi-lo)/2
		// Median of three to s[mid].
		if s[mid] < s[lo] {
			s[mid], s[lo] = s[lo], s[mid]
		}
		if s[hi] < s[lo] {
			s[hi], s[lo] = s[lo], s[hi]
		}
		if s[hi] < s[mid] {
			s[hi], s[mid] = s[mid], s[hi]
		}
		p := s[mid]
		i, j := lo, hi
		for i <= j {
			for s[i] < p {
				i++
			}
			for s[j] > p {
				j--
			}
			if i <= j {
				s[i], s[j] = s[j], s[i]
				i++
				j--
			}
		}
		// Now s[lo..j] ≤ p ≤ s[i..hi] and s[j+1..i−1] = p.
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return s[k]
		}
	}
	return s[k]
}

// ApplyInverse sets dst = C⁻¹v for C = diag(sigma2) + sigmaR2·11ᵀ with the
// closed-form Sherman–Morrison inverse
//
//	C⁻¹ = D⁻¹ − γ·D⁻¹11ᵀD⁻¹, γ = σ_r²/(1 + σ_r²·Σ_j 1/σ_j²),
//
// in O(len(v)) operations (detection.md §1.5 item 4). Entries of v that are
// NaN are treated as absent: the inverse is that of C restricted to the
// present entries, and dst is 0 there. Every sigma2 must be positive and
// sigmaR2 ≥ 0. len(dst), len(v) and len(sigma2) must be equal.
func ApplyInverse(dst, v, sigma2 []float64, sigmaR2 float64) {
	var wsum, wy float64
	for j, x := range v {
		if math.IsNaN(x) {
			continue
		}
		w := 1 / sigma2[j]
		wsum += w
		wy += w * x
	}
	g := sigmaR2 / (1 + sigmaR2*wsum)
	for j, x := range v {
		if math.IsNaN(x) {
			dst[j] = 0
			continue
		}
		dst[j] = (x - g*wy) / sigma2[j]
	}
}

// NoiseModel is the fitted noise of a network's pseudo-frequencies.
type NoiseModel struct {
	// Data lists the indices (in Network.Clocks) of the clocks used as data:
	// every clock but the reference, with at least one valid interval.
	Data []int
	// Sigma[i] is the own white-frequency scale σ_j of clock Data[i]
	// (dimensionless, per interval, after the optional AR filter).
	Sigma []float64
	// Total[i] is the robust scale of the clock's series, sqrt(σ_j² + σ_r²).
	Total []float64
	// SigmaRef is the scale σ_r of the common (reference-clock) term.
	SigmaRef float64
	// AR holds the whitening filter a (a[0] = 1), shared by every series:
	// e(k) = Σ_l a[l]·y(k − l). Length 1 without whitening.
	AR []float64
}

// maxPairs caps the number of clock pairs used to estimate σ_r².
const maxPairs = 600

// estimateCommon returns σ_r², the median over clock pairs of
// (s_i² + s_j² − s_{i−j}²)/2, clamped at 0. series are centred.
func estimateCommon(series [][]float64, total []float64) float64 {
	n := len(series)
	if n < 2 {
		return 0
	}
	// Each pair's estimate ½(total_i² + total_j² − Var(y_i − y_j)) has a
	// standard error of order total_i² + total_j² (times the relative
	// error of the robust scales, ~10 % for a few hundred samples), so
	// pairs of noisy clocks would swamp a common term near the quietest
	// clocks' level (a maser reference among maser stations under
	// Rb-clock satellites). The estimate is the precision-weighted median
	// over the pairs of the quietest clocks (all of them when they make at
	// most maxPairs pairs), weight 1/(total_i² + total_j²)².
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return total[order[a]] < total[order[b]] })
	k := n
	for k > 2 && k*(k-1)/2 > maxPairs {
		k--
	}
	type est struct{ v, w float64 }
	var ests []est
	diff := make([]float64, len(series[0]))
	scratch := make([]float64, 0, len(diff))
	for a := 0; a < k; a++ {
		for b := a + 1; b < k; b++ {
			i, j := order[a], order[b]
			for t := range diff {
				diff[t] = series[i][t] - series[j][t] // NaN if either missing
			}
			sd, _ := RobustScale(diff, scratch)
			s2 := total[i]*total[i] + total[j]*total[j]
			if math.IsNaN(sd) || !(s2 > 0) {
				continue
			}
			ests = append(ests, est{0.5 * (s2 - sd*sd), 1 / (s2 * s2)})
		}
	}
	if len(ests) == 0 {
		return 0
	}
	sort.Slice(ests, func(a, b int) bool { return ests[a].v < ests[b].v })
	var wsum float64
	for _, e := range ests {
		wsum += e.w
	}
	sr2, acc := ests[len(ests)-1].v, 0.0
	for _, e := range ests {
		if acc += e.w; acc >= 0.5*wsum {
			sr2 = e.v
			break
		}
	}
	// The model has total_i² = own_i² + σ_r² ≥ σ_r² for every clock: an
	// estimate near or above the quietest clock's total is estimation
	// noise, and taken at face value it would leave that clock almost no
	// own noise (an inflated weight). Cap it at 3/4 of the smallest total
	// variance, so no clock's own σ falls below half its total.
	m := math.Inf(1)
	for _, t := range total {
		if t > 0 {
			m = math.Min(m, t*t)
		}
	}
	if !math.IsInf(m, 1) {
		sr2 = math.Min(sr2, 0.75*m)
	}
	return math.Max(0, sr2)
}

// levinson solves the Yule–Walker equations for autocovariance r[0..p] by
// the Levinson–Durbin recursion and returns the prediction-error filter a
// (a[0] = 1, e(k) = Σ a[l]·x(k−l)). It stops early (shorter filter) if
// the recursion becomes unstable.
func levinson(r []float64, p int) []float64 {
	a := []float64{1}
	if p == 0 || !(r[0] > 0) {
		return a
	}
	e := r[0]
	for m := 1; m <= p; m++ {
		acc := r[m]
		for l := 1; l < m; l++ {
			acc += a[l] * r[m-l]
		}
		k := -acc / e
		if !(math.Abs(k) < 1) {
			break
		}
		na := make([]float64, m+1)
		na[0] = 1
		for l := 1; l < m; l++ {
			na[l] = a[l] + k*a[m-l]
		}
		na[m] = k
		a = na
		e *= 1 - k*k
	}
	return a
}

// filterAR returns e(k) = Σ_l a[l]·y(k−l), NaN where any input is missing
// (so the filter restarts after gaps).
func filterAR(y, a []float64) []float64 {
	e := make([]float64, len(y))
	p := len(a) - 1
	for k := range y {
		if k < p {
			e[k] = math.NaN()
			continue
		}
		s := 0.0
		for l, c := range a {
			s += c * y[k-l]
		}
		e[k] = s
	}
	return e
}

// series is the whitened data the scan correlates templates with.
type series struct {
	// zm[interval·nd + data clock]: z = C⁻¹·A·y and weight m. Interval
	// major, so the clocks a sweep touches at one t0 lie close in memory.
	zm []zm
	// The same, clock major: zz[data clock][interval] = z, mw[…][…] = m.
	zz, mw [][]float64
	// wc[data clock] is its weight m where present (1/σ_j², one value per
	// clock), and miss[data clock][k] counts its absent intervals before
	// interval k (length nInt + 1): [i, j) is complete iff miss[j] = miss[i].
	wc   []float64
	miss [][]int32
	nd   int       // data clocks
	zr   []float64 // reference: −1ᵀC⁻¹A·y
}

// prepared holds the whitened data of a network, ready for the bank scan.
type prepared struct {
	nInt  int       // number of intervals (epochs − 1)
	data  series    // from the clipped pseudo-frequencies (the statistic)
	raw   series    // from the unclipped ones (candidate amplitudes)
	w     []float64 // per interval: W = Σ_j present 1/σ_j²
	gamma []float64 // per interval: γ = σ_r²/(1 + σ_r²·W)
	// wrun[k] counts the changes of (W, γ) up to interval k: both are
	// constant over [i, j] iff wrun[i] = wrun[j].
	wrun  []int32
	noise NoiseModel
}

// prepare turns the bias series into whitened pseudo-frequencies.
//
// window is the coincidence half-window of the clipping, in intervals.
func prepare(net *Network, cfg *Config, window int) (*prepared, error) {
	nInt := net.Epochs() - 1
	var data []int
	var ys [][]float64
	for j := range net.Clocks {
		if j == net.Ref {
			continue
		}
		y := PseudoFrequency(net.Bias[j], net.Step)
		ok := false
		for _, v := range y {
			if !math.IsNaN(v) {
				ok = true
				break
			}
		}
		if !ok {
			continue
		}
		data = append(data, j)
		ys = append(ys, y)
	}
	if len(data) < 2 {
		return nil, fmt.Errorf("search: %d clocks with data besides the reference, need at least 2", len(data))
	}
	scratch := make([]float64, 0, nInt)
	// centre removes each series' median in place and returns the robust scales.
	centre := func(ys [][]float64) ([]float64, error) {
		total := make([]float64, len(ys))
		for i, y := range ys {
			s, med := RobustScale(y, scratch)
			if !(s > 0) {
				// A constant series (e.g. a second copy of the reference) carries no information.
				return nil, fmt.Errorf("search: clock %q: pseudo-frequency has zero robust scale (constant bias?)", net.Clocks[data[i]].ID)
			}
			total[i] = s
			for k := range y {
				y[k] -= med
			}
		}
		return total, nil
	}
	// clipped returns copies of ys winsorised at Clip robust σ, except
	// samples that are coherent: at least cfg.Coincidence distinct other
	// clocks also exceed Clip σ within ±window intervals (a sweep); those
	// are clipped only at 3× the others' Coincidence-th largest peak. A
	// wall's spikes (and the reference's own crossing, common to every
	// series) survive; single-clock phase jumps are clipped and isolated
	// outliers (a ± doublet) dropped.
	clipped := func(ys [][]float64, total []float64) [][]float64 {
		out := make([][]float64, len(ys))
		if !(cfg.Clip > 0) {
			for i, y := range ys {
				out[i] = slices.Clone(y)
			}
			return out
		}
		// cum[i][k]: clock i's exceedances of Clip σ before interval k.
		cum := make([][]int32, len(ys))
		for i, y := range ys {
			c := cfg.Clip * total[i]
			cu := make([]int32, nInt+1)
			for k, v := range y {
				cu[k+1] = cu[k]
				if math.Abs(v) > c {
					cu[k+1]++
				}
			}
			cum[i] = cu
		}
		peaks := make([]float64, 0, len(ys))
		for i, y := range ys {
			o := slices.Clone(y)
			c := cfg.Clip * total[i]
			for k, v := range o {
				if !(math.Abs(v) > c) {
					continue
				}
				lo, hi := max(0, k-window), min(nInt, k+window+1)
				// Peak |y| of every other clock exceeding inside the window.
				peaks = peaks[:0]
				for i2, y2 := range ys {
					if i2 == i || cum[i2][hi] == cum[i2][lo] {
						continue
					}
					pk := 0.0
					for _, v2 := range y2[lo:hi] {
						if a := math.Abs(v2); a > pk {
							pk = a
						}
					}
					peaks = append(peaks, pk)
				}
				if len(peaks) >= cfg.Coincidence {
					// Coherent across the network: keep, but no larger than
					// 3× the Coincidence-th largest peak of the others — a
					// wall gives every clock a similar |y| (K·ΔT/τ0), an
					// outlier inside a loud sweep does not.
					slices.Sort(peaks)
					cap := math.Max(c, 3*peaks[len(peaks)-cfg.Coincidence])
					o[k] = math.Max(-cap, math.Min(cap, v))
					continue
				}
				// An isolated outlier in the bias gives a doublet in the
				// pseudo-frequency: +Δ/τ0 then −Δ/τ0. Both intervals are
				// dropped (a gap) rather than clipped: two clipped spikes of
				// opposite sign would still fit a crossing of this clock
				// next to the reference's.
				if k+1 < len(y) {
					if w := y[k+1]; math.Abs(w) > c && (v > 0) != (w > 0) && math.Abs(v+w) < 0.25*math.Max(math.Abs(v), math.Abs(w)) {
						o[k], o[k+1] = math.NaN(), math.NaN()
						continue
					}
				}
				o[k] = math.Max(-c, math.Min(c, v))
			}
			out[i] = o
		}
		return out
	}
	total, err := centre(ys)
	if err != nil {
		return nil, err
	}
	a := []float64{1}
	if cfg.Whiten > 0 {
		// Pooled autocovariance of the normalised, clipped series.
		cy := clipped(ys, total)
		r := make([]float64, cfg.Whiten+1)
		for i, y := range cy {
			inv := 1 / (total[i] * total[i])
			for l := range r {
				var s float64
				var n int
				for k := l; k < len(y); k++ {
					if p := y[k] * y[k-l]; !math.IsNaN(p) {
						s += p
						n++
					}
				}
				if n > 0 {
					r[l] += inv * s / float64(n)
				}
			}
		}
		a = levinson(r, cfg.Whiten)
		for i := range ys {
			ys[i] = filterAR(ys[i], a)
		}
		if total, err = centre(ys); err != nil {
			return nil, err
		}
	}
	cy := clipped(ys, total)
	sr2 := estimateCommon(cy, total)
	nm := NoiseModel{Data: data, Sigma: make([]float64, len(data)), Total: total, SigmaRef: math.Sqrt(sr2), AR: a}
	sig2 := make([]float64, len(data))
	for i, s := range total {
		// The own variance cannot fall below 1 % of the total (guards an
		// over-estimated common term).
		sig2[i] = math.Max(s*s-sr2, 0.01*s*s)
		nm.Sigma[i] = math.Sqrt(sig2[i])
	}
	p := &prepared{nInt: nInt, noise: nm, w: make([]float64, nInt), gamma: make([]float64, nInt)}
	for k := range nInt {
		var wsum float64
		for i := range data {
			if !math.IsNaN(cy[i][k]) {
				wsum += 1 / sig2[i]
			}
		}
		p.w[k] = wsum
		p.gamma[k] = sr2 / (1 + sr2*wsum)
	}
	p.wrun = make([]int32, nInt)
	for k := 1; k < nInt; k++ {
		p.wrun[k] = p.wrun[k-1]
		if p.w[k] != p.w[k-1] || p.gamma[k] != p.gamma[k-1] {
			p.wrun[k]++
		}
	}
	p.data = whiten(cy, sig2, sr2, a)
	p.raw = whiten(ys, sig2, sr2, a)
	return p, nil
}

// whiten returns z = C⁻¹·e for the filtered series e = A·y (NaN = absent),
// the weights m, and the reference series −1ᵀC⁻¹e.
func whiten(es [][]float64, sig2 []float64, sr2 float64, a []float64) series {
	nd, nInt := len(es), len(es[0])
	zt := make([][]float64, nd)
	out := series{zm: make([]zm, nd*nInt), nd: nd}
	for i := range zt {
		zt[i] = make([]float64, nInt)
	}
	zrt := make([]float64, nInt)
	col := make([]float64, nd)
	res := make([]float64, nd)
	for k := range nInt {
		for i := range es {
			col[i] = es[i][k]
		}
		ApplyInverse(res, col, sig2, sr2)
		var wsum, ysum float64
		for i := range es {
			zt[i][k] = res[i]
			if !math.IsNaN(col[i]) {
				w := 1 / sig2[i]
				out.zm[k*nd+i].m = w
				wsum += w
				ysum += w * col[i]
			}
		}
		zrt[k] = -ysum / (1 + sr2*wsum) // −1ᵀC⁻¹e
	}
	// The templates are filtered by A too (newKernel), so the numerator is
	// (A·u)ᵀ·C⁻¹·(A·y): z is used as it is.
	for i := range es {
		for k, v := range zt[i] {
			out.zm[k*nd+i].z = v
		}
	}
	out.zr = zrt
	out.zz, out.mw = make([][]float64, nd), make([][]float64, nd)
	out.wc, out.miss = make([]float64, nd), make([][]int32, nd)
	for i := range out.zz {
		zz, mw, miss := make([]float64, nInt), make([]float64, nInt), make([]int32, nInt+1)
		for k := range nInt {
			zz[k], mw[k] = out.zm[k*nd+i].z, out.zm[k*nd+i].m
			miss[k+1] = miss[k]
			if mw[k] == 0 {
				miss[k+1]++
			}
		}
		out.zz[i], out.mw[i], out.miss[i] = zz, mw, miss
		out.wc[i] = 1 / sig2[i]
	}
	return out
}

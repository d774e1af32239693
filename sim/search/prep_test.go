package search

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// denseInverseApply sets dst = C⁻¹v with C = diag(sig2) + sr2·11ᵀ formed
// explicitly and inverted by gonum's LU-based mat.Dense.Inverse.
func denseInverseApply(dst, v, sig2 []float64, sr2 float64) {
	n := len(v)
	c := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			c.Set(i, j, sr2)
		}
		c.Set(i, i, sig2[i]+sr2)
	}
	var inv mat.Dense
	if err := inv.Inverse(c); err != nil {
		panic(err)
	}
	var out mat.VecDense
	out.MulVec(&inv, mat.NewVecDense(n, append([]float64(nil), v...)))
	for i := range n {
		dst[i] = out.AtVec(i)
	}
}

// TestApplyInverseAgainstDense checks the Sherman–Morrison closed form
// against gonum's general matrix inverse, with and without absent entries.
func TestApplyInverseAgainstDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for trial := range 20 {
		n := 2 + rng.IntN(60)
		sig2 := make([]float64, n)
		v := make([]float64, n)
		for i := range n {
			sig2[i] = math.Pow(10, -24+2*rng.Float64()) // (1e-12 … 1e-11)²
			v[i] = 1e-12 * rng.NormFloat64()
		}
		sr2 := []float64{0, 1e-26, 1e-24, 1e-22}[trial%4]
		got := make([]float64, n)
		ApplyInverse(got, v, sig2, sr2)
		want := make([]float64, n)
		denseInverseApply(want, v, sig2, sr2)
		for i := range n {
			if !scalar.EqualWithinAbsOrRel(got[i], want[i], 1e-9*math.Abs(want[i])+1e-300, 1e-8) {
				t.Fatalf("trial %d (n=%d, σ_r²=%g): C⁻¹v[%d] = %g, dense inverse %g", trial, n, sr2, i, got[i], want[i])
			}
		}
		// Absent entries: compare with the dense inverse of the submatrix.
		miss := rng.IntN(n)
		v[miss] = math.NaN()
		ApplyInverse(got, v, sig2, sr2)
		var sv, ss []float64
		for i := range n {
			if i != miss {
				sv = append(sv, v[i])
				ss = append(ss, sig2[i])
			}
		}
		sub := make([]float64, n-1)
		denseInverseApply(sub, sv, ss, sr2)
		if got[miss] != 0 {
			t.Fatalf("absent entry gives %g, want 0", got[miss])
		}
		for i, k := 0, 0; i < n; i++ {
			if i == miss {
				continue
			}
			if !scalar.EqualWithinAbsOrRel(got[i], sub[k], 1e-300, 1e-8) {
				t.Fatalf("trial %d with entry %d absent: C⁻¹v[%d] = %g, dense %g", trial, miss, i, got[i], sub[k])
			}
			k++
		}
	}
}

// TestMADScale checks the MAD normalisation against 1/Φ⁻¹(3/4) from gonum's
// normal quantile, and RobustScale on a seeded normal sample.
func TestMADScale(t *testing.T) {
	want := 1 / distuv.UnitNormal.Quantile(0.75)
	if !scalar.EqualWithinAbsOrRel(madScale, want, 0, 1e-14) {
		t.Fatalf("madScale = %.16g, 1/Φ⁻¹(0.75) = %.16g", madScale, want)
	}
	rng := rand.New(rand.NewPCG(2, 3))
	x := make([]float64, 20000)
	for i := range x {
		x[i] = 3 + 2*rng.NormFloat64()
		if i%50 == 0 {
			x[i] = math.NaN()
		}
	}
	s, med := RobustScale(x, nil)
	// The MAD estimator's standard error is ≈ 1.65σ/√n (asymptotic
	// efficiency 37 %, from memory): 0.023 here; allow 4 of them.
	if math.Abs(s-2) > 0.1 || math.Abs(med-3) > 0.05 {
		t.Fatalf("RobustScale = %g (median %g), want ≈ 2 (3)", s, med)
	}
}

func TestPseudoFrequencyRestartsAtGaps(t *testing.T) {
	b := []float64{0, 30e-12, 60e-12, math.NaN(), 90e-12, 150e-12}
	y := PseudoFrequency(b, 30)
	want := []float64{1e-12, 1e-12, math.NaN(), math.NaN(), 2e-12}
	for k := range want {
		if math.IsNaN(want[k]) != math.IsNaN(y[k]) || (!math.IsNaN(want[k]) && !scalar.EqualWithinAbsOrRel(y[k], want[k], 1e-27, 1e-12)) {
			t.Fatalf("y = %v, want %v", y, want)
		}
	}
}

// TestLevinsonAR1 checks the Yule–Walker solution for an AR(1)
// autocovariance r(l) = φ^l, whose prediction-error filter is [1, −φ, 0]
// (Box & Jenkins, AR(1) partial autocorrelation vanishes beyond lag 1; from memory).
func TestLevinsonAR1(t *testing.T) {
	phi := 0.6
	a := levinson([]float64{1, phi, phi * phi, phi * phi * phi}, 3)
	want := []float64{1, -phi, 0, 0}
	for i := range want {
		if !scalar.EqualWithinAbs(a[i], want[i], 1e-12) {
			t.Fatalf("filter %v, want %v", a, want)
		}
	}
}

// TestCommonModeEstimate checks that σ_r and σ_j are recovered from
// simulated "clock minus reference" white noise.
func TestCommonModeEstimate(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	o := defaultSynth()
	o.epochs = 2000
	o.sigmaRef = 8e-13
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	cfg, _ := Config{}.withDefaults()
	p, err := prepare(sn.net, &cfg, 12)
	if err != nil {
		t.Fatal(err)
	}
	if r := p.noise.SigmaRef / o.sigmaRef; math.Abs(r-1) > 0.15 {
		t.Errorf("σ_r = %g, want %g", p.noise.SigmaRef, o.sigmaRef)
	}
	for i, j := range p.noise.Data {
		// σ_j² = s_j² − σ_r² inherits the error of both terms: scale the
		// 8 % tolerance by s_j²/σ_j².
		tol := 0.08 * p.noise.Total[i] * p.noise.Total[i] / (sn.sigma[j] * sn.sigma[j])
		if r := p.noise.Sigma[i] / sn.sigma[j]; math.Abs(r-1) > tol {
			t.Errorf("clock %s: σ = %g, want %g", sn.net.Clocks[j].ID, p.noise.Sigma[i], sn.sigma[j])
		}
	}
	t.Logf("σ_r estimated %.3g (true %.3g)", p.noise.SigmaRef, o.sigmaRef)
}

// TestCoherentClipping: an excursion in one clock is clipped, the same
// excursion in several clocks within the sweep window is kept.
func TestCoherentClipping(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	o := defaultSynth()
	o.epochs = 400
	sn, phase := newSynth(rng, o)
	// Outlier: a 30σ frequency spike in clock 0 alone at interval 100.
	for k := 101; k < o.epochs; k++ {
		phase[0][k] += 30 * o.sigmaSat * o.step
	}
	// Coherent: the same spike in clocks 1..5 within 3 intervals at 250.
	for j := 1; j <= 5; j++ {
		for k := 250 + j%3 + 1; k < o.epochs; k++ {
			phase[j][k] += 30 * o.sigmaSat * o.step
		}
	}
	// A later isolated outlier in clock 1, which took part in the sweep.
	for k := 351; k < o.epochs; k++ {
		phase[1][k] += 30 * o.sigmaSat * o.step
	}
	// An outlier 100× larger in clock 6 inside that sweep.
	for k := 254; k < o.epochs; k++ {
		phase[6][k] += 3000 * o.sigmaSat * o.step
	}
	sn.finish(rng, o, phase)
	cfg, _ := Config{}.withDefaults()
	p, err := prepare(sn.net, &cfg, 6)
	if err != nil {
		t.Fatal(err)
	}
	// data[0] is clock 0: its whitened spike is clipped (≤ 8σ/σ² scale),
	// the raw one is not.
	z := func(ser series, c, k int) float64 { return ser.zm[k*ser.nd+c].z * p.noise.Sigma[c] }
	if a, b := math.Abs(z(p.data, 0, 100)), math.Abs(z(p.raw, 0, 100)); !(a < 10 && b > 25) {
		t.Errorf("isolated 30σ spike: clipped %.1f σ, raw %.1f σ; want clipped ≤ 10, raw ≈ 30", a, b)
	}
	for j := 1; j <= 5; j++ {
		k := 250 + j%3
		if a := math.Abs(z(p.data, j, k)); a < 25 {
			t.Errorf("coherent spike in clock %d at %d: %.1f σ after clipping, want ≈ 30", j, k, a)
		}
	}
	if a := math.Abs(z(p.data, 1, 350)); a > 10 {
		t.Errorf("isolated spike after a coherent one in the same clock: %.1f σ after clipping, want ≤ 10", a)
	}
	// Clipped at 3× the others' 4th-largest peak (≈ 30σ): ≤ ≈ 100σ, not 3000σ.
	if a := math.Abs(z(p.data, 6, 253)); a > 120 || a < 60 {
		t.Errorf("outlier inside the sweep: %.0f σ after clipping, want ≈ 90", a)
	}
}

// TestCommonModeMaserNetwork: a maser reference among maser stations under
// 100× noisier satellites, one hour of 30 s data (a campaign trial). The
// pairwise estimate of σ_r must come from the quiet clocks: taken from
// every pair it was noise-dominated, and once it exceeded a station's
// total variance that station kept only 1 % of its own noise and
// noise-only data reached |SNR| ≈ 26 on a 600-template bank. Here the
// estimate stays near the truth and no clock's own σ falls below half its
// total, and the loudest noise-only statistic of the bank stays below 6.5.
func TestCommonModeMaserNetwork(t *testing.T) {
	o := defaultSynth()
	o.epochs, o.stations = 120, 8
	o.sigmaSat, o.sigmaSta, o.sigmaRef = 1.8e-13, 1e-14, 1e-14
	var worstStat, sumRatio float64
	const seeds = 8
	for seed := range uint64(seeds) {
		rng := rand.New(rand.NewPCG(77, seed))
		sn, phase := newSynth(rng, o)
		sn.finish(rng, o, phase)
		cfg, _ := Config{}.withDefaults()
		p, err := prepare(sn.net, &cfg, 12)
		if err != nil {
			t.Fatal(err)
		}
		sumRatio += p.noise.SigmaRef / o.sigmaRef
		for i := range p.noise.Data {
			if p.noise.Sigma[i] < 0.5*p.noise.Total[i]*(1-1e-12) {
				t.Errorf("seed %d, clock %d: own σ %.3g below half its total %.3g", seed, i, p.noise.Sigma[i], p.noise.Total[i])
			}
		}
		res, err := Search(sn.net, Config{Directions: 150, Speeds: []float64{150e3, 300e3}, Threshold: 100, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range res.Stat {
			worstStat = math.Max(worstStat, s)
		}
	}
	mean := sumRatio / seeds
	t.Logf("σ_r estimate / truth, mean over %d seeds: %.2f; loudest noise-only |SNR| %.2f", seeds, mean, worstStat)
	if mean < 0.6 || mean > 1.4 {
		t.Errorf("σ_r estimate / truth = %.2f on average, want within 40 %%", mean)
	}
	if worstStat > 6.5 {
		t.Errorf("loudest noise-only statistic %.2f over 600 templates × 240 t0 × %d seeds", worstStat, seeds)
	}
}

// TestOutlierDoubletDropped: isolated outliers in the bias of precise
// station clocks (a ± doublet in the pseudo-frequency) do not make
// candidates: with them clipped instead of dropped, two of them inside one
// sweep reached |SNR| ≈ 17 on the demo network.
func TestOutlierDoubletDropped(t *testing.T) {
	o := defaultSynth()
	o.epochs, o.stations = 240, 12
	o.sigmaSat, o.sigmaSta, o.sigmaRef = 1.8e-13, 1e-14, 1e-14
	nsat := o.planes * o.perPlane
	worst := 0.0
	for seed := range uint64(4) {
		rng := rand.New(rand.NewPCG(91, seed))
		sn, phase := newSynth(rng, o)
		sn.finish(rng, o, phase)
		// 7 ns outliers (≈ 20 000 σ per interval) in two stations 8
		// epochs (240 s) apart, as in the demo's nuisances.
		sn.net.Bias[nsat+3][100] += 7e-9
		sn.net.Bias[nsat+7][108] -= 7e-9
		res, err := Search(sn.net, Config{Directions: 150, Speeds: []float64{200e3, 330e3}, Threshold: 100, Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range res.Stat {
			worst = math.Max(worst, s)
		}
	}
	t.Logf("loudest |SNR| with two station outliers: %.2f", worst)
	if worst > 6.5 {
		t.Errorf("two isolated outliers give |SNR| %.2f, want noise-like (< 6.5)", worst)
	}
}

// TestMedianSelect checks the quickselect median against the sorted
// definition on random, tied, sorted and reversed inputs of odd and even
// length.
func TestMedianSelect(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 400 {
		n := 1 + rng.IntN(300)
		x := make([]float64, n)
		for i := range x {
			switch trial % 4 {
			case 0:
				x[i] = rng.NormFloat64()
			case 1:
				x[i] = float64(rng.IntN(4)) // many ties
			case 2:
				x[i] = float64(i)
			case 3:
				x[i] = float64(n - i)
			}
		}
		ref := slices.Clone(x)
		slices.Sort(ref)
		want := ref[n/2]
		if n%2 == 0 {
			want = 0.5 * (ref[n/2-1] + ref[n/2])
		}
		if got := medianInPlace(slices.Clone(x)); got != want {
			t.Fatalf("trial %d (n=%d): median %g, want %g", trial, n, got, want)
		}
		k := rng.IntN(n)
		y := slices.Clone(x)
		if got := selectKth(y, k); got != ref[k] {
			t.Fatalf("trial %d: select(%d) = %g, want %g", trial, k, got, ref[k])
		}
		for i := range y {
			if (i < k && y[i] > ref[k]) || (i > k && y[i] < ref[k]) {
				t.Fatalf("trial %d: not partitioned around %d", trial, k)
			}
		}
	}
}

package noise

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestZigguratTables: the solved r agrees with Marsaglia & Tsang's
// published 256-region value 3.6541528853610088 (2000, from memory) and
// v with r f(r) + ∫_r^∞ f (math.Erfc); every one of the zigN regions —
// the base strip with its tail, the rectangles and the top cap — has area
// v to 1e-12 relative, and each fast bound is the ratio of the region's
// inner to outer edge, rounded down.
func TestZigguratTables(t *testing.T) {
	if math.Abs(zigR-3.6541528853610088) > 1e-9 {
		t.Errorf("r = %.17g, want 3.6541528853610088", zigR)
	}
	f := func(x float64) float64 { return math.Exp(-0.5 * x * x) }
	tail := math.Sqrt(math.Pi/2) * math.Erfc(zigR/math.Sqrt2)
	if base := zigW[0] * zigM * f(zigR); math.Abs(base/zigV-1) > 1e-12 {
		t.Errorf("base strip area %.15g, want %.15g", base, zigV)
	}
	if s := zigR*f(zigR) + tail; math.Abs(s/zigV-1) > 1e-12 {
		t.Errorf("rectangle under the strip + tail %.15g, want %.15g", s, zigV)
	}
	x1 := zigW[1] * zigM
	if top := x1 * (1 - f(x1)); math.Abs(top/zigV-1) > 1e-12 {
		t.Errorf("top cap area %.15g, want %.15g", top, zigV)
	}
	if zigW[zigN-1]*zigM != zigR || zigK[1] != 0 {
		t.Errorf("x_(N−1) = %g, K_1 = %d", zigW[zigN-1]*zigM, zigK[1])
	}
	for i := 2; i < zigN; i++ {
		xi, xp := zigW[i]*zigM, zigW[i-1]*zigM
		if a := xi * (zigF[i-1] - zigF[i]); math.Abs(a/zigV-1) > 1e-12 {
			t.Fatalf("rectangle %d area %.15g, want %.15g", i, a, zigV)
		}
		if k := float64(zigK[i]) / zigM; k > xp/xi || xp/xi-k > 1e-9 {
			t.Fatalf("fast bound %d = %.12g, want ≤ %.12g", i, k, xp/xi)
		}
	}
}

// ksStat returns the Kolmogorov–Smirnov distance of the sorted sample s
// from the continuous CDF cdf.
func ksStat(s []float64, cdf func(float64) float64) float64 {
	n := float64(len(s))
	d := 0.0
	for i, x := range s {
		f := cdf(x)
		d = max(d, f-float64(i)/n, float64(i+1)/n-f)
	}
	return d
}

// ksCrit is the asymptotic 0.1 % critical value of √n·D, K(1.9495) = 0.999
// for Kolmogorov's limit distribution (e.g. Marsaglia, Tsang & Wang 2003,
// "Evaluating Kolmogorov's Distribution", J. Stat. Softw. 8(18)).
const ksCrit = 1.9495

// TestFillNormalDistribution: 4·10⁶ deviates against the standard normal
// CDF (gonum distuv.Normal): Kolmogorov–Smirnov on the whole sample and on
// the tail beyond r (the tail algorithm alone), a χ² test over 182 bins
// out to ±4.5 σ and beyond (0.1 % level from gonum's χ² quantile), and the
// counts beyond 4 σ and 5 σ within 4 binomial standard deviations.
func TestFillNormalDistribution(t *testing.T) {
	const n = 4_000_000
	rng := rand.New(rand.NewPCG(2024, 11))
	x := make([]float64, n)
	fillNormal(rng, x[:1001], 1) // odd lengths and restarts must chain
	fillNormal(rng, x[1001:], 1)
	norm := distuv.UnitNormal
	s := slices.Clone(x)
	slices.Sort(s)
	if d := ksStat(s, norm.CDF); d*math.Sqrt(n) > ksCrit {
		t.Errorf("KS: √n·D = %.3f > %.3f", d*math.Sqrt(n), ksCrit)
	}
	// tail beyond r, both signs folded: F(x | x > r) = 1 − Q(x)/Q(r)
	var tail []float64
	for _, v := range s {
		if math.Abs(v) > zigR {
			tail = append(tail, math.Abs(v))
		}
	}
	slices.Sort(tail)
	qr := norm.Survival(zigR)
	if len(tail) < 1000 {
		t.Fatalf("%d tail values", len(tail))
	}
	if d := ksStat(tail, func(v float64) float64 { return 1 - norm.Survival(v)/qr }); d*math.Sqrt(float64(len(tail))) > ksCrit {
		t.Errorf("tail KS: √n·D = %.3f > %.3f (%d values)", d*math.Sqrt(float64(len(tail))), ksCrit, len(tail))
	}
	// χ²: bins of 0.05 over [−4.5, 4.5] plus the two tails
	edges := []float64{math.Inf(-1)}
	for k := -90; k <= 90; k++ {
		edges = append(edges, float64(k)*0.05)
	}
	edges = append(edges, math.Inf(1))
	counts := make([]int, len(edges)-1)
	j := 0
	for _, v := range s {
		for v >= edges[j+1] {
			j++
		}
		counts[j]++
	}
	chi2 := 0.0
	for b, c := range counts {
		e := n * (norm.CDF(edges[b+1]) - norm.CDF(edges[b]))
		chi2 += (float64(c) - e) * (float64(c) - e) / e
	}
	df := float64(len(counts) - 1)
	if crit := (distuv.ChiSquared{K: df}).Quantile(0.999); chi2 > crit {
		t.Errorf("χ² = %.1f over %d bins, 0.1 %% critical %.1f", chi2, len(counts), crit)
	}
	for _, z := range []float64{4, 5} {
		p := 2 * norm.Survival(z)
		c := 0
		for _, v := range x {
			if math.Abs(v) > z {
				c++
			}
		}
		if e, sd := n*p, math.Sqrt(n*p*(1-p)); math.Abs(float64(c)-e) > 4*sd {
			t.Errorf("|x| > %g: %d, expected %.1f ± %.1f", z, c, e, sd)
		}
	}
}

// TestFillNormalDeterministic: the values depend only on the rng state,
// one Uint64 per two values on the fast path.
func TestFillNormalDeterministic(t *testing.T) {
	a := make([]float64, 5000)
	b := make([]float64, 5000)
	fillNormal(rand.New(rand.NewPCG(9, 9)), a, 1)
	fillNormal(rand.New(rand.NewPCG(9, 9)), b, 1)
	if !slices.Equal(a, b) {
		t.Fatal("same seed, different values")
	}
	// the first value comes from the low half of the first Uint64
	u := uint32(rand.New(rand.NewPCG(9, 9)).Uint64())
	if t0 := u&0x7fffff00 | 128; t0 < zigK[u&(zigN-1)] {
		want := float64(t0) * zigW[u&(zigN-1)]
		if u>>31 != 0 {
			want = -want
		}
		if a[0] != want {
			t.Fatalf("first value %g, want %g", a[0], want)
		}
	}
}

func BenchmarkFillNormal(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	buf := make([]float64, 4096)
	for b.Loop() {
		fillNormal(rng, buf, 1)
	}
	b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/float64(len(buf)), "ns/normal")
}

func BenchmarkNormFloat64(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	s := 0.0
	for b.Loop() {
		s += rng.NormFloat64()
	}
	sinkF = s
	b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N), "ns/normal")
}

var sinkF float64

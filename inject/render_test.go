package inject

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// quadrature integrates the instantaneous frequency of c over [a, b] with
// gonum's fixed Gauss–Legendre rule on sub-intervals of at most τ/4, split
// at the top-hat edges so that every piece is smooth.
func quadrature(c Crossing, a, b float64) float64 {
	cuts := []float64{a}
	if c.Profile == ProfileTopHat {
		for _, e := range []float64{c.TCross - c.Tau/2, c.TCross + c.Tau/2} {
			if e > a && e < b {
				cuts = append(cuts, e)
			}
		}
	}
	cuts = append(cuts, b)
	sum := 0.0
	for i := 0; i+1 < len(cuts); i++ {
		lo, hi := cuts[i], cuts[i+1]
		n := int(math.Ceil((hi-lo)/(c.Tau/4))) + 1
		h := (hi - lo) / float64(n)
		for k := range n {
			sum += quad.Fixed(c.FrequencyAt, lo+float64(k)*h, lo+float64(k+1)*h, 20, nil, 0)
		}
	}
	return sum
}

// The rendered phase is the exact integral of the rendered frequency, for
// every profile, checked against independent numerical quadrature
// (gonum integrate/quad) to 1e-9 relative.
func TestPhaseIsIntegralOfFrequency(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat, ProfileKinkLinear} {
		for trial := range 20 {
			tau := math.Pow(10, -1+4*rng.Float64()) // 0.1 s … 1000 s
			c := Crossing{Clock: "X", TCross: 1000 * rng.Float64(), Tau: tau, Profile: p,
				Scale: (rng.Float64() - 0.5) * 1e-12}
			a := c.TCross + tau*(-6+8*rng.Float64())
			b := a + tau*(0.01+5*rng.Float64())
			want := quadrature(c, a, b)
			got := c.PhaseAt(b) - c.PhaseAt(a)
			mean := c.MeanFrequency(a, b) * (b - a)
			scaleRef := math.Abs(c.Scale) * tau * 1e-9 // absolute floor: 1e-9 of the pulse scale
			if !scalar.EqualWithinAbsOrRel(got, want, scaleRef*1e-3, 1e-9) {
				t.Errorf("%v trial %d: X(b)−X(a) = %.15g s, quadrature %.15g s", p, trial, got, want)
			}
			if !scalar.EqualWithinAbsOrRel(mean, want, scaleRef*1e-3, 1e-9) {
				t.Errorf("%v trial %d: mean frequency × Δt = %.15g s, quadrature %.15g s", p, trial, mean, want)
			}
			// From −∞: the pulse is negligible before −40τ (e^{−80} for the kinks).
			from := c.TCross - 40*tau
			if p == ProfileGaussian {
				from = c.TCross - 7*tau // e^{−49}
			}
			if got, want := c.PhaseAt(b), quadrature(c, from, b); !scalar.EqualWithinAbsOrRel(got, want, scaleRef*1e-3, 1e-9) {
				t.Errorf("%v trial %d: X(b) = %.15g s, quadrature from −∞ %.15g s", p, trial, got, want)
			}
		}
	}
}

// A wall much thinner than the sample interval (d/v ≪ τ0) keeps its full area
// in the interval-averaged frequency: Σ_k ȳ_k·τ0 = step, and all of it lies in
// the one or two intervals around the crossing.
func TestThinWallKeepsArea(t *testing.T) {
	const tau0 = 30.0
	times := make([]float64, 101)
	for k := range times {
		times[k] = float64(k) * tau0
	}
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat} {
		for _, tc := range []float64{1500, 1515.3, 1499.9999} {
			c := Crossing{Clock: "X", TCross: tc, Tau: 1e-3, Profile: p, Scale: 3e-13}
			y := make([]float64, len(times)-1)
			if err := RenderFrequency(y, times, c); err != nil {
				t.Fatal(err)
			}
			sum, nonzero := 0.0, 0
			for _, v := range y {
				sum += v * tau0
				if v != 0 {
					nonzero++
				}
			}
			if !scalar.EqualWithinRel(sum, c.Step(), 1e-12) {
				t.Errorf("%v at %g s: Σ ȳ·τ0 = %g s, step %g s", p, tc, sum, c.Step())
			}
			if nonzero == 0 || nonzero > 2 {
				t.Errorf("%v at %g s: %d intervals carry signal, want 1 or 2", p, tc, nonzero)
			}
			// Point sampling at the epochs would miss a crossing between them entirely.
			if tc == 1515.3 {
				for _, tt := range times {
					if c.FrequencyAt(tt) != 0 {
						t.Errorf("%v: point sample at %g s non-zero", p, tt)
					}
				}
			}
		}
	}
}

// RenderPhase adds (not overwrites) and matches PhaseAt; the grid version agrees.
func TestRenderPhaseAdds(t *testing.T) {
	c := Crossing{Clock: "X", TCross: 50, Tau: 7, Profile: ProfileGaussian, Scale: 1e-13}
	times := []float64{0, 30, 60, 90}
	dst := []float64{1, 2, 3, 4}
	if err := RenderPhase(dst, times, c); err != nil {
		t.Fatal(err)
	}
	grid := []float64{1, 2, 3, 4}
	if err := RenderPhaseGrid(grid, 0, 30, c); err != nil {
		t.Fatal(err)
	}
	for k := range dst {
		want := float64(k+1) + c.PhaseAt(times[k])
		if dst[k] != want || grid[k] != want {
			t.Errorf("k=%d: RenderPhase %g, grid %g, want %g", k, dst[k], grid[k], want)
		}
	}
	y := []float64{0.5, 0.5, 0.5}
	if err := RenderFrequency(y, times, c); err != nil {
		t.Fatal(err)
	}
	for k := range y {
		if want := 0.5 + c.MeanFrequency(times[k], times[k+1]); y[k] != want {
			t.Errorf("interval %d: RenderFrequency %g, MeanFrequency %g", k, y[k], want)
		}
	}
	if err := RenderPhase(dst[:2], times, c); err == nil {
		t.Error("length mismatch accepted")
	}
	if err := RenderFrequency(dst[:2], times, c); err == nil {
		t.Error("frequency length mismatch accepted")
	}
	if err := RenderFrequency(dst[:3], []float64{0, 30, 30, 60}, c); err == nil {
		t.Error("non-increasing epochs accepted")
	}
	bad := c
	bad.Tau = 0
	if err := RenderPhase(dst, times, bad); err == nil {
		t.Error("zero time scale accepted")
	}
}

// Far in the tails the interval average is computed without cancellation:
// it matches the asymptotic Gaussian tail integral.
func TestMeanFrequencyTail(t *testing.T) {
	c := Crossing{Clock: "X", TCross: 0, Tau: 1, Profile: ProfileGaussian, Scale: 1}
	// ∫_a^b e^{−u²} du for a = 8, b = 8.5: (√π/2)(erfc 8 − erfc 8.5).
	want := sqrtPiHalf * (math.Erfc(8) - math.Erfc(8.5)) / 0.5
	if got := c.MeanFrequency(8, 8.5); !scalar.EqualWithinRel(got, want, 1e-14) {
		t.Errorf("tail mean %g, want %g", got, want)
	}
	if got := c.MeanFrequency(-8.5, -8); !scalar.EqualWithinRel(got, want, 1e-14) {
		t.Errorf("leading tail mean %g, want %g", got, want)
	}
	k := Crossing{Clock: "X", TCross: 0, Tau: 1, Profile: ProfileKink, Scale: 1}
	// ∫_a^b −sech² = −(tanh b − tanh a), with 1 − tanh u = 2/(1 + e^{2u})
	wantK := -(2/(1+math.Exp(20)) - 2/(1+math.Exp(22))) / 1
	if got := k.MeanFrequency(10, 11); !scalar.EqualWithinRel(got, wantK, 1e-13) {
		t.Errorf("kink tail mean %g, want %g", got, wantK)
	}
}

// Very short intervals (τ0 ≪ τ) keep full relative precision: the mean over
// [u, u+h] tends to s(mid) with the O(h²) curvature term s″·h²/24.
func TestMeanFrequencyShortInterval(t *testing.T) {
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileKinkLinear} {
		c := Crossing{Clock: "X", TCross: 0, Tau: 1, Profile: p, Scale: 1}
		for _, u := range []float64{-1.3, -0.2, 0, 0.45, 2.1} {
			for _, h := range []float64{1e-3, 1e-6, 1e-9} {
				mid := u + h/2
				// second derivative by central differences at step 1e-3
				d2 := (p.Shape(mid+1e-3) - 2*p.Shape(mid) + p.Shape(mid-1e-3)) / 1e-6
				want := p.Shape(mid) + d2*h*h/24
				if got := c.MeanFrequency(u, u+h); !scalar.EqualWithinAbsOrRel(got, want, 1e-15, 1e-12) {
					t.Errorf("%v u=%g h=%g: mean %.17g, want %.17g", p, u, h, got, want)
				}
			}
		}
		// Continuity across the switch between the two methods at h = 1e-2.
		a := c.MeanFrequency(0.3, 0.3+0.0099999)
		b := c.MeanFrequency(0.3, 0.3+0.0100001)
		if math.Abs(a-b) > 1e-6*math.Abs(a)+1e-15 {
			t.Errorf("%v: jump across the method switch %g vs %g", p, a, b)
		}
	}
}

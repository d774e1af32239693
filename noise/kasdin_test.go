package noise

import (
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"
)

// directConv is the O(n²) definition x_k = Σ_{j≤k} h_j v_{k−j} with the
// a = 1 Kasdin impulse response.
func directConv(v []float64) []float64 {
	h := KasdinImpulse(1, len(v))
	out := make([]float64, len(v))
	for k := range v {
		s := 0.0
		for j := 0; j <= k; j++ {
			s += h[j] * v[k-j]
		}
		out[k] = s
	}
	return out
}

// TestFlickerConvolution: the packed, pruned FFT convolution reproduces the
// direct linear convolution, for white input and for the summed
// (random-walk) input used by flicker FM.
func TestFlickerConvolution(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for _, n := range []int{1, 2, 3, 5, 64, 100, 300, 1000, 1024, 1500} {
		for _, walk := range []bool{false, true} {
			v := make([]float64, n)
			c := 0.0
			for i := range v {
				if walk {
					c += rng.NormFloat64()
					v[i] = c
				} else {
					v[i] = rng.NormFloat64()
				}
			}
			want := directConv(v)
			var g flickerConv
			in := g.input(n)
			copy(in, v)
			got := make([]float64, n)
			g.apply(got)
			rms := 0.0
			for _, w := range want {
				rms += w * w
			}
			rms = math.Sqrt(rms / float64(n))
			for k := range got {
				if math.Abs(got[k]-want[k]) > 1e-11*rms {
					t.Fatalf("n=%d walk=%v: x[%d] = %.15g, want %.15g", n, walk, k, got[k], want[k])
				}
			}
		}
	}
}

// TestGeneratorMatchesPhase: a reused Generator gives the same bits as
// ClockModel.Phase, call after call, also when the model changes.
func TestGeneratorMatchesPhase(t *testing.T) {
	models := []ClockModel{
		{H: [5]float64{1e-25, 1e-24, 1e-23, 1e-28, 1e-34}, Drift: 1e-18},
		{H: [5]float64{0, 0, 1e-23, 0, 0}},
		{H: [5]float64{0, 3e-24, 0, 2e-29, 0}},
	}
	g := NewGenerator(777)
	for round := range 2 {
		for i, m := range models {
			a := m.Phase(rand.New(rand.NewPCG(uint64(i), uint64(round))), 777, 30)
			b := g.Phase(m, rand.New(rand.NewPCG(uint64(i), uint64(round))), 30)
			for k := range a {
				if a[k] != b[k] {
					t.Fatalf("round %d model %d: sample %d differs: %g vs %g", round, i, k, a[k], b[k])
				}
			}
		}
	}
}

// TestPhaseConcurrentKernelCache: goroutines generating series of two
// lengths at once (so the process-wide kernel cache keeps changing hands)
// give the same bits as serial calls; run under -race this also checks the
// cache's locking.
func TestPhaseConcurrentKernelCache(t *testing.T) {
	m := ClockModel{H: [5]float64{1e-25, 1e-24, 1e-23, 1e-28, 1e-34}}
	lengths := []int{3000, 5000, 3000, 5000, 3000, 5000}
	want := make([][]float64, len(lengths))
	for i, n := range lengths {
		want[i] = m.Phase(rand.New(rand.NewPCG(uint64(i), 1)), n, 30)
	}
	got := make([][]float64, len(lengths))
	var wg sync.WaitGroup
	for i, n := range lengths {
		wg.Go(func() {
			for range 3 {
				got[i] = m.Phase(rand.New(rand.NewPCG(uint64(i), 1)), n, 30)
			}
		})
	}
	wg.Wait()
	for i := range lengths {
		if !slices.Equal(got[i], want[i]) {
			t.Errorf("series %d (n=%d) differs from the serial one", i, lengths[i])
		}
	}
}

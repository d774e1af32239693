package noise

import (
	"math"
	"math/rand/v2"
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

// TestFlickerConvolution: the packed radix-2 FFT convolution reproduces the
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

package stability_test

import (
	"fmt"
	"math"
	"testing"

	"wallcross/noise/stability"
)

// ExampleCompute reproduces the first row of NIST SP 1065 Table 30: the
// 9-point frequency set has OADEV(τ0) = 91.22945 and OADEV(2τ0) = 85.95287.
func ExampleCompute() {
	y := []float64{892, 809, 823, 798, 671, 644, 883, 903, 677} // τ0 = 1 s
	x := stability.FreqToPhase(y, 1)
	r, err := stability.Compute(stability.StatOADEV, x, 1, []int{1, 2}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, v := range r {
		fmt.Printf("τ = %g s: σ_y = %.5f (%d terms, edf %.1f)\n", v.Tau, v.Value, v.N, v.EDF)
	}
	// Output:
	// τ = 1 s: σ_y = 91.22945 (8 terms, edf 6.5)
	// τ = 2 s: σ_y = 85.95287 (6 terms, edf 3.8)
}

// ExampleIdentifyNoise: a pure random walk of phase is white FM (α = 0).
func ExampleIdentifyNoise() {
	x := make([]float64, 2000)
	s := uint64(12345)
	for i := 1; i < len(x); i++ { // a fixed LCG so the output is portable
		s = s*6364136223846793005 + 1442695040888963407
		u := float64(s>>11)/(1<<53) - 0.5
		x[i] = x[i-1] + u*1e-9
	}
	alpha, est, _ := stability.IdentifyNoise(x, 1, true, 2)
	fmt.Printf("α = %d, non-integer estimate within ±0.25: %v\n", alpha, math.Abs(est) < 0.25)
	// Output:
	// α = 0, non-integer estimate within ±0.25: true
}

// FuzzCompute: arbitrary values (NaN, ±Inf, huge) and lengths never panic
// any estimator.
func FuzzCompute(f *testing.F) {
	f.Add([]byte{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15}, uint8(1))
	f.Add([]byte{0xff, 0xf8, 0, 0, 0, 0, 0, 1, 0x7f, 0xf0, 0, 0, 0, 0, 0, 0}, uint8(3))
	f.Fuzz(func(t *testing.T, b []byte, mm uint8) {
		x := make([]float64, len(b)/8)
		for i := range x {
			var u uint64
			for k := range 8 {
				u = u<<8 | uint64(b[8*i+k])
			}
			x[i] = math.Float64frombits(u)
		}
		m := []int{1, int(mm)%7 + 1, 2}
		for _, s := range stability.Stats() {
			if _, err := stability.Compute(s, x, 1, m, nil); err != nil {
				t.Fatal(err)
			}
		}
		stability.ComputeMany(stability.Stats(), x, 30, func(s stability.Stat) []int { return stability.OctaveTaus(len(x), s) }, nil)
		stability.IdentifyNoise(x, 1, true, 2)
		stability.IdentifyNoise(x, 2, false, 3)
	})
}

package search_test

import (
	"fmt"
	"math"

	"wallcross/sim/search"
)

// The direction count of the bank for 30-s GPS data: spacing
// Δθ = v_min·τ0/(2R) = 150 km/s · 30 s / (2 · 26,560 km) ≈ 4.85°.
func ExampleDirectionCount() {
	n := search.DirectionCount(150e3, 30, 26_560e3, 2000)
	dth := 150e3 * 30 / (2 * 26_560e3) * 180 / math.Pi
	fmt.Printf("Δθ = %.2f°, %d directions\n", dth, n)
	// Output: Δθ = 4.85°, 1752 directions
}

// C⁻¹v for three clocks of own variance σ_j² = 1 (in units of (1e-12)²)
// referred to a reference of variance σ_r² = 1: γ = 1/(1 + 3) = 0.25, so
// (C⁻¹v)_j = v_j − 0.25·Σv.
func ExampleApplyInverse() {
	v := []float64{1, 2, 3}
	out := make([]float64, 3)
	search.ApplyInverse(out, v, []float64{1, 1, 1}, 1)
	fmt.Println(out)
	// Output: [-0.5 0.5 1.5]
}

// Pseudo-frequency of a bias series (s) sampled every 30 s, with a gap.
func ExamplePseudoFrequency() {
	b := []float64{0, 3e-11, 6e-11, math.NaN(), 1.2e-10, 1.5e-10}
	for _, y := range search.PseudoFrequency(b, 30) {
		fmt.Printf("%.3g ", y)
	}
	fmt.Println()
	// Output: 1e-12 1e-12 NaN NaN 1e-12
}

package noise_test

import (
	"fmt"

	"wallcross/noise"
)

// ExampleCalibrate fits white and flicker FM to two Allan-deviation levels
// of a Galileo-like clock (σ_y = 5e-14 at 100 s, 7e-15 at 10⁴ s) and prints
// the fitted levels and the model at the targets. By hand: σ² = h0/(2τ) +
// 2 ln2 h−1 at both τ gives h0 = 4.952e-25 Hz⁻¹, h−1 = 1.749e-29.
func ExampleCalibrate() {
	targets := []noise.ADEVPoint{
		{Tau: 100, ADEV: 5e-14, Source: "illustration"},
		{Tau: 1e4, ADEV: 7e-15, Source: "illustration"},
	}
	h, err := noise.Calibrate(targets, 0, noise.WhiteFM, noise.FlickerFM)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("h0 = %.3g Hz⁻¹, h-1 = %.3g\n", h[noise.WhiteFM], h[noise.FlickerFM])
	m := noise.ClockModel{H: h}
	for _, p := range targets {
		fmt.Printf("σ_y(%g s) = %.2g\n", p.Tau, m.ADEV(p.Tau, 0))
	}
	// Output:
	// h0 = 4.95e-25 Hz⁻¹, h-1 = 1.75e-29
	// σ_y(100 s) = 5e-14
	// σ_y(10000 s) = 7e-15
}

// ExamplePreset prints the sources behind one family preset.
func ExamplePreset() {
	f, err := noise.LookupFamily("beidou3-phm")
	if err != nil {
		fmt.Println(err)
		return
	}
	m, _ := noise.Preset(f.Name)
	for _, p := range f.Targets {
		fmt.Printf("σ_y(%g s): source %.2g, preset %.2g  [%s]\n", p.Tau, p.ADEV, m.ADEV(p.Tau, f.Tau0), p.Source)
	}
	// Output:
	// σ_y(1000 s): source 4e-14, preset 4e-14  [[S12]: ~4e-14 at 1000 s]
	// σ_y(86400 s): source 5.1e-15, preset 5.1e-15  [[S13b]: 5.13e-15 at 86400 s]
}

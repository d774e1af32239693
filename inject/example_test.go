package inject_test

import (
	"fmt"
	"math"
	"math/rand/v2"

	"wallcross/inject"
)

// The worked example of physics.md §7: d = 1e4 km, T = 1 yr, ρ = 0.4 GeV/cm³,
// v = 300 km/s, Λ_eff = 1e13 GeV.
func ExampleA2FromDensity() {
	a2 := inject.A2FromDensity(0.4*inject.GeVPerCm3, 3e5, 3.156e7, 1e7)
	h := a2 / (1e13 * 1e13)
	fmt.Printf("A² = %.3g GeV², peak δν/ν = %.2g, step = %.2g s\n", a2, h, math.Sqrt(math.Pi)*h*1e7/3e5)
	// Output:
	// A² = 7.47e+09 GeV², peak δν/ν = 7.5e-17, step = 4.4e-15 s
}

func ExampleSensitivity() {
	for _, f := range []string{"gps-iif-rb", "galileo-phm", "glonass-cs"} {
		k, _ := inject.Sensitivity(f, inject.ConventionA)
		fmt.Printf("%-12s %-6s K_α=%.2f K_me=%.0f K_mq=%.3f\n", f, k.Species, k.KAlpha, k.KMe, k.KMq())
	}
	// Output:
	// gps-iif-rb   Rb-87  K_α=4.34 K_me=2 K_mq=-0.069
	// galileo-phm  H      K_α=4.00 K_me=2 K_mq=-0.150
	// glonass-cs   Cs-133 K_α=4.83 K_me=2 K_mq=-0.048
}

// A 33-s Gaussian wall crossing a satellite 20 000 km ahead along its normal,
// rendered as 30-s interval-mean frequencies and as phase.
func ExampleWall_Cross() {
	w := inject.Wall{ID: 1, T0: 100, N: [3]float64{1, 0, 0}, Speed: 3e5, Thickness: 1e7,
		Profile: inject.ProfileGaussian, A2: 7.47e9,
		Coupling: inject.Coupling{Mode: inject.CouplingEff, LambdaEff: 1e11}}
	sat := func(t float64) [3]float64 { return [3]float64{2e7, 1e7, 0} } // at rest, for the example
	c, err := w.Cross("G07", "gps-iif-rb", sat)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("t_cross = %.3f s, τ = %.2f s, step = %.1f ps\n", c.TCross, c.Tau, c.Step()*1e12)
	times := []float64{120, 150, 180, 210, 240, 270}
	y := make([]float64, len(times)-1)
	_ = inject.RenderFrequency(y, times, c)
	x := make([]float64, len(times))
	_ = inject.RenderPhase(x, times, c)
	for k := range y {
		fmt.Printf("[%3.0f, %3.0f] s: ȳ = %6.3f e-13, x(end) = %5.1f ps\n", times[k], times[k+1], y[k]*1e13, x[k+1]*1e12)
	}
	// Output:
	// t_cross = 166.667 s, τ = 33.33 s, step = 44.1 ps
	// [120, 150] s: ȳ =  3.176 e-13, x(end) =  10.6 ps
	// [150, 180] s: ȳ =  6.980 e-13, x(end) =  31.5 ps
	// [180, 210] s: ȳ =  3.719 e-13, x(end) =  42.7 ps
	// [210, 240] s: ȳ =  0.472 e-13, x(end) =  44.1 ps
	// [240, 270] s: ȳ =  0.014 e-13, x(end) =  44.1 ps
}

func ExamplePopulation_Sample() {
	p := inject.Population{
		MeanInterval: 6 * 3600, Span: 86400,
		Halo:        inject.StandardHalo(),
		Orientation: inject.OrientAlongVelocity,
		Thickness:   1e7, Profile: inject.ProfileGaussian,
		Amplitude: inject.AmplitudeSpec{Mode: inject.AmplitudeStep, Step: 50e-12},
		Coupling:  inject.Coupling{Mode: inject.CouplingEff, LambdaEff: 1e11},
	}
	walls, err := p.Sample(rand.New(rand.NewPCG(2026, 12)))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, w := range walls {
		ev, _ := w.Event()
		fmt.Printf("event %d: t0 = %7.0f s, v = %3.0f km/s, peak δν/ν = %.2g\n", ev.ID, ev.T0, ev.Speed/1e3, ev.PeakDnu)
	}
	// Output:
	// event 0: t0 =   15794 s, v = 325 km/s, peak δν/ν = 9.2e-13
	// event 1: t0 =   71785 s, v = 270 km/s, peak δν/ν = 7.6e-13
	// event 2: t0 =   75968 s, v = 495 km/s, peak δν/ν = 1.4e-12
	// event 3: t0 =   78216 s, v = 202 km/s, peak δν/ν = 5.7e-13
}

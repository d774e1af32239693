package inject

import (
	"math"
	"math/rand/v2"
	"testing"
)

// FuzzCross: arbitrary wall parameters and a clock on a circular orbit or in
// linear motion never panic; an accepted crossing meets the 1 µs residual.
func FuzzCross(f *testing.F) {
	f.Add(1.0, 0.0, 0.0, 3e5, 1e7, 0.0, 7e9, 1e11, 2.6e7, 0.9, 0.0, uint8(1))
	f.Add(0.3, -0.2, 0.9, 2e4, 1.0, -1e5, 0.0, 1e3, 4.2e7, 0.0, 3.9e3, uint8(4))
	f.Add(math.NaN(), 0.0, 1.0, -1.0, 0.0, math.Inf(1), -1.0, 0.0, 0.0, 0.0, 1e9, uint8(9))
	f.Fuzz(func(t *testing.T, nx, ny, nz, v, d, t0, a2, lambda, a, inc, u float64, prof uint8) {
		nn := math.Sqrt(nx*nx + ny*ny + nz*nz)
		w := Wall{ID: 1, T0: t0, N: [3]float64{nx / nn, ny / nn, nz / nn}, Speed: v, Thickness: d,
			Profile: Profile(prof % 6), A2: a2, Coupling: Coupling{Mode: CouplingEff, LambdaEff: lambda}}
		var tr Trajectory
		if a > 6.4e6 && a < 1e8 {
			tr = circularOrbit(a, inc, 0.3, 0.1)
		} else {
			tr = func(t float64) [3]float64 { return [3]float64{a + u*t, inc, 0} }
		}
		c, err := w.Cross("F", "rb", tr)
		if err != nil {
			return
		}
		if res := math.Abs(dot(w.N, tr(c.TCross))-w.Speed*(c.TCross-w.T0)) / w.Speed; !(res < 1e-6) {
			t.Fatalf("residual %g s accepted", res)
		}
		if !(c.VRel > 0) {
			t.Fatalf("v_rel %g m/s accepted", c.VRel)
		}
		_ = c.PhaseAt(c.TCross)
		_ = c.MeanFrequency(c.TCross-1, c.TCross+1)
		if c.Tau < 1e5 {
			x := make([]float64, 8)
			if err := RenderPhaseAlongGrid(x, c.TCross-4*c.Tau, c.Tau, &w, c, tr); err == nil {
				for _, v := range x {
					if math.IsNaN(v) {
						t.Fatalf("along-trajectory phase NaN for %+v", c)
					}
				}
			}
		}
	})
}

// FuzzRender: arbitrary crossings and epochs never panic; the rendering of a
// valid crossing is finite.
func FuzzRender(f *testing.F) {
	f.Add(100.0, 3.0, 1e-13, uint8(1), 0.0, 30.0, 7)
	f.Add(0.0, 1e-300, -1e300, uint8(3), -5.0, 1e-9, 3)
	f.Add(math.Inf(1), 0.0, math.NaN(), uint8(0), 0.0, 0.0, 0)
	f.Fuzz(func(t *testing.T, tc, tau, scale float64, prof uint8, start, step float64, n int) {
		if n < 0 || n > 1000 {
			n = 10
		}
		c := Crossing{Clock: "F", TCross: tc, Tau: tau, Profile: Profile(prof % 6), Scale: scale}
		times := make([]float64, n)
		for k := range times {
			times[k] = start + float64(k)*step
		}
		x := make([]float64, n)
		errP := RenderPhase(x, times, c)
		_ = RenderPhaseGrid(x, start, step, c)
		if n > 0 {
			y := make([]float64, n-1)
			_ = RenderFrequency(y, times, c)
		}
		if errP == nil && math.Abs(scale) < 1e-3 && tau < 1e9 {
			for k, v := range x {
				if math.IsNaN(v) {
					t.Fatalf("phase NaN at %g s for %+v", times[k], c)
				}
			}
		}
	})
}

// FuzzParse: the name parsers and amplitude resolution never panic.
func FuzzParse(f *testing.F) {
	f.Add("gaussian", "A", "isotropic", 1e-12, 1e7, 3e5, uint8(2))
	f.Add("", "", "", math.NaN(), -1.0, 0.0, uint8(0))
	f.Fuzz(func(t *testing.T, prof, conv, orient string, x, d, v float64, mode uint8) {
		p, _ := ParseProfile(prof)
		_, _ = ParseConvention(conv)
		_, _ = ParseOrientation(orient)
		s := AmplitudeSpec{Mode: AmplitudeMode(mode % 6), RhoDM: x, VBar: v, MeanInterval: d, PeakDnu: x, Step: x, A2: x}
		c := Coupling{Mode: CouplingMode(mode % 4), LambdaEff: d, Alpha: ConstantCoupling{Lambda: v}, Convention: ConventionA}
		a2, err := s.Resolve(p, c, d, v)
		if err == nil && (!(a2 >= 0) || math.IsInf(a2, 0)) {
			t.Fatalf("A² %g accepted", a2)
		}
	})
}

// FuzzPopulation: arbitrary population settings never panic or hang; the
// walls of an accepted population are valid.
func FuzzPopulation(f *testing.F) {
	f.Add(3600.0, 86400.0, 220e3, 544e3, 2e4, 1e7, uint8(1), true, 1e11)
	f.Add(1.0, 10.0, 1.0, 0.0, 7e8, 1.0, uint8(2), false, 1.0)
	f.Fuzz(func(t *testing.T, T, span, v0, vesc, minSpeed, d float64, orient uint8, flux bool, lambda float64) {
		if span/T > 1e4 {
			return // keep each run short
		}
		p := Population{MeanInterval: T, Span: span, Halo: Halo{V0: v0, VEsc: vesc}, Orientation: Orientation(orient % 3),
			FluxWeighted: flux, MinSpeed: minSpeed, Thickness: d, Profile: ProfileGaussian,
			Amplitude: AmplitudeSpec{Mode: AmplitudeStep, Step: 1e-11}, Coupling: Coupling{Mode: CouplingEff, LambdaEff: lambda}}
		walls, err := p.Sample(rand.New(rand.NewPCG(1, 2)))
		if err != nil {
			return
		}
		for i := range walls {
			if err := walls[i].Validate(); err != nil {
				t.Fatalf("sampled wall invalid: %v", err)
			}
		}
	})
}

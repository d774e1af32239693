package inject

import (
	"math"
	"math/rand/v2"
	"testing"
)

// BenchmarkCross: one crossing solve per clock (GPS-like circular orbit).
func BenchmarkCross(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	const nc = 64
	clocks := make([]Trajectory, nc)
	for i := range clocks {
		clocks[i] = circularOrbit(26.56e6, 55*math.Pi/180, float64(i%6)*math.Pi/3, 2*math.Pi*rng.Float64())
	}
	w := effWall(randomUnit(rng), 3e5, 1e7, 3600, 7.47e9, 1e11, ProfileGaussian)
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		if _, err := w.Cross("G", "gps-iif-rb", clocks[i%nc]); err != nil {
			b.Fatal(err)
		}
		i++
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(i), "ns/clock")
}

// BenchmarkRender: per-sample cost of phase and interval-mean frequency
// rendering, a day of 30-s epochs around a crossing.
func BenchmarkRender(b *testing.B) {
	const n = 2880
	times := make([]float64, n)
	for k := range times {
		times[k] = 30 * float64(k)
	}
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat, ProfileKinkLinear} {
		c := Crossing{Clock: "G", TCross: 43210.5, Tau: 3e4, Profile: p, Scale: 1e-13} // thick: every sample in the pulse
		b.Run("phase/"+p.String(), func(b *testing.B) {
			dst := make([]float64, n)
			for b.Loop() {
				if err := RenderPhase(dst, times, c); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(n)*float64(b.N)), "ns/sample")
		})
		b.Run("frequency/"+p.String(), func(b *testing.B) {
			dst := make([]float64, n-1)
			for b.Loop() {
				if err := RenderFrequency(dst, times, c); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n-1)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(n-1)*float64(b.N)), "ns/sample")
		})
	}
}

// BenchmarkRenderTypical: a 33-s wall crossing once in a day of 30-s epochs
// (most samples lie outside the pulse): the realistic per-sample cost.
func BenchmarkRenderTypical(b *testing.B) {
	const n = 2880
	times := make([]float64, n)
	for k := range times {
		times[k] = 30 * float64(k)
	}
	c := Crossing{Clock: "G", TCross: 43210.5, Tau: 33.3, Profile: ProfileGaussian, Scale: 1e-13}
	b.Run("phase", func(b *testing.B) {
		dst := make([]float64, n)
		for b.Loop() {
			if err := RenderPhase(dst, times, c); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(n)*float64(b.N)), "ns/sample")
	})
	b.Run("frequency", func(b *testing.B) {
		dst := make([]float64, n-1)
		for b.Loop() {
			if err := RenderFrequency(dst, times, c); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(n-1)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(n-1)*float64(b.N)), "ns/sample")
	})
}

// BenchmarkSample: drawing one day of walls at a 1-minute mean interval.
func BenchmarkSample(b *testing.B) {
	p := testPopulation()
	p.MeanInterval = 60
	rng := rand.New(rand.NewPCG(3, 4))
	walls := 0
	for b.Loop() {
		w, err := p.Sample(rng)
		if err != nil {
			b.Fatal(err)
		}
		walls += len(w)
	}
	b.ReportMetric(float64(walls)/b.Elapsed().Seconds(), "walls/s")
}

// BenchmarkRenderAlong: along-trajectory rendering of a thick wall
// (d = 1e9 m, τ ≈ 1 h) on a GPS orbit over a day of 30-s epochs.
func BenchmarkRenderAlong(b *testing.B) {
	tr := circularOrbit(26.56e6, 55*math.Pi/180, 0.4, 1.1)
	w := effWall([3]float64{0.2, -0.5, 0.84}, 3e5, 1e9, 43200, 1e9, 1e11, ProfileGaussian)
	c, err := w.Cross("G", "rb", tr)
	if err != nil {
		b.Fatal(err)
	}
	const n = 2880
	dst := make([]float64, n)
	for b.Loop() {
		if err := RenderPhaseAlongGrid(dst, 0, 30, &w, c, tr); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/(float64(n)*float64(b.N)), "ns/sample")
}

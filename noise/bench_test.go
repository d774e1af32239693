package noise

import (
	"math/rand/v2"
	"runtime"
	"testing"
)

var sinkX []float64

// BenchmarkPhaseFiveTerm generates the full five-term model (plus drift and
// one periodic term) and reports samples/s and bytes allocated per sample.
func BenchmarkPhaseFiveTerm(b *testing.B) {
	m := ClockModel{
		H:        [5]float64{1e-25, 1e-24, 1e-23, 1e-28, 1e-34},
		Drift:    1e-18,
		Periodic: []Periodic{{Period: 43082, Amplitude: 1e-10}},
	}
	for _, n := range []int{1 << 20, 10_000_000} {
		b.Run(sizeName(n), func(b *testing.B) {
			rng := rand.New(rand.NewPCG(1, 2))
			var ms0, ms1 runtime.MemStats
			runtime.ReadMemStats(&ms0)
			k := 0
			c0 := cpuTime()
			for b.Loop() {
				sinkX = m.Phase(rng, n, 30)
				k++
			}
			cpu := (cpuTime() - c0).Seconds()
			runtime.ReadMemStats(&ms1)
			b.ReportMetric(float64(n)*float64(k)/b.Elapsed().Seconds(), "samples/s")
			b.ReportMetric(float64(n)*float64(k)/cpu, "samples/cpu-s")
			b.ReportMetric(float64(ms1.TotalAlloc-ms0.TotalAlloc)/float64(k)/float64(n), "B/sample")
		})
	}
}

// BenchmarkPhaseNoFlicker: white PM, white FM and random-walk FM only (no FFT).
func BenchmarkPhaseNoFlicker(b *testing.B) {
	m := ClockModel{H: [5]float64{1e-25, 0, 1e-23, 0, 1e-34}}
	const n = 1 << 20
	rng := rand.New(rand.NewPCG(1, 2))
	c0 := cpuTime()
	for b.Loop() {
		sinkX = m.Phase(rng, n, 30)
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
	b.ReportMetric(float64(n)*float64(b.N)/(cpuTime()-c0).Seconds(), "samples/cpu-s")
}

func sizeName(n int) string {
	switch n {
	case 1 << 20:
		return "2^20"
	case 10_000_000:
		return "1e7"
	}
	return "n"
}

// BenchmarkGeneratorFiveTerm is BenchmarkPhaseFiveTerm/2^20 with a reused
// Generator (cached filter spectrum and buffers), the many-clocks case.
func BenchmarkGeneratorFiveTerm(b *testing.B) {
	m := ClockModel{H: [5]float64{1e-25, 1e-24, 1e-23, 1e-28, 1e-34}, Drift: 1e-18}
	const n = 1 << 20
	g := NewGenerator(n)
	rng := rand.New(rand.NewPCG(1, 2))
	sinkX = g.Phase(m, rng, 30) // fill the cache
	c0 := cpuTime()
	for b.Loop() {
		sinkX = g.Phase(m, rng, 30)
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
	b.ReportMetric(float64(n)*float64(b.N)/(cpuTime()-c0).Seconds(), "samples/cpu-s")
}

// BenchmarkPhaseBreakdown splits BenchmarkGeneratorFiveTerm's 2^20-sample
// series into its parts, each reported in ns per output sample: the 5n
// normal deviates, the flicker convolution (forward transform, product,
// inverse, add-back) with a cached kernel, and the whole series.
func BenchmarkPhaseBreakdown(b *testing.B) {
	const n = 1 << 20
	m := ClockModel{H: [5]float64{1e-25, 1e-24, 1e-23, 1e-28, 1e-34}, Drift: 1e-18}
	perSample := func(b *testing.B) {
		b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N)/n, "ns/sample")
	}
	b.Run("normals", func(b *testing.B) {
		rng := rand.New(rand.NewPCG(1, 2))
		buf := make([]float64, n)
		for b.Loop() {
			for range 5 {
				fillNormal(rng, buf, 1)
			}
		}
		perSample(b)
	})
	b.Run("convolution", func(b *testing.B) {
		var g flickerConv
		x := make([]float64, n)
		for b.Loop() {
			g.input(n)[n-1] = 1
			g.apply(x)
		}
		perSample(b)
	})
	b.Run("whole", func(b *testing.B) {
		g := NewGenerator(n)
		rng := rand.New(rand.NewPCG(1, 2))
		for b.Loop() {
			sinkX = g.Phase(m, rng, 30)
		}
		perSample(b)
	})
}

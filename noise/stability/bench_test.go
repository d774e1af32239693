package stability

import (
	"math/rand/v2"
	"testing"
)

var sinkR []Result

// BenchmarkOctaveSuite runs OADEV + MDEV + HDEV (with EDF, noise id and
// intervals) on an octave grid for 10⁷ phase points.
func BenchmarkOctaveSuite(b *testing.B) {
	const n = 10_000_000
	rng := rand.New(rand.NewPCG(1, 1))
	y := make([]float64, n-1)
	for i := range y {
		y[i] = 1e-12 * rng.NormFloat64()
	}
	x := FreqToPhase(y, 1)
	stats := []Stat{StatOADEV, StatMDEV, StatHDEV}
	b.Run("separate", func(b *testing.B) {
		c0 := cpuTime()
		for b.Loop() {
			for _, s := range stats {
				r, err := Compute(s, x, 1, OctaveTaus(n, s), nil)
				if err != nil {
					b.Fatal(err)
				}
				sinkR = r
			}
		}
		b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/suite")
		b.ReportMetric((cpuTime()-c0).Seconds()/float64(b.N), "cpu-s/suite")
	})
	b.Run("many", func(b *testing.B) {
		c0 := cpuTime()
		for b.Loop() {
			r, err := ComputeMany(stats, x, 1, func(s Stat) []int { return OctaveTaus(n, s) }, nil)
			if err != nil {
				b.Fatal(err)
			}
			sinkR = r[0]
		}
		b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/suite")
		b.ReportMetric((cpuTime()-c0).Seconds()/float64(b.N), "cpu-s/suite")
	})
	b.Run("many-ohdev", func(b *testing.B) {
		st := []Stat{StatOADEV, StatMDEV, StatOHDEV}
		c0 := cpuTime()
		for b.Loop() {
			r, err := ComputeMany(st, x, 1, func(s Stat) []int { return OctaveTaus(n, s) }, nil)
			if err != nil {
				b.Fatal(err)
			}
			sinkR = r[0]
		}
		b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/suite")
		b.ReportMetric((cpuTime()-c0).Seconds()/float64(b.N), "cpu-s/suite")
	})
}

// BenchmarkOADEVOctave1e6 is the single-statistic case on 10⁶ points.
func BenchmarkOADEVOctave1e6(b *testing.B) {
	const n = 1_000_000
	rng := rand.New(rand.NewPCG(1, 1))
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	for b.Loop() {
		sinkR = OADEV(x, 1, OctaveTaus(n, StatOADEV))
	}
}

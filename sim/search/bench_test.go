package search

import (
	"math/rand/v2"
	"testing"
)

// benchNetwork is one day of 30-s data for 70 clocks: 32 satellites in 8
// planes and 38 stations, white-frequency noise, no wall.
func benchNetwork() *Network {
	rng := rand.New(rand.NewPCG(7, 7))
	o := synthOpts{planes: 8, perPlane: 4, stations: 38, epochs: 2880, step: 30,
		sigmaSat: 1e-12, sigmaSta: 6e-13, sigmaRef: 3e-13}
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	return sn.net
}

// BenchmarkSearchDay: one day, 70 clocks, 2,000 directions × 8 speeds,
// thin walls, one coupling class, one t0 per sample interval (the target
// is ≤ 10 s per op on 2 cores), and the default two t0 per interval.
func BenchmarkSearchDay(b *testing.B) {
	net := benchNetwork()
	for _, bc := range []struct {
		name string
		cfg  Config
	}{
		{"dir20_v8_thin_sub1", Config{Directions: 20, Workers: 1, Thicknesses: []float64{0}, T0Substeps: 1}},
		{"dir200_v8_thin_sub1", Config{Directions: 200, Thicknesses: []float64{0}, T0Substeps: 1}},
		{"dir2000_v8_thin_sub1", Config{Directions: 2000, Thicknesses: []float64{0}, T0Substeps: 1}},
		{"dir2000_v8_thin_sub2", Config{Directions: 2000, Thicknesses: []float64{0}, T0Substeps: 2}},
	} {
		b.Run(bc.name, func(b *testing.B) {
			var evals float64
			for b.Loop() {
				res, err := Search(net, bc.cfg)
				if err != nil {
					b.Fatal(err)
				}
				evals = res.Evaluations
			}
			b.ReportMetric(evals*float64(b.N)/b.Elapsed().Seconds(), "evals/s")
			b.ReportMetric(evals, "evals/op")
		})
	}
}

// BenchmarkScanDirection times the bank scan of one direction (8 speeds,
// thin walls, one t0 per interval) on the day network: the kernel alone,
// without the once-per-dataset preparation.
func BenchmarkScanDirection(b *testing.B) {
	s, err := newSearcher(benchNetwork(), Config{Directions: 64, Thicknesses: []float64{0}, T0Substeps: 1})
	if err != nil {
		b.Fatal(err)
	}
	w := s.newWorker()
	d := 0
	for b.Loop() {
		s.scanDirection(w, d%len(s.dirs))
		d++
	}
	evals := float64(len(s.cfg.Speeds)*s.nScan()) * float64(s.nT0)
	b.ReportMetric(evals*float64(b.N)/b.Elapsed().Seconds(), "evals/s")
}

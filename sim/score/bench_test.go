package score

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// synthTruth builds an in-memory truth catalogue: nev walls over span s,
// 30 clocks with data throughout.
func synthTruth(rng *rand.Rand, nev int, span float64) *Truth {
	tr := &Truth{Start: 0, End: span - 30, Interval: 30, RMax: 26560e3, RMaxSource: "synthetic"}
	for j := range 30 {
		tr.Clocks = append(tr.Clocks, fmt.Sprintf("C%02d", j))
		tr.runs = append(tr.runs, [][2]float64{{0, span - 30}})
	}
	for i := range nev {
		tr.Events = append(tr.Events, Event{ID: fmt.Sprint(i), T0: rng.Float64() * span, N: [3]float64{0, 0, 1},
			Speed: 2e5 + 2e5*rng.Float64(), Thickness: []float64{1e6, 1e7}[i%2], LambdaEff: 1e12, MaxStep: 1e-10, PeakDnu: math.NaN()})
	}
	return tr
}

// BenchmarkScore: 10⁴ injections and 10⁵ candidates (a tenth near
// injections) over 30 days.
func BenchmarkScore(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	const span = 30 * 86400
	tr := synthTruth(rng, 10000, span)
	cands := make([]Candidate, 100000)
	for i := range cands {
		t0 := rng.Float64() * span
		if i%10 == 0 {
			t0 = tr.Events[rng.IntN(len(tr.Events))].T0 + 60*rng.NormFloat64()
		}
		cands[i] = Candidate{Line: i + 2, T0: t0, Stat: rng.ExpFloat64(), Speed: math.NaN(), Thick: math.NaN()}
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Score(tr, cands, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(cands))*float64(b.N)/b.Elapsed().Seconds(), "candidates/s")
}

// BenchmarkFitSigmoid: one fit with profile intervals, 9 levels.
func BenchmarkFitSigmoid(b *testing.B) {
	pts := drawCurve(rand.New(rand.NewPCG(5, 5)), -10.7, 0.15, 0.5, 9, 80)
	for b.Loop() {
		if _, err := FitSigmoid(pts, 0.6827); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "fits/s")
}

// BenchmarkReadClocks: clocks.csv coverage reading, one day at 30 s with
// 60 clocks (one cell in 50 empty).
func BenchmarkReadClocks(b *testing.B) {
	var sb strings.Builder
	sb.WriteString("t_s")
	for j := range 60 {
		fmt.Fprintf(&sb, ",C%02d", j)
	}
	sb.WriteByte('\n')
	for k := range 2880 {
		fmt.Fprintf(&sb, "%d", 30*k)
		for j := range 60 {
			if (k*60+j)%50 == 0 {
				sb.WriteByte(',')
				continue
			}
			fmt.Fprintf(&sb, ",%.6e", 1e-9*float64((k+j)%17))
		}
		sb.WriteByte('\n')
	}
	data := sb.String()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		var tr Truth
		if err := tr.clocksFrom(strings.NewReader(data), "clocks.csv"); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(2880*float64(b.N)/b.Elapsed().Seconds(), "epochs/s")
}

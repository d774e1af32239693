package score

import (
	"math"
	"math/rand/v2"
	"testing"
)

func randomCandidates(rng *rand.Rand, tr *Truth, n int, span float64) []Candidate {
	c := make([]Candidate, n)
	for i := range c {
		t0 := rng.Float64() * span
		if i%2 == 0 {
			t0 = tr.Events[rng.IntN(len(tr.Events))].T0 + 100*rng.NormFloat64()
		}
		c[i] = Candidate{Line: i + 2, T0: t0, Stat: math.Round(rng.ExpFloat64()*20) / 4, Speed: math.NaN(), Thick: math.NaN(),
			N: [3]float64{0, 0, 1}, HasN: rng.IntN(4) != 0}
	}
	return c
}

// TestROCMatchesThresholdRuns: each ROC row equals a full Score run with
// that threshold (greedy matching by decreasing stat makes the matching
// above a threshold independent of the candidates below it).
func TestROCMatchesThresholdRuns(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	const span = 2 * 86400
	tr := synthTruth(rng, 60, span)
	cands := randomCandidates(rng, tr, 300, span)
	for _, tol := range []float64{0, 0.3} {
		r, err := Score(tr, cands, Options{DirectionTol: tol})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.ROC) < 10 {
			t.Fatalf("only %d ROC rows", len(r.ROC))
		}
		for _, p := range r.ROC {
			q, err := Score(tr, cands, Options{Threshold: p.Threshold, HasThreshold: true, DirectionTol: tol})
			if err != nil {
				t.Fatal(err)
			}
			if q.Found != p.Found || q.False != p.False {
				t.Errorf("tol %g, threshold %g: ROC found %d false %d, full run %d %d", tol, p.Threshold, p.Found, p.False, q.Found, q.False)
			}
		}
	}
}

// TestScoreOrderInvariant: shuffling the candidate file (keeping each
// candidate's line) changes nothing.
func TestScoreOrderInvariant(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	const span = 86400
	tr := synthTruth(rng, 40, span)
	cands := randomCandidates(rng, tr, 200, span)
	a, err := Score(tr, cands, Options{})
	if err != nil {
		t.Fatal(err)
	}
	rng.Shuffle(len(cands), func(i, j int) { cands[i], cands[j] = cands[j], cands[i] })
	b, err := Score(tr, cands, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Matches) != len(b.Matches) {
		t.Fatalf("%d vs %d match rows", len(a.Matches), len(b.Matches))
	}
	for i := range a.Matches {
		x, y := a.Matches[i], b.Matches[i]
		if x.Event != y.Event || x.Candidate != y.Candidate || x.Status != y.Status {
			t.Errorf("row %d: %+v vs %+v", i, x, y)
		}
	}
}

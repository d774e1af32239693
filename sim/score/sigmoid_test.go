package score

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// drawCurve draws binomial counts from the sigmoid (mu, w) at levels
// log-spaced over mu ± span decades.
func drawCurve(rng *rand.Rand, mu, w, span float64, levels, n int) []BinPoint {
	pts := make([]BinPoint, levels)
	for i := range pts {
		u := mu - span + 2*span*float64(i)/float64(levels-1)
		p := logistic((u - mu) / w)
		k := 0
		for range n {
			if rng.Float64() < p {
				k++
			}
		}
		pts[i] = BinPoint{S: math.Pow(10, u), N: n, Found: k}
	}
	return pts
}

// TestFitSigmoidRecovers fits binomial data drawn (seeded) from a known
// sigmoid and checks that μ and w come back within three standard errors,
// and that the 68.27 % profile intervals of h50 and h90 cover the truth in
// roughly 68 % of 40 independent data sets.
func TestFitSigmoidRecovers(t *testing.T) {
	const mu, w = -10.7, 0.15 // h50 = 2e-11 s, width 0.15 decades
	h50, h90 := math.Pow(10, mu), math.Pow(10, mu+w*math.Log(9))
	cover50, cover90 := 0, 0
	const sets = 40
	for seed := range uint64(sets) {
		rng := rand.New(rand.NewPCG(seed, 7))
		pts := drawCurve(rng, mu, w, 0.5, 9, 80)
		g, err := FitSigmoid(pts, 0.6827)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		if math.Abs(g.Mu-mu) > 3*g.MuErr || math.Abs(g.W-w) > 3*g.WErr {
			t.Errorf("seed %d: mu = %.4f ± %.4f, w = %.4f ± %.4f; truth %.4f, %.4f", seed, g.Mu, g.MuErr, g.W, g.WErr, mu, w)
		}
		if !(g.MuErr > 0.001 && g.MuErr < 0.1 && g.WErr > 0.001 && g.WErr < 0.1) {
			t.Errorf("seed %d: implausible errors mu ± %g, w ± %g", seed, g.MuErr, g.WErr)
		}
		if !(g.H50Int.Low < g.H50 && g.H50 < g.H50Int.High && g.H90Int.Low < g.H90 && g.H90 < g.H90Int.High) {
			t.Errorf("seed %d: intervals %v %v do not hold h50 %g, h90 %g", seed, g.H50Int, g.H90Int, g.H50, g.H90)
		}
		// The profile interval of μ should be close to ±1 standard error.
		if r := math.Log10(g.H50Int.High) - g.Mu; math.Abs(r/g.MuErr-1) > 0.3 {
			t.Errorf("seed %d: upper profile half-width %.4f vs standard error %.4f", seed, r, g.MuErr)
		}
		if g.H50Int.Low <= h50 && h50 <= g.H50Int.High {
			cover50++
		}
		if g.H90Int.Low <= h90 && h90 <= g.H90Int.High {
			cover90++
		}
	}
	// 68 % of 40: binomial sd ≈ 3; accept 19…36.
	for name, c := range map[string]int{"h50": cover50, "h90": cover90} {
		if c < 19 || c > 36 {
			t.Errorf("%s: 68.27 %% interval covered the truth in %d of %d sets", name, c, sets)
		}
	}
}

func TestFitSigmoidEval(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	g, err := FitSigmoid(drawCurve(rng, -9, 0.3, 1, 11, 200), 0.9)
	if err != nil {
		t.Fatal(err)
	}
	if e := g.Eval(g.H50); math.Abs(e-0.5) > 1e-12 {
		t.Errorf("Eval(h50) = %g", e)
	}
	if e := g.Eval(g.H90); math.Abs(e-0.9) > 1e-12 {
		t.Errorf("Eval(h90) = %g", e)
	}
}

func TestFitSigmoidUnresolved(t *testing.T) {
	for name, pts := range map[string][]BinPoint{
		"none found":  {{1e-12, 10, 0}, {1e-11, 10, 0}},
		"all found":   {{1e-12, 10, 10}, {1e-11, 10, 10}},
		"step":        {{1e-12, 10, 0}, {1e-11, 10, 0}, {1e-10, 10, 10}},
		"single":      {{1e-12, 10, 5}},
		"empty cells": {{1e-12, 0, 0}, {1e-11, 0, 0}},
	} {
		if _, err := FitSigmoid(pts, 0.9); !errors.Is(err, ErrUnresolved) {
			t.Errorf("%s: err = %v, want ErrUnresolved", name, err)
		}
	}
	if _, err := FitSigmoid([]BinPoint{{-1, 10, 5}, {1, 10, 5}}, 0.9); err == nil {
		t.Error("negative amplitude accepted")
	}
	if _, err := FitSigmoid([]BinPoint{{1, 10, 11}, {2, 10, 5}}, 0.9); err == nil {
		t.Error("found > n accepted")
	}
}

// TestFitSigmoidReference compares the fit and its 68.27 % profile
// intervals with testdata/sigmoid_ref.txt, made by testdata/sigmoid_ref.py
// (nested golden-section searches in plain Python, no gonum).
func TestFitSigmoidReference(t *testing.T) {
	b, err := os.ReadFile("testdata/sigmoid_ref.txt")
	if err != nil {
		t.Fatal(err)
	}
	ref := map[string]float64{}
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n") {
		var k string
		var v float64
		if _, err := fmt.Sscan(line, &k, &v); err != nil {
			t.Fatal(err)
		}
		ref[k] = v
	}
	var pts []BinPoint
	for i, k := range []int{2, 6, 17, 31, 44, 49} { // the data of sigmoid_ref.py
		pts = append(pts, BinPoint{S: math.Pow(10, -11.2+0.2*float64(i)), N: 50, Found: k})
	}
	g, err := FitSigmoid(pts, 0.6827)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name     string
		got, tol float64
	}{
		{"mu", g.Mu, 1e-7}, {"w", g.W, 1e-5},
		{"h50", g.H50, 1e-6}, {"h50_low", g.H50Int.Low, 1e-5}, {"h50_high", g.H50Int.High, 1e-5},
		{"h90", g.H90, 1e-5}, {"h90_low", g.H90Int.Low, 1e-5}, {"h90_high", g.H90Int.High, 1e-5},
	} {
		if !scalar.EqualWithinRel(c.got, ref[c.name], c.tol) {
			t.Errorf("%s = %.10g, reference %.10g (rel tol %g)", c.name, c.got, ref[c.name], c.tol)
		}
	}
}

func ExampleFitSigmoid() {
	var pts []BinPoint
	for i, k := range []int{2, 6, 17, 31, 44, 49} { // found of 50 at steps 10^-11.2 … 10^-10.2 s
		pts = append(pts, BinPoint{S: math.Pow(10, -11.2+0.2*float64(i)), N: 50, Found: k})
	}
	g, _ := FitSigmoid(pts, 0.6827)
	fmt.Printf("h50 = %.3g s [%.3g, %.3g], h90 = %.3g s, width %.3f decades\n", g.H50, g.H50Int.Low, g.H50Int.High, g.H90, g.W)
	// Output: h50 = 2.01e-11 s [1.9e-11, 2.13e-11], h90 = 4.3e-11 s, width 0.150 decades
}

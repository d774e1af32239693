package score

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestIntervalsPublished checks intervals against published four-decimal
// values at 95 %.
func TestIntervalsPublished(t *testing.T) {
	for _, c := range []struct {
		k, n   int
		wilson Interval
		cp     Interval
		src    string
	}{
		// detection.md §3.5 and the assignment's check value: 5 of 10, CP [0.187, 0.813].
		{5, 10, Interval{0.2366, 0.7634}, Interval{0.1871, 0.8129}, "detection.md §3.5"},
		{0, 10, Interval{0, 0.2775}, Interval{0, 0.3085}, "detection.md §3.5"},
		{95, 100, Interval{0.8882, 0.9785}, Interval{0.8872, 0.9836}, "detection.md §3.5"},
		// R. G. Newcombe, Stat. Med. 17, 857 (1998), Table II, methods 3 (Wilson)
		// and 5 (exact) (values from memory; confirmed independently by
		// testdata/intervals.py to all four decimals).
		{81, 263, Interval{0.2553, 0.3662}, Interval{0.2527, 0.3676}, "Newcombe 1998"},
		{15, 148, Interval{0.0624, 0.1605}, Interval{0.0578, 0.1617}, "Newcombe 1998"},
		{0, 20, Interval{0, 0.1611}, Interval{0, 0.1684}, "Newcombe 1998"},
		{1, 29, Interval{0.0061, 0.1718}, Interval{0.0009, 0.1776}, "Newcombe 1998"},
	} {
		w, err := Wilson(c.k, c.n, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		p, err := ClopperPearson(c.k, c.n, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		const tol = 0.5e-4 + 1e-12 // four published decimals
		if !scalar.EqualWithinAbs(w.Low, c.wilson.Low, tol) || !scalar.EqualWithinAbs(w.High, c.wilson.High, tol) {
			t.Errorf("%d/%d Wilson = [%.5f, %.5f], want [%.4f, %.4f] (%s)", c.k, c.n, w.Low, w.High, c.wilson.Low, c.wilson.High, c.src)
		}
		if !scalar.EqualWithinAbs(p.Low, c.cp.Low, tol) || !scalar.EqualWithinAbs(p.High, c.cp.High, tol) {
			t.Errorf("%d/%d Clopper–Pearson = [%.5f, %.5f], want [%.4f, %.4f] (%s)", c.k, c.n, p.Low, p.High, c.cp.Low, c.cp.High, c.src)
		}
	}
}

// TestIntervalsReference checks both intervals to 1e-9 against
// testdata/intervals.csv, made by testdata/intervals.py from exact binomial
// tail sums (Python standard library only, no gonum).
func TestIntervalsReference(t *testing.T) {
	f, err := os.Open("testdata/intervals.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) < 10 {
		t.Fatalf("only %d reference rows", len(recs))
	}
	for _, r := range recs[1:] {
		var v [7]float64
		for i := range v {
			if v[i], err = strconv.ParseFloat(r[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		k, n, cl := int(v[0]), int(v[1]), v[2]
		w, _ := Wilson(k, n, cl)
		p, _ := ClopperPearson(k, n, cl)
		got := []float64{w.Low, w.High, p.Low, p.High}
		for i, name := range []string{"wilson_low", "wilson_high", "cp_low", "cp_high"} {
			if !scalar.EqualWithinAbs(got[i], v[3+i], 1e-9) {
				t.Errorf("%d/%d %s = %.12f, want %.12f", k, n, name, got[i], v[3+i])
			}
		}
	}
}

// TestClopperPearsonClosedForm checks the k = 0 and k = n closed forms:
// upper = 1 − (α/2)^(1/n) for k = 0 and lower = (α/2)^(1/n) for k = n
// (they follow from P(X=0|p) = (1−p)^n and P(X=n|p) = p^n).
func TestClopperPearsonClosedForm(t *testing.T) {
	for _, n := range []int{1, 2, 5, 10, 37, 100, 1000, 100000} {
		for _, cl := range []float64{0.6827, 0.9, 0.95, 0.99} {
			a2 := (1 - cl) / 2
			lo, _ := ClopperPearson(0, n, cl)
			hi, _ := ClopperPearson(n, n, cl)
			if lo.Low != 0 || !scalar.EqualWithinAbsOrRel(lo.High, 1-math.Pow(a2, 1/float64(n)), 1e-12, 1e-9) {
				t.Errorf("0/%d at %g: %v, want upper %g", n, cl, lo, 1-math.Pow(a2, 1/float64(n)))
			}
			if hi.High != 1 || !scalar.EqualWithinAbsOrRel(hi.Low, math.Pow(a2, 1/float64(n)), 1e-12, 1e-9) {
				t.Errorf("%d/%d at %g: %v, want lower %g", n, n, cl, hi, math.Pow(a2, 1/float64(n)))
			}
		}
	}
}

// TestIntervalOrdering checks on all k of several n that Clopper–Pearson
// contains the point estimate, that both intervals lie in [0, 1], and the
// symmetry interval(k, n) = 1 − interval(n−k, n).
func TestIntervalOrdering(t *testing.T) {
	for _, n := range []int{1, 7, 30, 200} {
		for k := 0; k <= n; k++ {
			p := float64(k) / float64(n)
			for name, f := range map[string]func(int, int, float64) (Interval, error){"wilson": Wilson, "cp": ClopperPearson} {
				a, _ := f(k, n, 0.9)
				b, _ := f(n-k, n, 0.9)
				if a.Low < 0 || a.High > 1 || a.Low > p || a.High < p {
					t.Errorf("%s %d/%d = %v does not hold %g in [0,1]", name, k, n, a, p)
				}
				if !scalar.EqualWithinAbs(a.Low, 1-b.High, 1e-12) || !scalar.EqualWithinAbs(a.High, 1-b.Low, 1e-12) {
					t.Errorf("%s %d/%d = %v, mirror %v", name, k, n, a, b)
				}
			}
		}
	}
}

func TestIntervalErrors(t *testing.T) {
	for _, c := range []struct {
		k, n int
		cl   float64
	}{{-1, 5, 0.9}, {6, 5, 0.9}, {0, -1, 0.9}, {1, 5, 0}, {1, 5, 1}, {1, 5, math.NaN()}} {
		if _, err := Wilson(c.k, c.n, c.cl); err == nil {
			t.Errorf("Wilson(%d, %d, %g) gave no error", c.k, c.n, c.cl)
		}
		if _, err := ClopperPearson(c.k, c.n, c.cl); err == nil {
			t.Errorf("ClopperPearson(%d, %d, %g) gave no error", c.k, c.n, c.cl)
		}
	}
	if iv, _ := ClopperPearson(0, 0, 0.9); iv != (Interval{0, 1}) {
		t.Errorf("0/0 = %v, want [0, 1]", iv)
	}
}

// TestPoissonZeroFactor: zero-event Poisson upper limits; 2.30 (90 %) and
// 3.00 (95 %) are the n = 0 entries of the PDG Statistics review table of
// Poisson upper limits (from memory); detection.md §2.4 gives 2.3026, 2.9957.
func TestPoissonZeroFactor(t *testing.T) {
	for _, c := range []struct{ cl, want float64 }{{0.90, 2.302585092994046}, {0.95, 2.995732273553991}, {0.99, 4.605170185988091}} {
		if got := PoissonZeroFactor(c.cl); !scalar.EqualWithinRel(got, c.want, 1e-14) {
			t.Errorf("PoissonZeroFactor(%g) = %.15g, want %.15g", c.cl, got, c.want)
		}
		// Definition: P(0 | μ) = exp(−μ) = 1 − CL.
		if got := math.Exp(-PoissonZeroFactor(c.cl)); !scalar.EqualWithinAbs(got, 1-c.cl, 1e-15) {
			t.Errorf("exp(−factor(%g)) = %g, want %g", c.cl, got, 1-c.cl)
		}
	}
	if !math.IsNaN(PoissonZeroFactor(1)) || !math.IsNaN(PoissonZeroFactor(0)) {
		t.Error("PoissonZeroFactor outside (0,1) should be NaN")
	}
}

func ExampleClopperPearson() {
	iv, _ := ClopperPearson(5, 10, 0.95)
	fmt.Printf("5 of 10 found: efficiency in [%.3f, %.3f] at 95 %% CL\n", iv.Low, iv.High)
	// Output: 5 of 10 found: efficiency in [0.187, 0.813] at 95 % CL
}

func ExampleWilson() {
	iv, _ := Wilson(95, 100, 0.95)
	fmt.Printf("95 of 100 found: efficiency in [%.4f, %.4f] at 95 %% CL\n", iv.Low, iv.High)
	// Output: 95 of 100 found: efficiency in [0.8882, 0.9785] at 95 % CL
}

func ExamplePoissonZeroFactor() {
	fmt.Printf("90 %%: %.3f expected crossings, 95 %%: %.3f\n", PoissonZeroFactor(0.90), PoissonZeroFactor(0.95))
	// Output: 90 %: 2.303 expected crossings, 95 %: 2.996
}

func TestIntervalJSON(t *testing.T) {
	b, err := json.Marshal(struct{ A, B Interval }{Interval{0.25, 1}, Interval{0, math.Inf(1)}})
	if err != nil {
		t.Fatal(err)
	}
	if string(b) != `{"A":{"low":0.25,"high":1},"B":{"low":0,"high":null}}` {
		t.Errorf("json %s", b)
	}
	var back struct{ A, B Interval }
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if back.A != (Interval{0.25, 1}) || back.B.Low != 0 || !math.IsNaN(back.B.High) {
		t.Errorf("read back %+v", back)
	}
}

package score

import (
	"bytes"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/plot/cmpimg"
)

// The golden images are rewritten with go test -regen (gonum.org/v1/plot/cmpimg).

// checkGolden compares the PNG at got with testdata/name pixel by pixel
// (the comparison gonum's cmpimg makes for PNG), or replaces the golden
// with -regen.
func checkGolden(t *testing.T, got, name string) {
	t.Helper()
	golden := filepath.Join("testdata", name)
	b, err := os.ReadFile(got)
	if err != nil {
		t.Fatal(err)
	}
	if *cmpimg.GenerateTestData {
		if err := os.WriteFile(golden, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -regen to create it)", err)
	}
	if bytes.Equal(b, want) {
		return
	}
	ok, err := cmpimg.Equal("png", b, want)
	if err != nil {
		t.Fatal(err)
	}
	if !ok {
		keep := filepath.Join(t.TempDir(), name)
		os.WriteFile(keep, b, 0o644)
		t.Errorf("%s differs from its golden image; got image kept at %s", name, keep)
	}
}

// synthEff draws (seeded) a two-thickness efficiency table from known
// sigmoids in the bias step.
func synthEff(t *testing.T) []EffRow {
	rng := rand.New(rand.NewPCG(11, 12))
	var rows []EffRow
	for _, c := range []struct{ d, mu, w float64 }{{1e6, -10.5, 0.2}, {1e7, -10, 0.3}} {
		for _, p := range drawCurve(rng, c.mu, c.w, 0.8, 7, 60) {
			// Λ grid decreasing with the step: step ∝ 1/Λ².
			l := 1e12 * math.Pow(10, -0.5*(math.Log10(p.S)-c.mu))
			r, err := NewEffRow(c.d, 3e5, l, p.S, p.N, p.Found)
			if err != nil {
				t.Fatal(err)
			}
			rows = append(rows, r)
		}
	}
	return rows
}

func TestGoldenEfficiencyPlot(t *testing.T) {
	rows := synthEff(t)
	fits := FitByThickness(rows, 0.6827)
	if len(fits) != 2 {
		t.Fatalf("%d fits, want 2", len(fits))
	}
	p := filepath.Join(t.TempDir(), "efficiency.png")
	if err := PlotEfficiency(p, rows, fits); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, p, "efficiency_golden.png")
}

func TestGoldenReachPlot(t *testing.T) {
	pts, err := Reach(reachTable(t), ReachOptions{MeanIntervals: []float64{yr, 2 * yr, 5 * yr}, Span: 10 * yr, InjectedInterval: yr})
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "reach.png")
	if err := PlotReach(p, pts, 10*yr); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, p, "reach_golden.png")
}

func TestGoldenROCPlot(t *testing.T) {
	tr, cands := readDS1(t)
	r, err := Score(tr, cands, Options{})
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "roc.png")
	if err := PlotROC(p, r.ROC); err != nil {
		t.Fatal(err)
	}
	checkGolden(t, p, "roc_golden.png")
}

func TestPlotErrors(t *testing.T) {
	dir := t.TempDir()
	if err := PlotEfficiency(filepath.Join(dir, "e.pdf"), synthEff(t), nil); err == nil {
		t.Error("pdf accepted")
	}
	if err := PlotEfficiency(filepath.Join(dir, "e.png"), reachTable(t), nil); err == nil {
		t.Error("table without steps plotted")
	}
	if err := PlotReach(filepath.Join(dir, "r.png"), nil, yr); err == nil {
		t.Error("empty reach plotted")
	}
	if err := PlotROC(filepath.Join(dir, "r.png"), nil); err == nil {
		t.Error("empty ROC plotted")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("failed plots left %d files", len(ents))
	}
}

package stability

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/plot/cmpimg"
)

// The golden images are rewritten with go test -regen (gonum.org/v1/plot/cmpimg).

// TestPlotGolden draws the OADEV and MDEV of the SP 1065 1000-point set with
// the white-FM model σ_y = √(σ²/m), σ² = 1/12 (uniform data), and compares
// the PNG with the golden image.
func TestPlotGolden(t *testing.T) {
	x := FreqToPhase(riley1000(), 1)
	oa := OADEV(x, 1, OctaveTaus(len(x), StatOADEV))
	md := MDEV(x, 1, OctaveTaus(len(x), StatMDEV))
	p, err := Plot("SP 1065 1000-point set", "σy(τ)", []Curve{{"oadev", oa}, {"mdev", md}},
		ModelCurve{"white FM, σ² = 1/12", func(tau float64) float64 { return math.Sqrt(1.0 / 12 / tau) }})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WritePlot(&buf, p, "png"); err != nil {
		t.Fatal(err)
	}
	golden := filepath.Join("testdata", "oadev_plot_golden.png")
	if *cmpimg.GenerateTestData {
		if err := os.WriteFile(golden, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run with -regen to create it)", err)
	}
	if bytes.Equal(buf.Bytes(), want) {
		return
	}
	ok, err := cmpimg.Equal("png", buf.Bytes(), want)
	if err != nil {
		t.Fatal(err)
	}
	if !ok {
		keep := filepath.Join(t.TempDir(), "oadev_plot_got.png")
		os.WriteFile(keep, buf.Bytes(), 0o644)
		t.Errorf("plot differs from %s; got image kept at %s", golden, keep)
	}
}

func TestPlotErrors(t *testing.T) {
	if _, err := Plot("empty", "σ", nil); err == nil {
		t.Error("plot of no data accepted")
	}
	p, _ := Plot("one", "σ", []Curve{{"a", []Result{{Tau: 1, Value: 1, CILow: 0.9, CIHigh: 1.1}}}})
	if err := WritePlot(&bytes.Buffer{}, p, "pdf"); err == nil {
		t.Error("pdf format accepted")
	}
}

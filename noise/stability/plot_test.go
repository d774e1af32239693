package stability

import (
	"bytes"
	"flag"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// regen rewrites the golden image: go test ./noise/stability -run PlotGolden -regen
// (the flag name gonum.org/v1/plot/cmpimg uses; cmpimg itself needs a go.sum
// entry for rsc.io/pdf that the module does not carry yet, so the PNG
// comparison is done here pixel by pixel, as cmpimg does for PNG).
var regen = flag.Bool("regen", false, "rewrite testdata/*_golden.png")

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
	if *regen {
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
	gi, err1 := png.Decode(bytes.NewReader(buf.Bytes()))
	wi, err2 := png.Decode(bytes.NewReader(want))
	if err1 != nil || err2 != nil {
		t.Fatalf("decode: %v %v", err1, err2)
	}
	if !samePixels(gi, wi) {
		keep := filepath.Join(t.TempDir(), "oadev_plot_got.png")
		os.WriteFile(keep, buf.Bytes(), 0o644)
		t.Errorf("plot differs from %s; got image kept at %s", golden, keep)
	}
}

func samePixels(a, b image.Image) bool {
	if a.Bounds() != b.Bounds() {
		return false
	}
	r := a.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			r1, g1, b1, a1 := a.At(x, y).RGBA()
			r2, g2, b2, a2 := b.At(x, y).RGBA()
			if r1 != r2 || g1 != g2 || b1 != b2 || a1 != a2 {
				return false
			}
		}
	}
	return true
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

package sim

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/internal/extdata"
	"wallcross/scenarios"
)

func builtin(t testing.TB, name string) *scenarios.Scenario {
	t.Helper()
	s, err := scenarios.Resolve(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestCheckSingleWallClosedForm: in the noise-free built-in scenario
// check-single-wall every series of clocks.csv must equal the closed form
// built from crossings.csv alone — the clock's own Gaussian step minus the
// reference clock's (physics.md §3.2, §3.4):
//
//	s_j(t) = X_j(t) − X_ref(t),  X(t) = (ΔT/2)·erfc(−(t − t_c)/τ)
//
// With unit sensitivity every clock has the same Γ·A² = peak_dnu
// (events.csv), and ΔT = √π·Γ·A²·τ (physics.md §3.3) gives each clock's τ
// from its own step: τ = ΔT/(√π·peak_dnu).
func TestCheckSingleWallClosedForm(t *testing.T) {
	d, err := Run(Config{Scenario: builtin(t, "check-single-wall")}, Options{ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if _, err := WriteDir(dir, d, WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	r, err := ReadDataset(dir) // the files, not the in-memory dataset
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Events) != 1 || len(r.Crossings) != len(r.Clocks) || len(r.Clocks) != 24+8 {
		t.Fatalf("%d events, %d crossings, %d clocks; want 1, 32, 32", len(r.Events), len(r.Crossings), len(r.Clocks))
	}
	peak := r.Events[0].PeakDnu
	type cf struct{ tc, step, tau float64 }
	forms := map[string]cf{}
	for _, c := range r.Crossings {
		forms[c.Clock] = cf{c.TCross, c.Step, c.Step / (math.Sqrt(math.Pi) * peak)}
	}
	X := func(id string, t float64) float64 {
		f := forms[id]
		return f.step / 2 * math.Erfc(-(t-f.tc)/f.tau)
	}
	ref := r.Reference.Clocks[0]
	if ref != "KVSR" {
		t.Fatalf("reference %q", ref)
	}
	worst := 0.0
	minStep, maxStep := math.Inf(1), 0.0
	for j, c := range r.Clocks {
		minStep, maxStep = min(minStep, forms[c.ID].step), max(maxStep, forms[c.ID].step)
		for k := range r.Epochs {
			tk := r.EpochSeconds(k)
			want := X(c.ID, tk) - X(ref, tk)
			got := r.At(k, j)
			worst = max(worst, math.Abs(got-want))
			if math.Abs(got-want) > 1e-15 {
				t.Fatalf("clock %s t = %g s: %g s, closed form %g s", c.ID, tk, got, want)
			}
		}
	}
	t.Logf("worst deviation from the closed form %.3g s; steps %.4g–%.4g s", worst, minStep, maxStep)
	// The signal is not trivially small: steps of tens of ps (physics.md §7
	// order of magnitude for Λ = 1e11 GeV, d = 1e4 km).
	if !(minStep > 1e-12) {
		t.Errorf("steps %g s unexpectedly small", minStep)
	}
	// The reference's own series is identically zero and every other series
	// carries −ΔT_ref after the reference is crossed.
	last := r.Epochs - 1
	for j, c := range r.Clocks {
		want := forms[c.ID].step - forms[ref].step
		if got := r.At(last, j); math.Abs(got-want) > 1e-15 {
			t.Errorf("clock %s at the end: %g s, want ΔT_j − ΔT_ref = %g s", c.ID, got, want)
		}
	}
}

// TestWorkersSameBytes: the same seed gives the same files for 1, 2 and 8
// workers (DESIGN.md §4).
func TestWorkersSameBytes(t *testing.T) {
	s := builtin(t, "demo")
	s.Time.Span = scenarios.Seconds(4 * 3600) // keep the test short
	var first map[string][]byte
	for _, w := range []int{1, 2, 8} {
		d, err := Run(Config{Scenario: s}, Options{Workers: w, ToolVersion: "test"})
		if err != nil {
			t.Fatal(err)
		}
		dir := t.TempDir()
		if _, err := WriteDir(dir, d, WriteOptions{}); err != nil {
			t.Fatal(err)
		}
		files := map[string][]byte{}
		ents, _ := os.ReadDir(dir)
		for _, e := range ents {
			files[e.Name()], _ = os.ReadFile(filepath.Join(dir, e.Name()))
		}
		if first == nil {
			first = files
			if len(files) != 9 {
				t.Errorf("%d files written, want 9", len(files))
			}
			continue
		}
		for name, b := range first {
			if !bytes.Equal(files[name], b) {
				t.Errorf("%s differs between 1 and %d workers", name, w)
			}
		}
	}
}

func TestDemoRun(t *testing.T) {
	s := builtin(t, "demo")
	d, err := Run(Config{Scenario: s}, Options{ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if d.Epochs != 2880 || len(d.Clocks) != 24+24+12 || d.Seed != 20260101 {
		t.Errorf("%d epochs, %d clocks, seed %d", d.Epochs, len(d.Clocks), d.Seed)
	}
	kinds := map[string]int{}
	for _, n := range d.Nuisances {
		kinds[n.Kind]++
	}
	// The demo asks for gaps, an outage of G05, phase jumps, outliers and
	// daily batches (one boundary per clock in a one-day span: none).
	if kinds["outage"] != 1 || kinds["gap"] == 0 || kinds["outlier"] == 0 {
		t.Errorf("nuisance counts %v", kinds)
	}
	g05 := d.ClockIndex("G05")
	for k := int(10 * 3600 / d.Interval); k < int(13*3600/d.Interval); k++ {
		if !math.IsNaN(d.At(k, g05)) {
			t.Fatalf("G05 has data at %g s inside its outage", d.EpochSeconds(k))
		}
	}
	if len(d.Events) < 2 || d.Events[0].T0 != 6*3600 || d.Events[1].Thickness != 3e6 {
		t.Errorf("events %+v", d.Events)
	}
	if len(d.Crossings) != len(d.Events)*len(d.Clocks) {
		t.Errorf("%d crossings, want %d", len(d.Crossings), len(d.Events)*len(d.Clocks))
	}
	// The reference (KVSR) series is zero wherever it has data.
	ref := d.ClockIndex("KVSR")
	for k := range d.Epochs {
		if v := d.At(k, ref); v != 0 && !math.IsNaN(v) {
			t.Fatalf("reference series %g s at epoch %d", v, k)
		}
	}
	if !strings.Contains(string(d.Scenario), `"name":"demo"`) {
		t.Errorf("scenario JSON %s", d.Scenario[:min(80, len(d.Scenario))])
	}
}

// A navigation-file geometry: set A's CDDIS broadcast file (GPS, records
// 18:00–24:00 of 2021-04-28) drives the satellites over 19:00–22:00.
func TestRunWithNavigationFile(t *testing.T) {
	nav := extdata.Path(t, "set_A_2021-118_gps/brdc1180.21n")
	y := `name: navtest
time: {start: 2021-04-28T19:00:00, span: 3 h, step: 30 s}
navigation: {file: ` + filepath.Base(nav) + `, systems: G}
stations:
  - {id: WAB2, x: 4327318.171 m, y: 566956.021 m, z: 4636425.977 m, reference: true}
walls:
  events: [{t0: 1 h, direction: [0, 1, 0]}]
`
	s, err := scenarios.Decode("nav.yaml", []byte(y))
	if err != nil {
		t.Fatal(err)
	}
	d, err := Run(Config{Scenario: s, BaseDir: filepath.Dir(nav)}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// 32 GPS satellites have records in the file (PRNs 1–32, listed with awk
	// on the record lines; the README's 31 are those also in the CODE SP3)
	// plus the station.
	if len(d.Clocks) != 33 || d.Clocks[0].ID != "G01" || d.Clocks[0].Family != "gps-iif-rb" {
		t.Errorf("%d clocks, first %+v", len(d.Clocks), d.Clocks[0])
	}
	if len(d.Crossings) != 33 || d.Orbits == nil || len(d.Orbits.Epochs) != 37 { // 0, 300, …, 10800 s (the last data epoch is 10770 s)
		t.Errorf("%d crossings, SP3 %v", len(d.Crossings), d.Orbits != nil)
	}
	// Satellite positions in orbits.sp3 are at GPS orbit radius (26 560 km
	// nominal, gnss.md §1; eccentric orbits within ±2 %).
	p := d.Orbits.Data[0][0].Pos
	if r := math.Sqrt(p[0]*p[0] + p[1]*p[1] + p[2]*p[2]); math.Abs(r-26.56e6) > 0.02*26.56e6 {
		t.Errorf("G01 radius %g m", r)
	}
}

// orbits.sp3 written from a run reads back (package orbits' reader) with the
// positions to the file's 1 mm resolution (SP3 F14.6 km).
func TestSP3ReadsBack(t *testing.T) {
	d, err := Run(Config{Scenario: builtin(t, "check-single-wall")}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if _, err := WriteDir(dir, d, WriteOptions{SkipRINEX: true}); err != nil {
		t.Fatal(err)
	}
	r, err := ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	if r.Orbits == nil || len(r.Orbits.Epochs) != len(d.Orbits.Epochs) || len(r.Orbits.Sats) != 24 || r.Orbits.TimeSystem != "GPS" {
		t.Fatalf("SP3 read back: %+v", r.Orbits)
	}
	for e := range r.Orbits.Data {
		for i := range r.Orbits.Data[e] {
			a, b := r.Orbits.Data[e][i].Pos, d.Orbits.Data[e][i].Pos
			for k := range 3 {
				if math.Abs(a[k]-b[k]) > 0.5e-3+1e-9 {
					t.Fatalf("epoch %d sat %d: %v, written %v", e, i, a, b)
				}
			}
		}
	}
}

package sim

import (
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"wallcross/scenarios"
)

// truthScenario: noise off, unit sensitivity, two explicit Gaussian walls
// and every nuisance, so that each series can be rebuilt from the truth
// tables alone.
const truthScenario = `name: truth
seed: 11
time: {start: 2026-02-01T00:00:00, span: 2 d, step: 60 s}
constellations: [{kind: galileo-like, planes: 2, slots: 3}]
stations:
  - {id: AAAA, lat: 50 deg, lon: 10 deg, height: 100 m}
  - {id: BBBB, lat: -30 deg, lon: 140 deg, height: 10 m}
  - {id: CCCC, lat: 5 deg, lon: -60 deg, height: 0 m}
reference:
%s
noise: {off: true}
walls:
  sensitivity: unit
  events:
    - {t0: 6 h, direction: [0.2, 0.4, -0.9], speed: 250 km/s}
    - {t0: 30 h, direction: [-1, 0, 0.1], speed: 400 km/s, thickness: 2e3 km}
nuisances:
  gaps: {rate: 2 /d, mean_length: 1 h}
  outages: [{clock: E02, start: 20 h, length: 2 h}]
  phase_jumps: {rate: 1 /d, sigma: 1e-9}
  frequency_jumps: {rate: 0.5 /d, sigma: 1e-13}
  outliers: {probability: 1e-3, sigma: 3e-9}
  batches: {interval: 1 d, sigma: 2e-10}
`

// rebuild reconstructs every series of a dataset written to dir from its
// truth tables: the walls' closed forms (crossings.csv + events.csv, τ from
// ΔT = √π·peak_dnu·τ for unit sensitivity), the phase and frequency jumps of
// each clock, referencing, then batch steps, outliers and gaps
// (nuisances.csv), and compares with clocks.csv.
func rebuild(t *testing.T, dir string, refAt func(k int) map[string]float64) {
	t.Helper()
	r, err := ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	peak := map[int]float64{}
	for _, e := range r.Events {
		peak[e.ID] = e.PeakDnu
	}
	own := func(id string, tk float64) float64 {
		x := 0.0
		for _, c := range r.Crossings {
			if c.Clock == id {
				tau := c.Step / (math.Sqrt(math.Pi) * peak[c.Event])
				x += c.Step / 2 * math.Erfc(-(tk-c.TCross)/tau)
			}
		}
		for _, n := range r.Nuisances {
			if n.Clock != id || tk < n.T {
				continue
			}
			switch n.Kind {
			case "phase_jump":
				x += n.Value
			case "freq_jump":
				x += n.Value * (tk - n.T)
			}
		}
		return x
	}
	kinds := map[string]int{}
	for _, n := range r.Nuisances {
		kinds[n.Kind]++
	}
	for _, k := range []string{"gap", "outage", "phase_jump", "freq_jump", "outlier", "batch_step"} {
		if kinds[k] == 0 {
			t.Errorf("no %s in nuisances.csv (%v)", k, kinds)
		}
	}
	checked := 0
	for j, c := range r.Clocks {
		for k := range r.Epochs {
			tk := r.EpochSeconds(k)
			want := own(c.ID, tk)
			for id, w := range refAt(k) {
				want -= w * own(id, tk)
			}
			gap := false
			for _, n := range r.Nuisances {
				if n.Clock != c.ID {
					continue
				}
				switch n.Kind {
				case "batch_step":
					if tk >= n.T {
						want += n.Value
					}
				case "outlier":
					if tk == n.T {
						want += n.Value
					}
				case "gap", "outage":
					if tk >= n.T && tk < n.T+n.Duration {
						gap = true
					}
				}
			}
			got := r.At(k, j)
			if gap {
				if !math.IsNaN(got) {
					t.Fatalf("clock %s t = %g s: %g s inside a recorded gap", c.ID, tk, got)
				}
				continue
			}
			if math.IsNaN(got) {
				t.Fatalf("clock %s t = %g s: gap not in nuisances.csv", c.ID, tk)
			}
			// Batch offsets are summed from their recorded differences,
			// hence a tolerance a little above the float64 resolution of
			// the ns-level jumps.
			if math.Abs(got-want) > 1e-17+1e-12*math.Abs(want) {
				t.Fatalf("clock %s t = %g s: %.17g s, rebuilt from the truth %.17g s", c.ID, tk, got, want)
			}
			checked++
		}
	}
	t.Logf("%d samples rebuilt from the truth tables; nuisances %v", checked, kinds)
}

func TestTruthRebuildsSeries(t *testing.T) {
	s, err := scenarios.Decode("truth.yaml", []byte(sprintf(truthScenario, "  clock: AAAA")))
	if err != nil {
		t.Fatal(err)
	}
	d, err := Run(Config{Scenario: s}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "ds")
	if _, err := WriteDir(dir, d, WriteOptions{SkipRINEX: true, SkipSP3: true}); err != nil {
		t.Fatal(err)
	}
	rebuild(t, dir, func(int) map[string]float64 { return map[string]float64{"AAAA": 1} })
}

// With an ensemble reference and a later change of reference, every series
// is referred to Σ w_k x_k before the change and to the new clock after it
// (physics.md §3.4); the change is in nuisances.csv and in the manifest.
func TestEnsembleReferenceAndChange(t *testing.T) {
	ref := `  ensemble: [{clock: AAAA, weight: 3}, {clock: BBBB, weight: 1}]
  changes: [{at: 36 h, clock: CCCC}]`
	s, err := scenarios.Decode("truth.yaml", []byte(sprintf(truthScenario, ref)))
	if err != nil {
		t.Fatal(err)
	}
	d, err := Run(Config{Scenario: s}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(d.ReferenceChanges) != 1 || d.ReferenceChanges[0].Epoch != 36*60 || d.Reference.Weights[0] != 0.75 {
		t.Fatalf("reference %+v, changes %+v", d.Reference, d.ReferenceChanges)
	}
	found := false
	for _, n := range d.Nuisances {
		if n.Kind == "reference_change" && n.Clock == "CCCC" && n.T == 36*3600 {
			found = true
		}
	}
	if !found {
		t.Error("reference change not in the truth catalogue")
	}
	dir := filepath.Join(t.TempDir(), "ds")
	if _, err := WriteDir(dir, d, WriteOptions{SkipSP3: true}); err != nil {
		t.Fatal(err)
	}
	rebuild(t, dir, func(k int) map[string]float64 {
		if k >= 36*60 {
			return map[string]float64{"CCCC": 1}
		}
		return map[string]float64{"AAAA": 0.75, "BBBB": 0.25}
	})
	cf, err := ReadRinexClock(filepath.Join(dir, RinexFile))
	if err != nil {
		t.Fatal(err)
	}
	if len(cf.Refs) != 2 || len(cf.Refs[0].Clocks) != 2 || cf.Refs[1].Clocks[0].Name != "CCCC" || cf.Refs[1].Start != d.EpochTime(36*60) {
		t.Errorf("RINEX reference blocks %+v", cf.Refs)
	}
}

func sprintf(format string, a ...any) string { return fmt.Sprintf(format, a...) }

package main

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// readCSV reads a CSV file into header-indexed rows of floats (non-numeric
// cells as NaN) and the raw strings.
func readCSVFile(t *testing.T, path string) ([]string, [][]string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs[0], recs[1:]
}

func col(header []string, name string) int {
	for i, h := range header {
		if h == name {
			return i
		}
	}
	return -1
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	if s == "" {
		return math.NaN()
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("bad number %q", s)
	}
	return v
}

// TestCheckSingleWallClosedForm rebuilds every series of the built-in
// check-single-wall dataset from the files alone, as an outside check
// would: the Gaussian bias of physics.md §3.2,
// b_j(t) = ΔT_j·½[1 + erf((t − t_j)/τ)] with τ = d/v (events.csv) and
// t_j, ΔT_j from crossings.csv, minus the reference's; and every step
// against ΔT = √π·A²·d/(Λ_eff²·v) with A² = ħc·ρ_DM·v̄·T·d (physics.md
// §1.2, §3.3).
func TestCheckSingleWallClosedForm(t *testing.T) {
	dir := t.TempDir()
	if code, _, errOut := runCLI(t, "simulate", "check-single-wall", "--out", dir); code != exitOK {
		t.Fatalf("simulate: exit %d: %s", code, errOut)
	}
	eh, ev := readCSVFile(t, filepath.Join(dir, "events.csv"))
	if len(ev) != 1 {
		t.Fatalf("%d events, want 1", len(ev))
	}
	d := num(t, ev[0][col(eh, "thickness_m")])
	v := num(t, ev[0][col(eh, "speed_m_s")])
	lam := num(t, ev[0][col(eh, "lambda_eff_gev")])
	t0 := num(t, ev[0][col(eh, "t0_s")])
	if d != 1e7 || v != 3e5 || t0 != 3600 || math.Abs(lam/1e11-1) > 1e-12 {
		t.Fatalf("event d=%g v=%g t0=%g lambda=%g", d, v, t0, lam)
	}
	// ħc = 1.973269804e-16 GeV·m (CODATA 2018); ρ = 0.4 GeV/cm³ = 4e5 GeV/m³;
	// T = 1 Julian year; v̄ = 300 km/s.
	const hbarC = 1.973269804e-16
	a2 := hbarC * 0.4e6 * 3e5 * 365.25 * 86400 * d
	wantStep := math.Sqrt(math.Pi) * a2 * d / (lam * lam * v)
	ch, cr := readCSVFile(t, filepath.Join(dir, "crossings.csv"))
	tc := map[string]float64{}
	step := map[string]float64{}
	for _, r := range cr {
		id := r[col(ch, "clock")]
		tc[id] = num(t, r[col(ch, "t_cross_s")])
		step[id] = num(t, r[col(ch, "step_s")])
		if rel := math.Abs(step[id]/wantStep - 1); rel > 1e-12 {
			t.Errorf("%s: step %.15g s, want √π·A²·d/(Λ²·v) = %.15g s (rel. %.2g)", id, step[id], wantStep, rel)
		}
	}
	if len(tc) != 32 {
		t.Fatalf("%d crossings, want 24 satellites + 8 stations", len(tc))
	}
	tau := d / v
	b := func(id string, tt float64) float64 { return step[id] * 0.5 * math.Erfc(-(tt-tc[id])/tau) }
	hh, rows := readCSVFile(t, filepath.Join(dir, "clocks.csv"))
	const ref = "KVSR"
	worst := 0.0
	for _, r := range rows {
		tt := num(t, r[0])
		for j := 1; j < len(hh); j++ {
			got := num(t, r[j])
			want := b(hh[j], tt) - b(ref, tt)
			worst = math.Max(worst, math.Abs(got-want))
		}
	}
	t.Logf("step %.4g s for every clock; worst |series − closed form| = %.2g s over %d epochs × %d clocks", wantStep, worst, len(rows), len(hh)-1)
	if worst > 1e-15 {
		t.Errorf("clocks.csv differs from the closed form by up to %.3g s, want ≤ 1e-15 s", worst)
	}
}

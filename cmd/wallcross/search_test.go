package main

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/sim/score"
)

// searchScenario: 2 h of a GPS-like network with 6 stations and one loud
// thin wall at t0 = 1 h.
const searchScenario = `
name: search-cli-test
description: one wall for the search command test
seed: 5
time:
  start: 2026-02-01T00:00:00
  span: 2 h
  step: 30 s
constellations:
  - kind: gps-like
    clock: gps-iif-rb
stations:
  - {id: KVSR, lat: 64.12 deg, lon: -21.90 deg, height: 40 m, clock: hmaser, reference: true}
  - {id: ORMD, lat: 47.61 deg, lon: 8.45 deg, height: 520 m, clock: hmaser}
  - {id: TALN, lat: -33.92 deg, lon: 18.42 deg, height: 35 m, clock: cs}
  - {id: BRSK, lat: 1.35 deg, lon: 103.82 deg, height: 15 m, clock: hmaser}
  - {id: QUMA, lat: -37.81 deg, lon: 144.96 deg, height: 30 m, clock: hmaser}
  - {id: PEDR, lat: -15.79 deg, lon: -47.88 deg, height: 1170 m, clock: rb}
reference:
  clock: KVSR
walls:
  profile: gaussian
  thickness: 1000 km
  step: 0.1 ns
  events:
    - t0: 1 h
      direction: [-0.6, 0.0, 0.8]
      speed: 300 km/s
`

func TestSearchCommand(t *testing.T) {
	dir := t.TempDir()
	scen := filepath.Join(dir, "s.yaml")
	if err := os.WriteFile(scen, []byte(searchScenario), 0o644); err != nil {
		t.Fatal(err)
	}
	ds := filepath.Join(dir, "ds")
	if code, _, errOut := runCLI(t, "simulate", scen, "--out", ds, "--no-rinex"); code != exitOK {
		t.Fatalf("simulate: exit %d: %s", code, errOut)
	}
	cands := filepath.Join(dir, "cands.csv")
	code, out, errOut := runCLI(t, "search", ds, "--out", cands, "--directions", "1000", "--speeds", "250,300,360", "--thickness", "0", "--workers", "2")
	if code != exitOK {
		t.Fatalf("search: exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "candidates written to") || !strings.Contains(errOut, "search: 1000/1000 directions") || !strings.Contains(errOut, "bank: 1000 directions x 3 speeds") {
		t.Errorf("stdout:\n%s\nstderr:\n%s", out, errOut)
	}
	b, err := os.ReadFile(cands)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(string(b), "t0_s,stat,nx,ny,nz,speed_m_s,thickness_m,amplitude,coupling,sweep_chi2\n") {
		t.Fatalf("candidate file:\n%s", b)
	}
	got, err := score.ReadCandidatesFile(cands)
	if err != nil {
		t.Fatal(err)
	}
	best := score.Candidate{}
	for _, c := range got {
		if c.Stat > best.Stat {
			best = c
		}
	}
	want := [3]float64{-0.6, 0, 0.8}
	ang := math.Acos(best.N[0]*want[0]+best.N[1]*want[1]+best.N[2]*want[2]) * 180 / math.Pi
	if math.Abs(best.T0-3600) > 60 || ang > 25 || best.Stat < 8 {
		t.Fatalf("loudest candidate t0 %g s (want 3600), stat %g, direction error %.1f°:\n%s", best.T0, best.Stat, ang, b)
	}
	// The score command reads the file.
	if code, _, errOut := runCLI(t, "score", ds, cands); code != exitOK {
		t.Errorf("score: exit %d: %s", code, errOut)
	}
	// A failing search leaves no candidate file.
	bad := filepath.Join(dir, "bad.csv")
	if code, _, _ := runCLI(t, "search", filepath.Join(dir, "nope"), "--out", bad); code != exitFailure {
		t.Errorf("missing dataset: exit %d, want 1", code)
	}
	if _, err := os.Stat(bad); err == nil {
		t.Error("failed search left a candidate file")
	}
}

func TestSearchUsage(t *testing.T) {
	for _, args := range [][]string{
		{"search"},
		{"search", "ds"},
		{"search", "ds", "extra", "--out", "c.csv"},
		{"search", "ds", "--out", "c.csv", "--speeds", "300,abc"},
		{"search", "ds", "--out", "c.csv", "--speeds", "0"},
		{"search", "ds", "--out", "c.csv", "--thickness", "-1"},
		{"search", "ds", "--out", "c.csv", "--threshold", "NaN"},
		{"search", "ds", "--out", "c.csv", "--directions", "-3"},
		{"search", "ds", "--out", "c.csv", "--whiten", "9"},
		{"search", "ds", "--out", "c.csv", "--couplings", "eff,,alpha"},
		{"search", "ds", "--out", "c.csv", "--no-such-flag"},
	} {
		if code, _, errOut := runCLI(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2 (%s)", args, code, errOut)
		}
	}
	if code, out, _ := runCLI(t, "help", "search"); code != exitOK || !strings.Contains(out, "Sherman–Morrison") {
		t.Errorf("help search: exit %d\n%s", code, out)
	}
}

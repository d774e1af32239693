package search

import (
	"math"
	"testing"

	"wallcross/scenarios"
	"wallcross/sim"
)

// loadScenario is a 3-hour GPS-like network with 8 stations, default clock
// noise and one thin wall of 0.1 ns step (unit sensitivity).
const loadScenario = `
name: search-load-test
description: one wall in noise, for the search loader test
seed: 77
time:
  start: 2026-03-01T00:00:00
  span: 3 h
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
  - {id: HALV, lat: 21.31 deg, lon: -157.86 deg, height: 10 m, clock: cs}
  - {id: PEDR, lat: -15.79 deg, lon: -47.88 deg, height: 1170 m, clock: rb}
  - {id: NUKA, lat: 61.22 deg, lon: -149.90 deg, height: 40 m, clock: hmaser}
reference:
  clock: KVSR
walls:
  profile: gaussian
  thickness: 1000 km
  step: 0.1 ns
  events:
    - t0: 100 min
      direction: [0.3, -0.5, 0.81]
      speed: 300 km/s
`

// simulatedDataset writes the scenario with sim.Run and sim.WriteDir.
func simulatedDataset(t *testing.T) string {
	t.Helper()
	sc, err := scenarios.Decode("search-load-test.yaml", []byte(loadScenario))
	if err != nil {
		t.Fatal(err)
	}
	d, err := sim.Run(sim.Config{Scenario: sc}, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if _, err := sim.WriteDir(dir, d, sim.WriteOptions{SkipRINEX: true, SkipNPY: true}); err != nil {
		t.Fatal(err)
	}
	return dir
}

// TestLoadAndSearchSimulated runs the pipeline on a dataset written by
// package sim: the geometry the loader rebuilds (SP3 interpolation, frame
// rotation, this package's crossing solver) must reproduce sim's truth
// crossing times (crossings.csv), and the search must find the wall.
func TestLoadAndSearchSimulated(t *testing.T) {
	dir := simulatedDataset(t)
	net, d, err := Load(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Events) != 1 {
		t.Fatalf("%d events, want 1", len(d.Events))
	}
	ev := d.Events[0]
	// Crossing times from the loaded positions vs the truth catalogue.
	invStep := 1 / net.Step
	worst := 0.0
	for _, c := range d.Crossings {
		j := d.ClockIndex(c.Clock)
		p := make([]float64, net.Epochs())
		for k := range p {
			r := net.Pos(j, float64(k)*net.Step)
			p[k] = ev.N[0]*r[0] + ev.N[1]*r[1] + ev.N[2]*r[2]
		}
		k0 := int(ev.T0*invStep + 0.5)
		got := crossing(p, k0, ev.T0, 1/ev.Speed, invStep, float64(len(p)-1)-1e-9) * net.Step
		worst = math.Max(worst, math.Abs(got-c.TCross))
	}
	// 0.05 s: SP3 interpolation (mm–m), frame model and solver errors are
	// all far below this; a wrong frame or epoch would give seconds.
	if worst > 0.05 {
		t.Fatalf("crossing times differ from crossings.csv by up to %.3g s", worst)
	}
	t.Logf("%d crossing times agree with crossings.csv to %.2g s", len(d.Crossings), worst)

	res, err := Search(net, Config{Directions: 600, Thicknesses: []float64{0}, Speeds: []float64{233e3, 290e3, 361e3},
		T0Window: [2]float64{ev.T0 - 900, ev.T0 + 900}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Candidates) == 0 {
		t.Fatal("no candidate")
	}
	best := res.Candidates[0]
	for _, c := range res.Candidates {
		if c.Stat > best.Stat {
			best = c
		}
	}
	de := angle(best.N, ev.N)
	t.Logf("found stat %.1f at t0 %.0f s (true %.0f), direction error %.1f°, speed %.0f km/s, step %.3g s (true %.3g); σ_ref %.3g",
		best.Stat, best.T0, ev.T0, de, best.Speed/1e3, best.Amplitude, d.Crossings[0].Step, res.Noise.SigmaRef)
	if r := best.Amplitude / d.Crossings[0].Step; r < 0.5 || r > 1.5 {
		t.Errorf("fitted step %g s, injected %g s", best.Amplitude, d.Crossings[0].Step)
	}
	if math.Abs(best.T0-ev.T0) > 60 || de > 25 || best.Stat < 8 {
		t.Fatalf("candidate t0 %g s (true %g), direction error %.1f°, stat %.1f", best.T0, ev.T0, de, best.Stat)
	}
}

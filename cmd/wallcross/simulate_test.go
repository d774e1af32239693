package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/sim"
)

func TestSimulateCommand(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ds")
	code, stdout, stderr := runCLI(t, "simulate", "check-single-wall", "--out", dir, "--seed", "7", "--workers", "2")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, f := range []string{sim.ManifestFile, sim.RinexFile, sim.CSVFile, sim.NPYFile, sim.SP3File,
		sim.StationsFile, sim.EventsFile, sim.CrossingsFile, sim.NuisancesFile} {
		p := filepath.Join(dir, f)
		if !strings.Contains(stdout, p+"\t") {
			t.Errorf("stdout does not list %s:\n%s", p, stdout)
		}
		if _, err := os.Stat(p); err != nil {
			t.Error(err)
		}
	}
	d, err := sim.ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	if d.Seed != 7 || d.Epochs != 240 || len(d.Events) != 1 || d.Reference.Clocks[0] != "KVSR" {
		t.Errorf("dataset: seed %d, %d epochs, %d events, reference %v", d.Seed, d.Epochs, len(d.Events), d.Reference)
	}
	if !strings.Contains(stderr, "simulated check-single-wall: 32 clocks x 240 epochs") {
		t.Errorf("stderr %q", stderr)
	}
	cf, err := sim.ReadRinexClock(filepath.Join(dir, sim.RinexFile))
	if err != nil || len(cf.Records) != 32*240 || cf.Reference()[0] != "KVSR" {
		t.Errorf("clocks.clk: %v, %d records", err, len(cf.Records))
	}
}

func TestSimulateScenarioFile(t *testing.T) {
	tmp := t.TempDir()
	yaml := `name: tiny
time: {start: 2026-03-01T00:00:00, span: 1 h, step: 60 s}
constellations: [{kind: galileo-like, planes: 2, slots: 1}]
stations:
  - {id: ALFA, lat: 10 deg, lon: 20 deg, height: 0 m, reference: true}
  - {id: BETA, lat: -10 deg, lon: 120 deg, height: 0 m, clock: cs}
`
	sc := filepath.Join(tmp, "tiny.yaml")
	os.WriteFile(sc, []byte(yaml), 0o644)
	dir := filepath.Join(tmp, "out")
	code, _, stderr := runCLI(t, "simulate", sc, "--out", dir, "--no-rinex", "--no-sp3")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	d, err := sim.ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Clocks) != 4 || d.Epochs != 60 || d.Clocks[3].Family != "cs" {
		t.Errorf("clocks %+v, %d epochs", d.Clocks, d.Epochs)
	}
	if _, err := os.Stat(filepath.Join(dir, sim.RinexFile)); err == nil {
		t.Error("clocks.clk written despite --no-rinex")
	}
}

func TestSimulateErrors(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ds")
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"simulate", "demo"}, exitUsage, "missing --out"},
		{[]string{"simulate", "--out", dir}, exitUsage, "one SCENARIO"},
		{[]string{"simulate", "a", "b", "--out", dir}, exitUsage, "one SCENARIO"},
		{[]string{"simulate", "demo", "--out", dir, "--workers", "-1"}, exitUsage, "--workers"},
		{[]string{"simulate", "no-such-scenario", "--out", dir}, exitFailure, "no-such-scenario"},
		{[]string{"simulate", "demo", "--out", dir, "--seed", "x"}, exitUsage, "seed"},
	} {
		code, _, stderr := runCLI(t, c.args...)
		if code != c.code || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, code, stderr, c.code, c.want)
		}
	}
	if _, err := os.Stat(dir); err == nil {
		t.Error("a failed simulate created the output directory")
	}
}

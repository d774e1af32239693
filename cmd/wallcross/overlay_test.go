package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/internal/extdata"
)

func TestOverlayCommand(t *testing.T) {
	clk := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	sp3 := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3")
	dir := t.TempDir()
	// No wall: the output is the input byte for byte.
	code, out, errOut := runCLI(t, "overlay", clk, "--sp3", sp3, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	in, _ := os.ReadFile(clk)
	got, err := os.ReadFile(filepath.Join(dir, filepath.Base(clk)))
	if err != nil || !bytes.Equal(in, got) {
		t.Errorf("no-wall overlay differs from the input (err %v)", err)
	}
	if !strings.Contains(out, "0 of 15899 records changed") {
		t.Errorf("stdout %q", out)
	}
	// One strong wall.
	dir2 := t.TempDir()
	code, out, errOut = runCLI(t, "overlay", clk, "--sp3", sp3, "--out", dir2,
		"--event", "t0=2021-04-28T20:00:00,n=0.3:-0.4:0.866,speed=300km/s,thickness=1e4km,step=1ns")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	if !strings.Contains(out, "records changed by 1 walls") || strings.HasPrefix(out, "0 of") {
		t.Errorf("stdout %q", out)
	}
	for _, f := range []string{"events.csv", "crossings.csv", "manifest.json"} {
		if _, err := os.Stat(filepath.Join(dir2, f)); err != nil {
			t.Errorf("missing %s", f)
		}
	}
	ev, _ := os.ReadFile(filepath.Join(dir2, "events.csv"))
	if !strings.HasPrefix(string(ev), "event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu\n0,1800,") {
		t.Errorf("events.csv:\n%s", ev)
	}
	// Walls from a walls file: an explicit event and a seeded population
	// over the file's span; the same seed gives the same walls.
	wf := filepath.Join(t.TempDir(), "walls.yaml")
	os.WriteFile(wf, []byte("name: w\nseed: 5\nwalls:\n  step: 1 ns\n  population: {arrival_interval: 5 min}\n  events:\n    - {t0: 30 min, direction: [0.3, -0.4, 0.866]}\n"), 0o644)
	var evs [2]string
	for i := range evs {
		d := t.TempDir()
		if code, _, errOut := runCLI(t, "overlay", clk, "--sp3", sp3, "--out", d, "--scenario", wf); code != exitOK {
			t.Fatalf("--scenario: exit %d: %s", code, errOut)
		}
		b, _ := os.ReadFile(filepath.Join(d, "events.csv"))
		evs[i] = string(b)
	}
	if evs[0] != evs[1] || !strings.Contains(evs[0], "\n0,1800,") || strings.Count(evs[0], "\n") < 3 {
		t.Errorf("events from the walls file:\n%s\n%s", evs[0], evs[1])
	}
	bad := filepath.Join(t.TempDir(), "bad.yaml")
	os.WriteFile(bad, []byte("name: w\nwalls:\n  thickness: 1e4\n  events:\n    - {t0: 30 min, direction: [0, 0]}\n"), 0o644)
	if code, _, errOut := runCLI(t, "overlay", clk, "--sp3", sp3, "--out", t.TempDir(), "--scenario", bad); code != exitFailure ||
		!strings.Contains(errOut, "bad.yaml:3: walls.thickness: missing unit") || !strings.Contains(errOut, "bad.yaml:5: walls.events[0].direction: want three components") {
		t.Errorf("bad walls file: exit %d, %s", code, errOut)
	}
	// Bad inputs.
	for _, tc := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"overlay", clk, "--out", dir2}, exitUsage, "missing --sp3"},
		{[]string{"overlay", clk, "--sp3", sp3, "--out", dir2, "--event", "t0=1h"}, exitUsage, "t0 and n are required"},
		{[]string{"overlay", clk, "--sp3", sp3, "--out", dir2, "--event", "t0=1h,n=0:0:1,speed=3"}, exitUsage, "missing unit"},
		{[]string{"overlay", clk, "--sp3", extdata.Path(t, "set_B_2023-073_multi/COD0OPSRAP_20230730000_01D_05M_ORB.SP3"), "--out", dir2}, exitFailure, "different days?"},
		{[]string{"overlay", sp3, "--sp3", sp3, "--out", dir2}, exitFailure, "not a RINEX clock file"},
	} {
		code, _, errOut := runCLI(t, tc.args...)
		if code != tc.code || !strings.Contains(errOut, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", tc.args[1:], code, errOut, tc.code, tc.want)
		}
	}
}

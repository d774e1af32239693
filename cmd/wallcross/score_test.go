package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/internal/extdata"
	"wallcross/sim/score"
)

// The hand-made dataset of sim/score (one day, 4 clocks, 8 walls).
const (
	scoreDS    = "../../sim/score/testdata/ds1"
	scoreCands = "../../sim/score/testdata/candidates1.csv"
)

func TestScoreCommand(t *testing.T) {
	dir := t.TempDir()
	code, out, errOut := runCLI(t, "score", scoreDS, scoreCands, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, want := range []string{"found / missed    6 / 1", "1 in gaps", "3 false alarms = 3 per day", "2·R_max/v_min"} {
		if !strings.Contains(out, want) {
			t.Errorf("stdout lacks %q:\n%s", want, out)
		}
	}
	for _, f := range []string{"summary.json", "matches.csv", "efficiency.csv", "roc.csv"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
	b, _ := os.ReadFile(filepath.Join(dir, "efficiency.csv"))
	if !strings.HasPrefix(string(b), "thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,wilson_low,wilson_high,cp_low,cp_high\n") {
		t.Errorf("efficiency.csv header:\n%s", b)
	}
	// Threshold and direction test.
	code, out, errOut = runCLI(t, "score", scoreDS, scoreCands, "--threshold", "3", "--direction-tol", "30")
	if code != exitOK || !strings.Contains(out, "found / missed    4 / 3") || !strings.Contains(out, "stat ≥ 3") {
		t.Errorf("exit %d, stdout:\n%s\nstderr: %s", code, out, errOut)
	}
}

func TestScoreUsage(t *testing.T) {
	for _, args := range [][]string{
		{"score"},
		{"score", scoreDS},
		{"score", scoreDS, scoreCands, "extra"},
		{"score", scoreDS, scoreCands, "--window", "-5"},
		{"score", scoreDS, scoreCands, "--window", "abc"},
		{"score", scoreDS, scoreCands, "--direction-tol", "200"},
		{"score", scoreDS, scoreCands, "--threshold", "NaN"},
		{"score", scoreDS, scoreCands, "--threshold", "abc"},
		{"score", scoreDS, scoreCands, "--no-such-flag"},
	} {
		if code, _, errOut := runCLI(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2 (%s)", args, code, errOut)
		}
	}
}

func TestScoreBadCandidates(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct{ content, want string }{
		{"t0_s,stat\n100,5\n200,high\n", `bad.csv:3: column stat: bad number "high"`},
		{"time,stat\n100,5\n", `bad.csv:1: missing required column "t0_s"`},
		{"t0_s,stat,nx,ny,nz\n100,5,1,0\n", "bad.csv: record on line 2: wrong number of fields"},
		{"t0_s,stat,nx,ny,nz\n100,5,1,,\n", "bad.csv:2: columns nx,ny,nz: give all three"},
	} {
		p := filepath.Join(dir, "bad.csv")
		if err := os.WriteFile(p, []byte(c.content), 0o644); err != nil {
			t.Fatal(err)
		}
		code, _, errOut := runCLI(t, "score", scoreDS, p)
		if code != exitFailure || !strings.Contains(errOut, c.want) {
			t.Errorf("%q: exit %d, stderr %q; want 1 and %q", c.content, code, errOut, c.want)
		}
	}
	// Directions requested but none given.
	p := filepath.Join(dir, "nodir.csv")
	os.WriteFile(p, []byte("t0_s,stat\n5000,1\n"), 0o644)
	if code, _, errOut := runCLI(t, "score", scoreDS, p, "--direction-tol", "10"); code != exitFailure || !strings.Contains(errOut, "no nx,ny,nz") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
	// Missing dataset.
	if code, _, errOut := runCLI(t, "score", filepath.Join(dir, "none"), scoreCands); code != exitFailure || !strings.Contains(errOut, "events.csv") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
}

// TestScoreSimulated scores a candidate list against the simulator's
// check-single-wall dataset: one candidate 10 s after the true t0 with the
// true direction, and one far away.
func TestScoreSimulated(t *testing.T) {
	ds := filepath.Join(t.TempDir(), "ds")
	if code, _, errOut := runCLI(t, "simulate", "check-single-wall", "--out", ds, "--seed", "3"); code != exitOK {
		t.Fatalf("simulate: exit %d: %s", code, errOut)
	}
	tr, err := score.ReadTruth(ds)
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Events) != 1 || tr.RMax < 2.6e7 || tr.RMax > 3e7 {
		t.Fatalf("truth: %d events, R_max %g m", len(tr.Events), tr.RMax)
	}
	e := tr.Events[0]
	cands := filepath.Join(t.TempDir(), "c.csv")
	content := fmt.Sprintf("t0_s,stat,nx,ny,nz\n%g,9,%g,%g,%g\n%g,2,1,0,0\n", e.T0+10, e.N[0], e.N[1], e.N[2], e.T0+2000)
	if err := os.WriteFile(cands, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	code, stdout, errOut := runCLI(t, "score", ds, cands, "--direction-tol", "5", "--out", out)
	if code != exitOK {
		t.Fatalf("score: exit %d: %s", code, errOut)
	}
	if !strings.Contains(stdout, "found / missed    1 / 0") || !strings.Contains(stdout, "1 false alarms") {
		t.Errorf("stdout:\n%s", stdout)
	}
	if code, stdout, errOut = runCLI(t, "reach", filepath.Join(out, "efficiency.csv"), "--mean-interval", "1 yr", "--span", "10yr"); code != exitOK || !strings.Contains(stdout, "no_limit") {
		t.Errorf("reach: exit %d\n%s\n%s", code, stdout, errOut)
	}
}

// TestScoreOverlay injects one wall into a real IGS clock file with
// overlay and scores a candidate list against the result (no clocks.csv:
// score reads the RINEX clock file for the data coverage).
func TestScoreOverlay(t *testing.T) {
	clk := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	sp3 := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3")
	ov := t.TempDir()
	if code, _, errOut := runCLI(t, "overlay", clk, "--sp3", sp3, "--out", ov,
		"--event", "t0=2021-04-28T20:00:00,n=0.3:-0.4:0.866,speed=300km/s,thickness=1e4km,step=1ns"); code != exitOK {
		t.Fatalf("overlay: exit %d: %s", code, errOut)
	}
	cands := filepath.Join(t.TempDir(), "c.csv")
	// The clock file starts at 19:30 GPST, so t0 = 1800 s.
	os.WriteFile(cands, []byte("t0_s,stat\n1805,4\n3000,1\n"), 0o644)
	code, stdout, errOut := runCLI(t, "score", ov, cands)
	if code != exitOK {
		t.Fatalf("score: exit %d: %s", code, errOut)
	}
	if !strings.Contains(stdout, "found / missed    1 / 0") || !strings.Contains(stdout, "1 false alarms") {
		t.Errorf("stdout:\n%s", stdout)
	}
}

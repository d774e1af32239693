package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A small efficiency table: at d = 1e6 m 100/100 found at Λ = 1e12 GeV and
// 0/100 at 1e13; d = 1e5 m nothing found.
const reachTable = `thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,wilson_low,wilson_high,cp_low,cp_high
1e6,300000,1e12,,100,100,,,,,
1e6,300000,1e13,,100,0,,,,,
1e5,300000,1e12,,100,0,,,,,
`

func writeReachTable(t *testing.T) string {
	p := filepath.Join(t.TempDir(), "efficiency.csv")
	if err := os.WriteFile(p, []byte(reachTable), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestReachCommand(t *testing.T) {
	tab := writeReachTable(t)
	dir := t.TempDir()
	code, out, errOut := runCLI(t, "reach", tab, "--mean-interval", "1yr", "--span", "10 yr", "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	// Λ = 10^(12 + (0.025^0.01 − 0.2303)/0.025^0.01) ≈ 5.769e12 GeV (sim/score TestReach).
	for _, want := range []string{"5.769e+12", "no_limit", "Clopper–Pearson lower bound", "≥ 2.303"} {
		if !strings.Contains(out, want) {
			t.Errorf("stdout lacks %q:\n%s", want, out)
		}
	}
	for _, f := range []string{"reach.csv", "reach.png"} {
		if fi, err := os.Stat(filepath.Join(dir, f)); err != nil || fi.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	// Several intervals with the injected one; SVG plot.
	code, out, errOut = runCLI(t, "reach", tab, "--mean-interval", "1yr,2yr", "--mean-interval", "5 yr", "--injected-interval", "1yr",
		"--span", "3652.5d", "--cl", "0.9", "--out", dir, "--plot", "reach.svg")
	if code != exitOK || !strings.Contains(out, "no_limit_possible") {
		t.Errorf("exit %d, stdout:\n%s\nstderr %s", code, out, errOut)
	}
	if _, err := os.Stat(filepath.Join(dir, "reach.svg")); err != nil {
		t.Error(err)
	}
}

func TestReachUsage(t *testing.T) {
	tab := writeReachTable(t)
	for _, args := range [][]string{
		{"reach"},
		{"reach", tab, "--span", "1yr"},
		{"reach", tab, "--mean-interval", "1yr"},
		{"reach", tab, "--mean-interval", "1 parsec", "--span", "1yr"},
		{"reach", tab, "--mean-interval", "1yr", "--span", "10"},
		{"reach", tab, "--mean-interval", "-1yr", "--span", "1yr"},
		{"reach", tab, "--mean-interval", "1yr", "--span", "1yr", "--cl", "1.2"},
		{"reach", tab, "--mean-interval", "1yr,2yr", "--span", "1yr"},
		{"reach", tab, tab, "--mean-interval", "1yr", "--span", "1yr"},
	} {
		if code, _, errOut := runCLI(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2 (%s)", args, code, errOut)
		}
	}
	bad := filepath.Join(t.TempDir(), "bad.csv")
	os.WriteFile(bad, []byte("thickness_m,lambda_eff_gev,n,found\n1e6,1e12,10,20\n"), 0o644)
	if code, _, errOut := runCLI(t, "reach", bad, "--mean-interval", "1yr", "--span", "1yr"); code != exitFailure || !strings.Contains(errOut, "bad.csv:2:") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
}

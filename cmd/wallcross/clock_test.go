package main

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"wallcross/noise"
	"wallcross/noise/stability"
)

func TestClockCommand(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.csv")
	code, _, errb := runCLI(t, "clock", "--family", "gps-iif-rb", "--span", "1d", "--step", "30s", "--seed", "7", "--id", "G01", "--out", a)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	b1, err := os.ReadFile(a)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b1)), "\n")
	if lines[0] != "t_s,G01" || len(lines) != 2881 { // header + 2880 samples (t < 1 d)
		t.Fatalf("header %q, %d lines; want t_s,G01 and 2880 samples", lines[0], len(lines))
	}
	if !strings.HasPrefix(lines[2], "30,") {
		t.Errorf("second sample %q, want t_s = 30", lines[2])
	}
	// same seed → same bytes; other seed → other bytes
	b := filepath.Join(dir, "b.csv")
	runCLI(t, "clock", "--family", "gps-iif-rb", "--span", "1d", "--step", "30s", "--seed", "7", "--id", "G01", "--out", b)
	b2, _ := os.ReadFile(b)
	if !bytes.Equal(b1, b2) {
		t.Error("same seed gave different files")
	}
	runCLI(t, "clock", "--family", "gps-iif-rb", "--span", "1d", "--step", "30s", "--seed", "8", "--id", "G01", "--out", b)
	b3, _ := os.ReadFile(b)
	if bytes.Equal(b1, b3) {
		t.Error("different seeds gave the same file")
	}
}

// TestClockExplicitH: a white-FM clock from --h has ADEV(τ) = √(h0/(2τ))
// (IEEE 1139 / SP 1065 conversion table), and --drift adds Dτ/√2.
func TestClockExplicitH(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "w.csv")
	code, _, errb := runCLI(t, "clock", "--h", "h0=2e-22", "--span", "20000s", "--step", "1s", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	s, err := readSeries(out, 0)
	if err != nil {
		t.Fatal(err)
	}
	r := stability.OADEV(s[0].Data, s[0].Tau0, []int{1, 10})
	for _, v := range r {
		want := math.Sqrt(2e-22 / (2 * v.Tau))
		if math.Abs(v.Value/want-1) > 4/math.Sqrt(2*v.EDF) {
			t.Errorf("τ=%g s: ADEV %g, want %g", v.Tau, v.Value, want)
		}
	}
	code, _, errb = runCLI(t, "clock", "--h", "h0=0", "--drift", "1e-12/d", "--span", "2000s", "--step", "10s", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	s, _ = readSeries(out, 0)
	d := stability.OADEV(s[0].Data, s[0].Tau0, []int{5})[0]
	if want := 1e-12 / 86400 * 50 / math.Sqrt2; math.Abs(d.Value/want-1) > 1e-6 {
		t.Errorf("drift only: ADEV(50 s) = %g, want Dτ/√2 = %g", d.Value, want)
	}
}

func TestClockUsageErrors(t *testing.T) {
	out := filepath.Join(t.TempDir(), "x.csv")
	for _, c := range []struct {
		args []string
		hint string
	}{
		{[]string{"clock", "--out", out}, "need --family"},
		{[]string{"clock", "--family", "gps-iif-rb"}, "--out"},
		{[]string{"clock", "--family", "nosuch", "--out", out}, `unknown clock family "nosuch"`},
		{[]string{"clock", "--h", "h7=1", "--out", out}, `unknown power-law term "h7"`},
		{[]string{"clock", "--h", "h0=-1", "--out", out}, "≥ 0"},
		{[]string{"clock", "--h", "h0", "--out", out}, "KEY=VAL"},
		{[]string{"clock", "--h", "h0=1e-24", "--step", "0s", "--out", out}, "--step"},
		{[]string{"clock", "--h", "h0=1e-24", "--span", "1yr", "--step", "1ms", "--out", out}, "samples"},
		{[]string{"clock", "--h", "h0=1e-24", "--drift", "3 apples", "--out", out}, "--drift"},
		{[]string{"clock", "--h", "h0=1e-24", "--id", "a,b", "--out", out}, "--id"},
		{[]string{"clock", "extra", "--h", "h0=1e-24", "--out", out}, "no positional"},
	} {
		code, _, errb := runCLI(t, c.args...)
		if code != exitUsage || !strings.Contains(errb, c.hint) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", c.args, code, errb, c.hint)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a failed run left an output file")
	}
}

// TestClockPresetLevels: the CLI series of every family has the OADEV its
// preset promises at the family's sample interval (within the χ² interval,
// 4σ), so the command passes the preset through unchanged.
func TestClockPresetLevels(t *testing.T) {
	dir := t.TempDir()
	for _, fam := range []string{"gps-iii-rb", "galileo-phm"} {
		f, _ := noise.LookupFamily(fam)
		out := filepath.Join(dir, fam+".csv")
		step := strconv.FormatFloat(f.Tau0, 'g', -1, 64) + "s"
		code, _, errb := runCLI(t, "clock", "--family", fam, "--span", "20000s", "--step", step, "--out", out)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", fam, code, errb)
		}
		s, err := readSeries(out, 0)
		if err != nil {
			t.Fatal(err)
		}
		m, _ := noise.Preset(fam)
		for _, v := range stability.OADEV(s[0].Data, s[0].Tau0, []int{1, 4}) {
			want := m.ADEV(v.Tau, f.Tau0)
			if math.Abs(v.Value/want-1) > 4/math.Sqrt(2*v.EDF) {
				t.Errorf("%s τ=%g s: OADEV %g, preset %g", fam, v.Tau, v.Value, want)
			}
		}
	}
}

func TestClockTimeColumn(t *testing.T) {
	out := filepath.Join(t.TempDir(), "t.csv")
	if code, _, errb := runCLI(t, "clock", "--h", "h0=1e-24", "--span", "1s", "--step", "100ms", "--out", out); code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	b, _ := os.ReadFile(out)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) != 11 || !strings.HasPrefix(lines[4], "0.3,") || !strings.HasPrefix(lines[10], "0.9,") {
		t.Errorf("time column: %q", lines)
	}
	s, err := readSeries(out, 0)
	if err != nil || s[0].Tau0 != 0.1 || len(s[0].Data) != 10 {
		t.Errorf("read back: %v, %+v", err, s)
	}
}

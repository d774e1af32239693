package main

import (
	"encoding/csv"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"wallcross/internal/extdata"
)

// regenStability rewrites the stability goldens:
// go test ./cmd/wallcross -run Stability -regen-stability
var regenStability = flag.Bool("regen-stability", false, "rewrite testdata/stability_*.golden")

func checkTextGolden(t *testing.T, got, name string) {
	t.Helper()
	p := filepath.Join("testdata", name)
	if *regenStability {
		if err := os.WriteFile(p, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(p)
	if err != nil {
		t.Fatalf("%v (run with -regen-stability to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s:\n--- got\n%s--- want\n%s", p, got, want)
	}
}

func writeLines(t *testing.T, name string, vals []float64) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("# test data\n")
	for _, v := range vals {
		b.WriteString(strconv.FormatFloat(v, 'g', -1, 64) + "\n")
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// riley1000Data is the 1000-point set of NIST SP 1065 Table 31 (Park–Miller
// LCG from n_0 = 1234567890, y_i = n_i/(2^31 − 1)).
func riley1000Data() []float64 {
	y := make([]float64, 1000)
	n := int64(1234567890)
	for i := range y {
		y[i] = float64(n) / 2147483647
		n = 16807 * n % 2147483647
	}
	return y
}

func parseStabilityCSV(t *testing.T, out string) map[string]map[float64]float64 {
	t.Helper()
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], ",") != "clock,stat,tau_s,n,value,ci_low,ci_high,edf" {
		t.Fatalf("CSV header %v", recs[0])
	}
	res := map[string]map[float64]float64{}
	for _, r := range recs[1:] {
		tau, _ := strconv.ParseFloat(r[2], 64)
		v, _ := strconv.ParseFloat(r[4], 64)
		k := r[0] + " " + r[1]
		if res[k] == nil {
			res[k] = map[float64]float64{}
		}
		res[k][tau] = v
	}
	return res
}

// TestStabilitySP1065 runs the command on the SP 1065 test sets written as
// single-column frequency files and checks Tables 30 and 31.
func TestStabilitySP1065(t *testing.T) {
	nbs := writeLines(t, "nbs9.txt", []float64{892, 809, 823, 798, 671, 644, 883, 903, 677})
	code, out, errb := runCLI(t, "stability", nbs, "--input", "frequency", "--tau0", "1", "--stat", "adev,oadev,mdev,tdev,hdev,ohdev,totdev", "--taus", "all")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	checkTextGolden(t, out, "stability_nbs9.golden")

	p := writeLines(t, "riley.txt", riley1000Data())
	code, out, errb = runCLI(t, "stability", p, "--input", "frequency", "--stat", "adev,oadev,mdev,tdev,hdev,ohdev,totdev", "--taus", "decade", "--csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	got := parseStabilityCSV(t, out)
	want := map[string][3]float64{ // SP 1065 Table 31, m = 1, 10, 100
		"adev":   {2.922319e-01, 9.965736e-02, 3.897804e-02},
		"oadev":  {2.922319e-01, 9.159953e-02, 3.241343e-02},
		"mdev":   {2.922319e-01, 6.172376e-02, 2.170921e-02},
		"tdev":   {1.687202e-01, 3.563623e-01, 1.253382e+00},
		"hdev":   {2.943883e-01, 1.052754e-01, 3.910860e-02},
		"ohdev":  {2.943883e-01, 9.581083e-02, 3.237638e-02},
		"totdev": {2.922319e-01, 9.134743e-02, 3.406530e-02},
	}
	for st, w := range want {
		for i, tau := range []float64{1, 10, 100} {
			g, ok := got["riley "+st][tau]
			if !ok || !scalar.EqualWithinRel(g, w[i], 1e-6) {
				t.Errorf("%s τ=%g: %g, want %g", st, tau, g, w[i])
			}
		}
	}
	checkTextGolden(t, out, "stability_riley1000.golden")
}

// TestStabilityRinexClock reads the real CODE 30-s clock product of set A
// (through sim.ReadRinexClock) and checks the overlapping ADEV of the GPS
// satellite groups against the ranges the reference measured with its own
// independent script on the same file (gnss.md §5.1, 2021-04-28 19:30–20:30
// GPST; equal to the printed digits), and the Galileo medians.
func TestStabilityRinexClock(t *testing.T) {
	clk := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	code, out, errb := runCLI(t, "stability", clk, "--taus", "decade", "--csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	got := parseStabilityCSV(t, out)
	type rng struct{ lo, hi string } // as printed in gnss.md §5.1
	groups := []struct {
		name   string
		clocks string
		ranges map[float64]rng
	}{
		{"GPS low-noise", "G01 G03 G04 G06 G09 G10 G14 G18 G23 G24 G25 G26 G27 G30 G32",
			map[float64]rng{30: {"2.0e-13", "4.3e-13"}, 60: {"1.0e-13", "3.2e-13"}, 300: {"3.6e-14", "14e-14"}, 600: {"1.9e-14", "9.8e-14"}}},
		{"GPS high-noise", "G02 G05 G07 G08 G12 G13 G15 G16 G17 G19 G20 G21 G22 G28 G29 G31",
			map[float64]rng{30: {"1.8e-12", "3.4e-12"}, 60: {"1.5e-12", "3.2e-12"}, 300: {"4.9e-13", "10.7e-13"}, 600: {"2.1e-13", "7.4e-13"}}},
	}
	// printed value and half a unit of its last digit
	printed := func(s string) (v, half float64) {
		mant, exp, _ := strings.Cut(s, "e")
		v, _ = strconv.ParseFloat(s, 64)
		e, _ := strconv.Atoi(exp)
		dec := 0
		if _, frac, ok := strings.Cut(mant, "."); ok {
			dec = len(frac)
		}
		return v, 0.5 * math.Pow(10, float64(e-dec))
	}
	for _, g := range groups {
		for tau, r := range g.ranges {
			lo, hi := math.Inf(1), math.Inf(-1)
			for _, c := range strings.Fields(g.clocks) {
				v, ok := got[c+" oadev"][tau]
				if !ok {
					t.Fatalf("%s: no OADEV at %g s", c, tau)
				}
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
			wlo, hlo := printed(r.lo)
			whi, hhi := printed(r.hi)
			if math.Abs(lo-wlo) > hlo*1.0001 || math.Abs(hi-whi) > hhi*1.0001 {
				t.Errorf("%s σ_y(%g s) spans %.3g–%.3g, reference %s–%s", g.name, tau, lo, hi, r.lo, r.hi)
			}
		}
	}
	var gal []string
	for k := range got {
		if strings.HasPrefix(k, "E") {
			gal = append(gal, k)
		}
	}
	if len(gal) != 24 {
		t.Errorf("%d Galileo clocks, reference counts 24", len(gal))
	}
	for tau, want := range map[float64]float64{30: 1.9e-13, 60: 1.2e-13, 300: 4.9e-14, 600: 2.9e-14} {
		var v []float64
		for _, k := range gal {
			v = append(v, got[k][tau])
		}
		sort.Float64s(v)
		med := (v[len(v)/2-1] + v[len(v)/2]) / 2
		if math.Abs(med/want-1) > 0.05 {
			t.Errorf("Galileo median σ_y(%g s) = %.3g, reference %.2g", tau, med, want)
		}
	}
	// one clock only, plotted
	plot := filepath.Join(t.TempDir(), "g01.svg")
	code, out, errb = runCLI(t, "stability", clk, "--clock", "G01", "--stat", "oadev,mdev", "--plot", plot, "--family", "gps-iif-rb")
	if code != exitOK || !strings.Contains(out, "G01") || strings.Contains(out, "G02") {
		t.Fatalf("--clock G01: exit %d, %s\n%s", code, errb, out)
	}
	if b, err := os.ReadFile(plot); err != nil || !strings.Contains(string(b), "<svg") {
		t.Errorf("plot not written as SVG: %v", err)
	}
}

// TestStabilityWideCSVRoundTrip: a clock written by 'wallcross clock' is read
// back with its τ0; a gap row and a missing epoch become gaps.
func TestStabilityWideCSVRoundTrip(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "c.csv")
	var b strings.Builder
	b.WriteString("t_s,A,B\n")
	for k := 0; k < 400; k++ {
		if k == 100 {
			continue // missing epoch
		}
		a := strconv.FormatFloat(1e-9*math.Sin(float64(k)), 'g', -1, 64)
		bv := strconv.FormatFloat(2e-9*float64(k%7), 'g', -1, 64)
		if k == 200 {
			bv = "" // gap cell
		}
		fmt.Fprintf(&b, "%d,%s,%s\n", 30*k, a, bv)
	}
	os.WriteFile(p, []byte(b.String()), 0o644)
	s, err := readSeries(p, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(s) != 2 || s[0].ID != "A" || s[1].ID != "B" || s[0].Tau0 != 30 || len(s[0].Data) != 400 {
		t.Fatalf("read %d series, %+v", len(s), s[0].Tau0)
	}
	if !math.IsNaN(s[0].Data[100]) || !math.IsNaN(s[1].Data[200]) || math.IsNaN(s[1].Data[100+1]) {
		t.Error("gaps not placed at the missing epoch / empty cell")
	}
	code, out, errb := runCLI(t, "stability", p, "--clock", "B", "--csv", "--stat", "mdev")
	if code != exitOK || !strings.Contains(out, "B,mdev,30,") {
		t.Errorf("exit %d: %s\n%s", code, errb, out)
	}
}

func TestStabilityBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name, content string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(content), 0o644)
		return p
	}
	for _, c := range []struct {
		file, content string
		args          []string
		code          int
		hint          string
	}{
		{"empty.txt", "", nil, exitFailure, "empty file"},
		{"word.txt", "1\n2\nthree\n", nil, exitFailure, "word.txt:3: want one number per line"},
		{"fields.csv", "t_s,A\n0,1\n30,2,3\n", nil, exitFailure, "fields.csv:3: 3 fields, want 2"},
		{"badt.csv", "t_s,A\n0,1\nx,2\n", nil, exitFailure, `badt.csv:3: bad t_s "x"`},
		{"badv.csv", "t_s,A\n0,1\n30,inf\n", nil, exitFailure, `badv.csv:3: bad value "inf"`},
		{"dup.csv", "t_s,A,A\n0,1,2\n", nil, exitFailure, "repeated clock id"},
		{"offgrid.csv", "t_s,A\n0,1\n30,2\n60,3\n75,4\n", nil, exitFailure, "off the 30 s grid"},
		{"again.csv", "t_s,A\n0,1\n30,2\n30,3\n", nil, exitFailure, "duplicate epoch"},
		{"short.txt", "1\n2\n", nil, exitOK, "too few points"},
		{"ok.txt", "1\n2\n3\n4\n5\n6\n7\n8\n", []string{"--clock", "nope"}, exitFailure, `no clock "nope"`},
		{"ok2.txt", "1\n2\n3\n", []string{"--stat", "xdev"}, exitUsage, `unknown statistic "xdev"`},
		{"ok3.txt", "1\n2\n3\n", []string{"--taus", "weekly"}, exitUsage, "--taus"},
		{"ok4.txt", "1\n2\n3\n", []string{"--plot", "x.pdf"}, exitUsage, ".svg or .png"},
		{"ok5.txt", "1\n2\n3\n", []string{"--input", "voltage"}, exitUsage, "--input"},
		{"tau.csv", "t_s,A\n0,1\n30,2\n60,3\n", []string{"--tau0", "10"}, exitFailure, "does not match"},
		{"rinex.clk", "     3.04           C                                       RINEX VERSION / TYPE\n", nil, exitFailure, "rinex.clk"},
	} {
		p := write(c.file, c.content)
		code, _, errb := runCLI(t, append([]string{"stability", p}, c.args...)...)
		if code != c.code || !strings.Contains(errb, c.hint) {
			t.Errorf("%s: exit %d, stderr %q; want %d and %q", c.file, code, errb, c.code, c.hint)
		}
	}
	code, _, errb := runCLI(t, "stability", filepath.Join(dir, "missing.csv"))
	if code != exitFailure || !strings.Contains(errb, "missing.csv") {
		t.Errorf("missing file: exit %d, %q", code, errb)
	}
	if code, _, _ := runCLI(t, "stability"); code != exitUsage {
		t.Errorf("no FILE: exit %d, want 2", code)
	}
}

// FuzzStabilityRead: arbitrary file content never panics the readers or
// the statistics.
func FuzzStabilityRead(f *testing.F) {
	f.Add([]byte("t_s,A\n0,1e-9\n30,2e-9\n60,\n90,4e-9\n"))
	f.Add([]byte("1\n2\n#c\n3\nNaN\n5\n"))
	f.Add([]byte("     3.04           C                                       RINEX VERSION / TYPE\n"))
	f.Add([]byte("t_s,A\n0,1\n1e308,2\n"))
	f.Add([]byte("t_s,A\n0,1\n1e-300,2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		p := filepath.Join(dir, "in")
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		runCLI(t, "stability", p, "--stat", "adev,oadev,mdev,hdev,ohdev,totdev", "--csv")
	})
}

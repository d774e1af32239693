package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs the command line and returns exit code, stdout, stderr.
func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(append([]string{"wallcross"}, args...), &out, &errb)
	return code, out.String(), errb.String()
}

func TestHelp(t *testing.T) {
	for _, args := range [][]string{{"--help"}, {"help"}, {"-h"}} {
		code, out, _ := runCLI(t, args...)
		if code != exitOK {
			t.Errorf("%v: exit %d, want 0", args, code)
		}
		for _, c := range commands() {
			if !strings.Contains(out, "  "+c.Name+" ") {
				t.Errorf("%v: command list lacks %q:\n%s", args, c.Name, out)
			}
		}
	}
	code, out, _ := runCLI(t, "help", "scenario")
	if code != exitOK || !strings.Contains(out, "usage: wallcross scenario") || !strings.Contains(out, "scenario check FILE") {
		t.Errorf("help scenario: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, "scenario", "--help")
	if code != exitOK || !strings.Contains(out, "usage: wallcross scenario") {
		t.Errorf("scenario --help: exit %d\n%s", code, out)
	}
}

func TestUsageErrors(t *testing.T) {
	for _, tc := range []struct {
		args []string
		hint string
	}{
		{nil, "usage: wallcross COMMAND"},
		{[]string{"frobnicate"}, `unknown command "frobnicate"`},
		{[]string{"help", "frobnicate"}, `unknown command "frobnicate"`},
		{[]string{"scenario", "--no-such-flag"}, "unknown flag: --no-such-flag"},
		{[]string{"scenario"}, "missing subcommand"},
		{[]string{"scenario", "check"}, "needs at least one FILE"},
		{[]string{"version", "extra"}, "takes no arguments"},
	} {
		code, _, errOut := runCLI(t, tc.args...)
		if code != exitUsage {
			t.Errorf("%v: exit %d, want %d", tc.args, code, exitUsage)
		}
		if !strings.Contains(errOut, tc.hint) {
			t.Errorf("%v: stderr %q lacks %q", tc.args, errOut, tc.hint)
		}
	}
}

func TestVersion(t *testing.T) {
	code, out, _ := runCLI(t, "version")
	if code != exitOK || !strings.HasPrefix(out, "wallcross ") || !strings.Contains(out, "revision") {
		t.Errorf("version: exit %d, %q", code, out)
	}
}

func TestScenarioListShowCheck(t *testing.T) {
	code, out, _ := runCLI(t, "scenario", "list")
	if code != exitOK || !strings.Contains(out, "demo") || !strings.Contains(out, "check-single-wall") {
		t.Errorf("scenario list: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, "scenario", "show", "check-single-wall")
	if code != exitOK || !strings.Contains(out, "name: check-single-wall") {
		t.Errorf("scenario show: exit %d\n%s", code, out)
	}
	// What show prints must check clean.
	f := filepath.Join(t.TempDir(), "demo.yaml")
	_, src, _ := runCLI(t, "scenario", "show", "demo")
	if err := os.WriteFile(f, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ = runCLI(t, "scenario", "check", f)
	if code != exitOK || !strings.HasSuffix(out, "ok\n") {
		t.Errorf("scenario check demo: exit %d\n%s", code, out)
	}
	code, _, errOut := runCLI(t, "scenario", "show", "nonesuch")
	if code != exitFailure || !strings.Contains(errOut, "no built-in scenario") {
		t.Errorf("scenario show nonesuch: exit %d, %s", code, errOut)
	}
}

// TestScenarioCheckProblems: an unknown key, a missing unit and a negative
// duration are all reported with their lines, and the exit code is 1.
func TestScenarioCheckProblems(t *testing.T) {
	f := filepath.Join(t.TempDir(), "bad.yaml")
	src := `name: bad
time:
  start: 2026-01-01T00:00:00
  span: 1 d
  step: -30 s
constellations:
  - kind: gps-like
    altitude: 20000
stations:
  - {id: ABCD, lat: 10 deg, lon: 20 deg, reference: true}
walls:
  thicknes: 1e4 km
`
	if err := os.WriteFile(f, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errOut := runCLI(t, "scenario", "check", f)
	if code != exitFailure {
		t.Errorf("exit %d, want 1", code)
	}
	for _, want := range []string{
		f + ":5: time.step: must be positive, got \"-30 s\"",
		f + ":8: constellations[0].altitude: missing unit in \"20000\"",
		f + ":12: walls.thicknes: unknown key \"thicknes\"",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	if !strings.Contains(errOut, "1 of 1 scenario files have problems") {
		t.Errorf("stderr = %q", errOut)
	}
}

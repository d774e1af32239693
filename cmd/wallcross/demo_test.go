package main

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/sim"
)

func TestDemoCommand(t *testing.T) {
	out := t.TempDir()
	code, stdout, stderr := runCLI(t, "demo", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	dir := filepath.Join(out, "dataset")
	for _, f := range []string{sim.ManifestFile, sim.RinexFile, sim.CSVFile, sim.NPYFile, sim.SP3File,
		sim.StationsFile, sim.EventsFile, sim.CrossingsFile, sim.NuisancesFile} {
		p := filepath.Join(dir, f)
		if !strings.Contains(stdout, p) {
			t.Errorf("demo output does not say where %s went:\n%s", f, stdout)
		}
		if st, err := os.Stat(p); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", p, err)
		}
	}
	d, err := sim.ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	if d.Epochs != 2880 || len(d.Clocks) != 60 || len(d.Events) < 2 {
		t.Errorf("%d epochs, %d clocks, %d events", d.Epochs, len(d.Clocks), len(d.Events))
	}
	// numpy (python3-numpy, an independent NPY reader) agrees with the CSV.
	py := "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("python3 missing (required with CI=true)")
		}
		t.Skip("python3 missing")
	}
	res, err := exec.Command(py, "../../sim/testdata/npy_vs_csv.py", dir).CombinedOutput()
	var ee *exec.ExitError
	if errors.As(err, &ee) && ee.ExitCode() == 3 {
		if os.Getenv("CI") == "true" {
			t.Fatal("python3-numpy missing (required with CI=true)")
		}
		t.Skip("python3-numpy missing")
	}
	if err != nil || !strings.HasPrefix(string(res), "ok 2880 60 ") {
		t.Fatalf("npy_vs_csv.py: %v\n%s", err, res)
	}
}

func TestDemoArgs(t *testing.T) {
	if code, _, _ := runCLI(t, "demo", "extra"); code != exitUsage {
		t.Errorf("demo extra: exit %d, want %d", code, exitUsage)
	}
}

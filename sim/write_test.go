package sim

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func sameBias(t *testing.T, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("bias has %d values, want %d", len(got), len(want))
	}
	for i := range got {
		if math.Float64bits(got[i]) != math.Float64bits(want[i]) && !(math.IsNaN(got[i]) && math.IsNaN(want[i])) {
			t.Fatalf("bias[%d] = %v, want %v (bit for bit)", i, got[i], want[i])
		}
	}
}

func TestWriteReadDatasetRoundTrip(t *testing.T) {
	d := testDataset(t)
	dir := t.TempDir()
	paths, err := WriteDir(dir, d, WriteOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if filepath.Base(paths[len(paths)-1]) != ManifestFile {
		t.Errorf("manifest not written last: %v", paths)
	}
	for _, name := range []string{ManifestFile, RinexFile, CSVFile, NPYFile, StationsFile, EventsFile, CrossingsFile, NuisancesFile} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("missing %s: %v", name, err)
		}
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
	got, err := ReadDataset(dir)
	if err != nil {
		t.Fatal(err)
	}
	sameBias(t, got.Bias, d.Bias)
	want := *d
	got.Bias, want.Bias = nil, nil
	if !reflect.DeepEqual(got, &want) {
		t.Errorf("read back\n%+v\nwant\n%+v", got, &want)
	}
	// The same dataset read from the NPY file instead of the CSV.
	dir2 := t.TempDir()
	if _, err := WriteDir(dir2, d, WriteOptions{SkipCSV: true, SkipRINEX: true}); err != nil {
		t.Fatal(err)
	}
	got2, err := ReadDataset(dir2)
	if err != nil {
		t.Fatal(err)
	}
	sameBias(t, got2.Bias, d.Bias)

	// Manifest content.
	m, err := ReadManifest(dir)
	if err != nil {
		t.Fatal(err)
	}
	if m.TimeSystem != "GPS" || m.Seed != 42 || m.IntervalS != 30 || m.Epochs != 9 || m.SpanS != 270 ||
		m.Start != "2021-04-28T23:58:00" || len(m.Files) != 7 || string(m.Scenario) != `{"name":"unit"}` {
		t.Errorf("manifest %+v", m)
	}
	for name, s := range m.Files {
		fs, err := fileSum(filepath.Join(dir, name))
		if err != nil || fs != s {
			t.Errorf("%s: checksum %v, manifest %v (%v)", name, fs, s, err)
		}
	}
}

func TestCSVContent(t *testing.T) {
	d := testDataset(t)
	dir := t.TempDir()
	if _, err := WriteDir(dir, d, WriteOptions{SkipRINEX: true}); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(filepath.Join(dir, CSVFile))
	lines := strings.Split(string(b), "\n")
	if lines[0] != "t_s,G01,E11,ALBA00XYZ,BRIO" || !strings.HasPrefix(lines[1], "0,0,-3.3e-15,") ||
		!strings.HasPrefix(lines[3], "60,") || strings.Split(lines[3], ",")[2] != "" || len(lines) != d.Epochs+2 {
		t.Errorf("clocks.csv starts %q", lines[:4])
	}
	for name, head := range map[string]string{
		StationsFile:  "id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock\nALBA00XYZ,4327318.171,566956.021,4636425.977,46.9,7.46,611.2,hmaser\n",
		EventsFile:    "event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu\n0,61.5,0.6,0,-0.8,300000,10000000,gaussian,1e+12,1.25e-13\n",
		CrossingsFile: "event,clock,t_cross_s,step_s\n0,G01,40.25,1e-11\n0,BRIO,70.125,-3e-12\n",
		NuisancesFile: "kind,clock,t_s,duration_s,value\ngap,E11,60,60,0\n",
	} {
		b, _ := os.ReadFile(filepath.Join(dir, name))
		if !strings.HasPrefix(string(b), head) {
			t.Errorf("%s =\n%s\nwant prefix\n%s", name, b, head)
		}
	}
}

// The numpy check: numpy itself (python3-numpy, an independent reader of
// the NPY format) loads clocks.npy and compares it with clocks.csv.
func TestNPYWithNumpy(t *testing.T) {
	py := "/usr/bin/python3"
	if _, err := os.Stat(py); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("python3 missing (required with CI=true)")
		}
		t.Skip("python3 missing")
	}
	d := testDataset(t)
	dir := t.TempDir()
	if _, err := WriteDir(dir, d, WriteOptions{SkipRINEX: true}); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(py, "testdata/npy_vs_csv.py", dir).CombinedOutput()
	var ee *exec.ExitError
	if errors.As(err, &ee) && ee.ExitCode() == 3 {
		if os.Getenv("CI") == "true" {
			t.Fatal("python3-numpy missing (required with CI=true)")
		}
		t.Skip("python3-numpy missing")
	}
	if err != nil || strings.TrimSpace(string(out)) != "ok 9 4 3" {
		t.Fatalf("npy_vs_csv.py: %v\n%s", err, out)
	}
}

func TestWriteAtomicFailureLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.csv")
	os.WriteFile(p, []byte("old"), 0o644)
	_, err := writeAtomic(p, func(w *bufio.Writer) error {
		w.WriteString("partial")
		return errors.New("disk full")
	})
	if err == nil || !strings.Contains(err.Error(), "disk full") {
		t.Fatalf("error %v", err)
	}
	b, _ := os.ReadFile(p)
	ents, _ := os.ReadDir(dir)
	if string(b) != "old" || len(ents) != 1 {
		t.Errorf("after a failed write: content %q, %d entries", b, len(ents))
	}

	// A whole-directory write that fails part-way (a clock id too long for
	// RINEX) leaves no files and no manifest, and removes an old manifest.
	d := testDataset(t)
	d.Clocks[2].ID = "ALBA00XYZLONG"
	d.Stations[0].ID = "ALBA00XYZLONG"
	d.Reference.Clocks[0] = "ALBA00XYZLONG"
	os.WriteFile(filepath.Join(dir, ManifestFile), []byte("{}"), 0o644)
	if _, err := WriteDir(dir, d, WriteOptions{}); err == nil || !strings.Contains(err.Error(), "9 characters") {
		t.Fatalf("WriteDir error %v", err)
	}
	ents, _ = os.ReadDir(dir)
	if len(ents) != 1 || ents[0].Name() != "x.csv" {
		var names []string
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Errorf("after a failed WriteDir: %v", names)
	}
	// Invalid datasets are refused before anything is written.
	d = testDataset(t)
	d.Bias = d.Bias[1:]
	if _, err := WriteDir(filepath.Join(dir, "sub"), d, WriteOptions{}); err == nil {
		t.Error("short bias matrix accepted")
	}
}

func TestReadDatasetDetectsChanges(t *testing.T) {
	d := testDataset(t)
	dir := t.TempDir()
	if _, err := WriteDir(dir, d, WriteOptions{SkipRINEX: true}); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, CrossingsFile)
	b, _ := os.ReadFile(p)
	os.WriteFile(p, bytes.Replace(b, []byte("40.25"), []byte("40.26"), 1), 0o644)
	if _, err := ReadDataset(dir); err == nil || !strings.Contains(err.Error(), "checksum") {
		t.Errorf("edited crossings.csv: error %v", err)
	}
	os.WriteFile(p, b, 0o644)
	mp := filepath.Join(dir, ManifestFile)
	mb, _ := os.ReadFile(mp)
	var m map[string]any
	json.Unmarshal(mb, &m)
	m["time_system"] = "UTC"
	mb, _ = json.Marshal(m)
	os.WriteFile(mp, mb, 0o644)
	if _, err := ReadDataset(dir); err == nil || !strings.Contains(err.Error(), "time system") {
		t.Errorf("UTC manifest: error %v", err)
	}
	m["time_system"] = "GPS"
	m["epochs"] = -3
	mb, _ = json.Marshal(m)
	os.WriteFile(mp, mb, 0o644)
	if _, err := ReadDataset(dir); err == nil || !strings.Contains(err.Error(), "-3 epochs") {
		t.Errorf("negative epochs: error %v", err)
	}
}

func TestValidate(t *testing.T) {
	for _, c := range []struct {
		name string
		edit func(d *Dataset)
		want string
	}{
		{"zero epochs", func(d *Dataset) { d.Epochs = 0 }, "epochs"},
		{"bad interval", func(d *Dataset) { d.Interval = 1e-10 }, "whole number of ns"},
		{"dup id", func(d *Dataset) { d.Clocks[1].ID = "G01" }, "duplicate"},
		{"comma id", func(d *Dataset) { d.Clocks[1].ID = "E,1" }, "not allowed"},
		{"kind", func(d *Dataset) { d.Clocks[1].Kind = "rover" }, "kind"},
		{"ref unknown", func(d *Dataset) { d.Reference.Clocks[0] = "X" }, "not in the clock list"},
		{"weights", func(d *Dataset) { d.Reference.Weights[0] = 0.5 }, "sum to"},
		{"change order", func(d *Dataset) { d.ReferenceChanges[0].Epoch = 9 }, "reference change"},
	} {
		d := testDataset(t)
		c.edit(d)
		if err := d.Validate(); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want error containing %q", c.name, err, c.want)
		}
	}
}

// FuzzReadCSV feeds arbitrary bytes to the dataset's CSV readers: they
// return an error or a table, never panic.
func FuzzReadCSV(f *testing.F) {
	f.Add([]byte("t_s,G01,E11,ALBA00XYZ,BRIO\n0,1e-9,,2,-3\n30,0,0,0,0\n"))
	f.Add([]byte("event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu\n0,61.5,0.6,0,-0.8,300000,10000000,gaussian,1e+12,1.25e-13\n"))
	f.Add([]byte("event,clock,t_cross_s,step_s\n0,G01,40.25,1e-11\n"))
	f.Add([]byte("id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock\nA,1,2,3,4,5,6,cs\n"))
	f.Add([]byte("kind,clock,t_s,duration_s,value\ngap,E11,60,60,0\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		p := filepath.Join(t.TempDir(), "x.csv")
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		d := testDataset(t)
		d.Epochs = 2
		if b, err := readClocksCSV(p, d); err == nil && len(b) != 2*len(d.Clocks) {
			t.Fatalf("clocks.csv read %d values without error", len(b))
		}
		for _, read := range []func(string, *Dataset) error{readEvents, readCrossings, readStations, readNuisances} {
			e := &Dataset{}
			_ = read(p, e)
		}
	})
}

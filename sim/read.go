package sim

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"codeberg.org/sbinet/npyio"

	"wallcross/orbits"
)

// ReadManifest reads and checks dir/manifest.json.
func ReadManifest(dir string) (*Manifest, error) {
	path := filepath.Join(dir, ManifestFile)
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("sim: could not read dataset manifest: %w", err)
	}
	var m Manifest
	if err := json.Unmarshal(b, &m); err != nil {
		return nil, fmt.Errorf("sim: %s: %w", path, err)
	}
	if m.Format != ManifestFormat {
		return nil, fmt.Errorf("sim: %s: format %q, want %q", path, m.Format, ManifestFormat)
	}
	if m.Epochs <= 0 || len(m.Clocks) == 0 || !(m.IntervalS > 0) {
		return nil, fmt.Errorf("sim: %s: %d epochs of %g s and %d clocks, want at least one of each", path, m.Epochs, m.IntervalS, len(m.Clocks))
	}
	if m.TimeSystem != "GPS" {
		return nil, fmt.Errorf("sim: %s: time system %q, want GPS", path, m.TimeSystem)
	}
	if len(m.Scenario) > 0 {
		var buf bytes.Buffer
		if err := json.Compact(&buf, m.Scenario); err == nil {
			m.Scenario = buf.Bytes()
		}
	}
	return &m, nil
}

// ReadDataset reads a dataset directory written by WriteDir: the manifest,
// the bias matrix (clocks.csv, or clocks.npy when the CSV is absent),
// stations.csv, events.csv, crossings.csv, and nuisances.csv and orbits.sp3
// (each when listed; the SP3 is read by package orbits). Every file read is
// checked against the manifest's SHA-256.
func ReadDataset(dir string) (*Dataset, error) {
	m, err := ReadManifest(dir)
	if err != nil {
		return nil, err
	}
	d := &Dataset{
		ToolVersion:      m.ToolVersion,
		Start:            m.StartGPSNS,
		Interval:         m.IntervalS,
		Epochs:           m.Epochs,
		Clocks:           m.Clocks,
		Reference:        m.Reference,
		ReferenceChanges: m.ReferenceChanges,
		Seed:             m.Seed,
		Scenario:         m.Scenario,
	}
	if len(d.ReferenceChanges) == 0 {
		d.ReferenceChanges = nil
	}
	check := func(name string) (string, error) {
		p := filepath.Join(dir, name)
		want, ok := m.Files[name]
		if !ok {
			return "", fmt.Errorf("sim: %s: %s not listed in the manifest", filepath.Join(dir, ManifestFile), name)
		}
		got, err := fileSum(p)
		if err != nil {
			return "", fmt.Errorf("sim: could not read dataset file: %w", err)
		}
		if got != want {
			return "", fmt.Errorf("sim: %s: checksum %s (%d bytes) differs from the manifest's %s (%d bytes)", p, got.SHA256, got.Bytes, want.SHA256, want.Bytes)
		}
		return p, nil
	}
	switch {
	case hasFile(m, CSVFile):
		p, err := check(CSVFile)
		if err != nil {
			return nil, err
		}
		if d.Bias, err = readClocksCSV(p, d); err != nil {
			return nil, err
		}
	case hasFile(m, NPYFile):
		p, err := check(NPYFile)
		if err != nil {
			return nil, err
		}
		if d.Bias, err = readClocksNPY(p, d); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("sim: dataset %s has neither %s nor %s", dir, CSVFile, NPYFile)
	}
	if hasFile(m, SP3File) {
		p, err := check(SP3File)
		if err != nil {
			return nil, err
		}
		if d.Orbits, err = orbits.ReadSP3File(p); err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
	}
	for _, f := range []struct {
		name     string
		optional bool
		read     func(string, *Dataset) error
	}{
		{StationsFile, false, readStations},
		{EventsFile, false, readEvents},
		{CrossingsFile, false, readCrossings},
		{NuisancesFile, true, readNuisances},
	} {
		if f.optional && !hasFile(m, f.name) {
			continue
		}
		p, err := check(f.name)
		if err != nil {
			return nil, err
		}
		if err := f.read(p, d); err != nil {
			return nil, err
		}
	}
	if err := d.Validate(); err != nil {
		return nil, fmt.Errorf("sim: dataset %s: %w", dir, err)
	}
	return d, nil
}

func hasFile(m *Manifest, name string) bool { _, ok := m.Files[name]; return ok }

// csvRows calls row for every data line of a CSV file after checking its
// header; row gets the 1-based line number and the cells.
func csvRows(path, header string, row func(line int, cells []string) error) error {
	f, err := os.Open(path)
	if err != nil {
		return fmt.Errorf("sim: could not read dataset file: %w", err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 1<<16), 1<<24)
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimRight(sc.Text(), "\r")
		if line == 1 {
			if text != header {
				return fmt.Errorf("sim: %s:1: header %q, want %q", path, text, header)
			}
			continue
		}
		if err := row(line, strings.Split(text, ",")); err != nil {
			return fmt.Errorf("sim: %s:%d: %w", path, line, err)
		}
	}
	if err := sc.Err(); err != nil {
		return fmt.Errorf("sim: %s:%d: %w", path, line+1, err)
	}
	if line == 0 {
		return fmt.Errorf("sim: %s: empty file, want header %q", path, header)
	}
	return nil
}

func floats(cells []string, out ...*float64) error {
	for i, p := range out {
		v, err := strconv.ParseFloat(cells[i], 64)
		if err != nil {
			return fmt.Errorf("bad number %q in column %d", cells[i], i+1)
		}
		*p = v
	}
	return nil
}

func readClocksCSV(path string, d *Dataset) ([]float64, error) {
	nc := len(d.Clocks)
	ids := make([]string, 0, nc+1)
	ids = append(ids, "t_s")
	for _, c := range d.Clocks {
		ids = append(ids, c.ID)
	}
	bias := make([]float64, 0, min(d.Epochs*nc, 1<<24)) // grows with the file, not with the manifest's claim
	k := 0
	err := csvRows(path, strings.Join(ids, ","), func(line int, cells []string) error {
		if len(cells) != nc+1 {
			return fmt.Errorf("%d cells, want %d", len(cells), nc+1)
		}
		if k >= d.Epochs {
			return fmt.Errorf("more rows than the manifest's %d epochs", d.Epochs)
		}
		t, err := strconv.ParseFloat(cells[0], 64)
		if err != nil || t != d.EpochSeconds(k) {
			return fmt.Errorf("t_s %q, want %g s for epoch %d", cells[0], d.EpochSeconds(k), k)
		}
		for j, s := range cells[1:] {
			if s == "" {
				bias = append(bias, math.NaN())
				continue
			}
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(v) {
				return fmt.Errorf("bad bias %q for clock %s", s, d.Clocks[j].ID)
			}
			bias = append(bias, v)
		}
		k++
		return nil
	})
	if err != nil {
		return nil, err
	}
	if k != d.Epochs {
		return nil, fmt.Errorf("sim: %s: %d rows, want %d epochs", path, k, d.Epochs)
	}
	return bias, nil
}

func readClocksNPY(path string, d *Dataset) ([]float64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("sim: could not read dataset file: %w", err)
	}
	defer f.Close()
	r, err := npyio.NewReader(bufio.NewReader(f))
	if err != nil {
		return nil, fmt.Errorf("sim: %s: %w", path, err)
	}
	sh := r.Header.Descr.Shape
	if len(sh) != 2 || sh[0] != d.Epochs || sh[1] != len(d.Clocks) {
		return nil, fmt.Errorf("sim: %s: shape %v, want [%d %d]", path, sh, d.Epochs, len(d.Clocks))
	}
	var bias []float64
	if err := r.Read(&bias); err != nil {
		return nil, fmt.Errorf("sim: %s: %w", path, err)
	}
	if len(bias) != d.Epochs*len(d.Clocks) {
		return nil, errors.New("sim: " + path + ": short data")
	}
	return bias, nil
}

func readStations(path string, d *Dataset) error {
	return csvRows(path, "id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock", func(_ int, c []string) error {
		if len(c) != 8 {
			return fmt.Errorf("%d cells, want 8", len(c))
		}
		s := StationInfo{ID: c[0], Clock: c[7]}
		if err := floats(c[1:7], &s.X, &s.Y, &s.Z, &s.LatDeg, &s.LonDeg, &s.H); err != nil {
			return err
		}
		d.Stations = append(d.Stations, s)
		return nil
	})
}

func readEvents(path string, d *Dataset) error {
	return csvRows(path, "event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu", func(_ int, c []string) error {
		if len(c) != 10 {
			return fmt.Errorf("%d cells, want 10", len(c))
		}
		var e Event
		var err error
		if e.ID, err = strconv.Atoi(c[0]); err != nil {
			return fmt.Errorf("bad event number %q", c[0])
		}
		if err := floats(c[1:7], &e.T0, &e.N[0], &e.N[1], &e.N[2], &e.Speed, &e.Thickness); err != nil {
			return err
		}
		e.Profile = c[7]
		if err := floats(c[8:10], &e.LambdaEffGeV, &e.PeakDnu); err != nil {
			return err
		}
		d.Events = append(d.Events, e)
		return nil
	})
}

func readCrossings(path string, d *Dataset) error {
	return csvRows(path, "event,clock,t_cross_s,step_s", func(_ int, c []string) error {
		if len(c) != 4 {
			return fmt.Errorf("%d cells, want 4", len(c))
		}
		x := Crossing{Clock: c[1]}
		var err error
		if x.Event, err = strconv.Atoi(c[0]); err != nil {
			return fmt.Errorf("bad event number %q", c[0])
		}
		if err := floats(c[2:4], &x.TCross, &x.Step); err != nil {
			return err
		}
		d.Crossings = append(d.Crossings, x)
		return nil
	})
}

func readNuisances(path string, d *Dataset) error {
	return csvRows(path, "kind,clock,t_s,duration_s,value", func(_ int, c []string) error {
		if len(c) != 5 {
			return fmt.Errorf("%d cells, want 5", len(c))
		}
		n := Nuisance{Kind: c[0], Clock: c[1]}
		if err := floats(c[2:5], &n.T, &n.Duration, &n.Value); err != nil {
			return err
		}
		d.Nuisances = append(d.Nuisances, n)
		return nil
	})
}

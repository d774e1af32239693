package sim

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"codeberg.org/sbinet/npyio"
	"gonum.org/v1/gonum/mat"

	"wallcross/orbits"
)

// File names inside a dataset directory (DESIGN.md §5).
const (
	ManifestFile  = "manifest.json"
	RinexFile     = "clocks.clk"
	CSVFile       = "clocks.csv"
	NPYFile       = "clocks.npy"
	SP3File       = "orbits.sp3"
	StationsFile  = "stations.csv"
	EventsFile    = "events.csv"
	CrossingsFile = "crossings.csv"
	NuisancesFile = "nuisances.csv"
)

// ManifestFormat names the layout version of manifest.json.
const ManifestFormat = "wallcross-dataset/1"

// Manifest is the content of manifest.json.
type Manifest struct {
	Format           string             `json:"format"`            // ManifestFormat
	ToolVersion      string             `json:"tool_version"`      // program that wrote the dataset
	TimeSystem       string             `json:"time_system"`       // always "GPS"
	Seed             uint64             `json:"seed"`              // run seed
	Start            string             `json:"start"`             // first epoch, GPS calendar, RFC 3339 layout without zone
	StartGPSNS       orbits.Time        `json:"start_gps_ns"`      // first epoch, ns since 1980-01-06 00:00:00 GPST
	SpanS            float64            `json:"span_s"`            // epochs × interval, s
	IntervalS        float64            `json:"interval_s"`        // sample interval, s
	Epochs           int                `json:"epochs"`            // number of epochs
	Clocks           []Clock            `json:"clocks"`            // column order of clocks.csv / clocks.npy
	Reference        Reference          `json:"reference"`         // reference at the first epoch
	ReferenceChanges []ReferenceChange  `json:"reference_changes"` // later changes of reference
	Scenario         json.RawMessage    `json:"scenario,omitempty"`
	Files            map[string]FileSum `json:"files"` // size and SHA-256 of every other file
}

// WriteOptions selects the files WriteDir writes. The zero value writes
// every file.
type WriteOptions struct {
	SkipRINEX bool // do not write clocks.clk (large for long spans)
	SkipCSV   bool // do not write clocks.csv
	SkipNPY   bool // do not write clocks.npy
	SkipSP3   bool // do not write orbits.sp3
}

// WriteDir writes the whole dataset directory dir (created if needed):
// every data file, each atomically, then manifest.json last with the
// checksums of the others. An existing manifest.json is removed first, so
// a directory whose write failed part-way never carries a manifest; the
// files written by the failed call are removed again. It returns the paths
// written, manifest last.
func WriteDir(dir string, d *Dataset, opt WriteOptions) (paths []string, err error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("sim: could not create dataset directory: %w", err)
	}
	if err := os.Remove(filepath.Join(dir, ManifestFile)); err != nil && !errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("sim: could not remove old manifest: %w", err)
	}
	sums := make(map[string]FileSum)
	defer func() {
		if err != nil {
			for _, p := range paths {
				os.Remove(p)
			}
			paths = nil
		}
	}()
	type job struct {
		name  string
		skip  bool
		write func(string, *Dataset) (FileSum, error)
	}
	jobs := []job{
		{RinexFile, opt.SkipRINEX, WriteRinexClock},
		{CSVFile, opt.SkipCSV, WriteClocksCSV},
		{NPYFile, opt.SkipNPY, WriteClocksNPY},
		{SP3File, opt.SkipSP3 || d.Orbits == nil, WriteOrbitsSP3},
		{StationsFile, false, WriteStationsCSV},
		{EventsFile, false, WriteEventsCSV},
		{CrossingsFile, false, WriteCrossingsCSV},
		{NuisancesFile, false, WriteNuisancesCSV},
		{LinksFile, d.LinkLevel == nil, WriteLinksCSV},
		{EstimatedCSVFile, d.LinkLevel == nil || d.LinkLevel.Estimated == nil, WriteEstimatedCSV},
		{EstimatedRinex, opt.SkipRINEX || d.LinkLevel == nil || d.LinkLevel.Estimated == nil, WriteEstimatedRinex},
	}
	for _, j := range jobs {
		if j.skip {
			continue
		}
		p := filepath.Join(dir, j.name)
		s, err := j.write(p, d)
		if err != nil {
			return paths, err
		}
		paths = append(paths, p)
		sums[j.name] = s
	}
	p := filepath.Join(dir, ManifestFile)
	if _, err := WriteManifest(p, d, sums); err != nil {
		return paths, err
	}
	return append(paths, p), nil
}

// NewManifest returns the manifest of d with the given file checksums.
func NewManifest(d *Dataset, files map[string]FileSum) *Manifest {
	rc := d.ReferenceChanges
	if rc == nil {
		rc = []ReferenceChange{}
	}
	if files == nil {
		files = map[string]FileSum{}
	}
	return &Manifest{
		Format:           ManifestFormat,
		ToolVersion:      d.ToolVersion,
		TimeSystem:       "GPS",
		Seed:             d.Seed,
		Start:            d.Start.String(),
		StartGPSNS:       d.Start,
		SpanS:            float64(d.Epochs) * d.Interval,
		IntervalS:        d.Interval,
		Epochs:           d.Epochs,
		Clocks:           d.Clocks,
		Reference:        d.Reference,
		ReferenceChanges: rc,
		Scenario:         d.Scenario,
		Files:            files,
	}
}

// WriteManifest writes manifest.json for d to path, atomically.
func WriteManifest(path string, d *Dataset, files map[string]FileSum) (FileSum, error) {
	m := NewManifest(d, files)
	if len(m.Scenario) > 0 && !json.Valid(m.Scenario) {
		return FileSum{}, fmt.Errorf("sim: resolved scenario is not valid JSON")
	}
	b, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return FileSum{}, fmt.Errorf("sim: could not encode manifest: %w", err)
	}
	b = append(b, '\n')
	return writeAtomic(path, func(w *bufio.Writer) error {
		_, err := w.Write(b)
		return err
	})
}

// appendG appends v in the shortest form that parses back to exactly v;
// NaN (a gap) appends nothing.
func appendG(b []byte, v float64) []byte {
	if math.IsNaN(v) {
		return b
	}
	return strconv.AppendFloat(b, v, 'g', -1, 64)
}

// WriteClocksCSV writes clocks.csv: column t_s (seconds since the first
// epoch), then one column per clock, bias relative to the reference in s;
// an empty cell is a gap. Every float in the CSV files is written in the
// shortest form that parses back to the same float64 (strconv precision
// -1): times, lengths and speeds without exponent, other values with 'g'.
func WriteClocksCSV(path string, d *Dataset) (FileSum, error) {
	if err := d.Validate(); err != nil {
		return FileSum{}, err
	}
	nc := len(d.Clocks)
	return writeAtomic(path, func(w *bufio.Writer) error {
		row := make([]byte, 0, 32*(nc+1))
		row = append(row, "t_s"...)
		for _, c := range d.Clocks {
			row = append(row, ',')
			row = append(row, c.ID...)
		}
		row = append(row, '\n')
		if _, err := w.Write(row); err != nil {
			return err
		}
		for k := 0; k < d.Epochs; k++ {
			row = strconv.AppendFloat(row[:0], d.EpochSeconds(k), 'f', -1, 64)
			for _, v := range d.Bias[k*nc : (k+1)*nc] {
				row = append(row, ',')
				row = appendG(row, v)
			}
			row = append(row, '\n')
			if _, err := w.Write(row); err != nil {
				return err
			}
		}
		return nil
	})
}

// WriteClocksNPY writes clocks.npy: the bias matrix as float64
// [epochs × clocks] in C order, NaN for gaps, column order as clocks.csv.
func WriteClocksNPY(path string, d *Dataset) (FileSum, error) {
	if err := d.Validate(); err != nil {
		return FileSum{}, err
	}
	m := mat.NewDense(d.Epochs, len(d.Clocks), d.Bias) // shares d.Bias, no copy
	return writeAtomic(path, func(w *bufio.Writer) error {
		return npyio.Write(w, m)
	})
}

// csvField rejects text that would break a plain CSV cell.
func csvField(what, s string) error {
	if strings.ContainsAny(s, ",\"\n\r") {
		return fmt.Errorf("sim: %s %q contains a comma, quote or newline", what, s)
	}
	return nil
}

// WriteStationsCSV writes stations.csv:
// id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock (clock = clock family).
func WriteStationsCSV(path string, d *Dataset) (FileSum, error) {
	for _, s := range d.Stations {
		if err := csvField("station id", s.ID); err != nil {
			return FileSum{}, err
		}
		if err := csvField("station clock family", s.Clock); err != nil {
			return FileSum{}, err
		}
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		b := []byte("id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock\n")
		for _, s := range d.Stations {
			b = append(b, s.ID...)
			for _, v := range []float64{s.X, s.Y, s.Z, s.LatDeg, s.LonDeg, s.H} {
				b = append(b, ',')
				b = strconv.AppendFloat(b, v, 'f', -1, 64)
			}
			b = append(b, ',')
			b = append(b, s.Clock...)
			b = append(b, '\n')
		}
		_, err := w.Write(b)
		return err
	})
}

// WriteEventsCSV writes events.csv:
// event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu.
func WriteEventsCSV(path string, d *Dataset) (FileSum, error) {
	for _, e := range d.Events {
		if err := csvField("wall profile", e.Profile); err != nil {
			return FileSum{}, err
		}
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		b := []byte("event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu")
		var peak []float64
		if d.LinkLevel != nil && len(d.LinkLevel.PeakIndex) == len(d.Events) {
			// The observation level adds each wall's peak n − 1.
			peak = d.LinkLevel.PeakIndex
			b = append(b, ",peak_index"...)
		}
		b = append(b, '\n')
		for i, e := range d.Events {
			b = strconv.AppendInt(b, int64(e.ID), 10)
			b = append(b, ',')
			b = strconv.AppendFloat(b, e.T0, 'f', -1, 64)
			for _, v := range []float64{e.N[0], e.N[1], e.N[2]} {
				b = append(b, ',')
				b = strconv.AppendFloat(b, v, 'g', -1, 64)
			}
			for _, v := range []float64{e.Speed, e.Thickness} {
				b = append(b, ',')
				b = strconv.AppendFloat(b, v, 'f', -1, 64)
			}
			b = append(b, ',')
			b = append(b, e.Profile...)
			for _, v := range []float64{e.LambdaEffGeV, e.PeakDnu} {
				b = append(b, ',')
				b = strconv.AppendFloat(b, v, 'g', -1, 64)
			}
			if peak != nil {
				b = append(b, ',')
				b = strconv.AppendFloat(b, peak[i], 'g', -1, 64)
			}
			b = append(b, '\n')
			if _, err := w.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
		_, err := w.Write(b)
		return err
	})
}

// WriteCrossingsCSV writes crossings.csv: event,clock,t_cross_s,step_s.
func WriteCrossingsCSV(path string, d *Dataset) (FileSum, error) {
	for _, c := range d.Crossings {
		if err := csvField("crossing clock id", c.Clock); err != nil {
			return FileSum{}, err
		}
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		b := []byte("event,clock,t_cross_s,step_s\n")
		for _, c := range d.Crossings {
			b = strconv.AppendInt(b, int64(c.Event), 10)
			b = append(b, ',')
			b = append(b, c.Clock...)
			b = append(b, ',')
			b = strconv.AppendFloat(b, c.TCross, 'f', -1, 64)
			b = append(b, ',')
			b = strconv.AppendFloat(b, c.Step, 'g', -1, 64)
			b = append(b, '\n')
			if _, err := w.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
		_, err := w.Write(b)
		return err
	})
}

// WriteNuisancesCSV writes nuisances.csv: kind,clock,t_s,duration_s,value
// (value in s for phase jumps, outliers and batch steps, dimensionless for
// frequency jumps).
func WriteNuisancesCSV(path string, d *Dataset) (FileSum, error) {
	for _, n := range d.Nuisances {
		if err := csvField("nuisance kind", n.Kind); err != nil {
			return FileSum{}, err
		}
		if err := csvField("nuisance clock", n.Clock); err != nil {
			return FileSum{}, err
		}
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		b := []byte("kind,clock,t_s,duration_s,value\n")
		for _, n := range d.Nuisances {
			b = append(b, n.Kind...)
			b = append(b, ',')
			b = append(b, n.Clock...)
			b = append(b, ',')
			b = strconv.AppendFloat(b, n.T, 'f', -1, 64)
			b = append(b, ',')
			b = strconv.AppendFloat(b, n.Duration, 'f', -1, 64)
			b = append(b, ',')
			b = strconv.AppendFloat(b, n.Value, 'g', -1, 64)
			b = append(b, '\n')
			if _, err := w.Write(b); err != nil {
				return err
			}
			b = b[:0]
		}
		_, err := w.Write(b)
		return err
	})
}

// WriteOrbitsSP3 writes orbits.sp3 (SP3-d, by package orbits) from
// d.Orbits.
func WriteOrbitsSP3(path string, d *Dataset) (FileSum, error) {
	if d.Orbits == nil {
		return FileSum{}, fmt.Errorf("sim: dataset has no satellite orbits for %s", path)
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		return orbits.WriteSP3(w, d.Orbits)
	})
}

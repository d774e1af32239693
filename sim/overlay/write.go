package overlay

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"wallcross/inject"
	"wallcross/internal/atomicfile"
	"wallcross/internal/buildinfo"
)

// Input names one input file and its checksum, for the manifest.
type Input struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// Manifest describes an overlay output directory.
type Manifest struct {
	Tool       string             `json:"tool"`
	Kind       string             `json:"kind"` // "overlay"
	Created    string             `json:"created_utc"`
	TimeSystem string             `json:"time_system"`
	Origin     string             `json:"origin"` // t = 0 of events and crossings (GPS time)
	Seed       uint64             `json:"seed"`
	Inputs     map[string]Input   `json:"inputs"`
	Reference  map[string]float64 `json:"reference_weights"`
	Families   map[string]string  `json:"clock_families"`
	// Defaulted lists the clocks whose family is the per-system default
	// (not from the user's table).
	Defaulted []string          `json:"families_defaulted"`
	Walls     []inject.Event    `json:"walls"`
	Changed   int               `json:"records_changed"`
	Touched   int               `json:"records_touched"`
	Warnings  []string          `json:"warnings"`
	Files     map[string]string `json:"files"` // output name → SHA-256
}

// WriteDir writes the perturbed clock file (under the input's base name),
// events.csv, crossings.csv and manifest.json (last) into dir, each
// atomically.
func WriteDir(dir string, res *Result, inputs map[string]string, clockName string, seed uint64) (*Manifest, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("overlay: %w", err)
	}
	m := &Manifest{
		Tool: "wallcross " + buildinfo.Read().Short(), Kind: "overlay",
		Created:    time.Now().UTC().Format(time.RFC3339),
		TimeSystem: "GPS", Origin: res.Origin.String(), Seed: seed,
		Inputs: map[string]Input{}, Reference: res.Refs, Families: res.Families,
		Defaulted: res.Defaulted, Walls: res.Events, Changed: res.Changed, Touched: res.Touched,
		Warnings: res.Warnings, Files: map[string]string{},
	}
	if m.Walls == nil {
		m.Walls = []inject.Event{}
	}
	if m.Warnings == nil {
		m.Warnings = []string{}
	}
	sort.Strings(m.Defaulted)
	for role, p := range inputs {
		sum, err := atomicfile.SumFile(p)
		if err != nil {
			return nil, fmt.Errorf("overlay: %w", err)
		}
		abs, _ := filepath.Abs(p)
		m.Inputs[role] = Input{Path: abs, SHA256: sum}
	}
	base := filepath.Base(clockName)
	if base == "events.csv" || base == "crossings.csv" || base == "manifest.json" {
		base = "clocks.clk"
	}
	base = strings.TrimSuffix(base, ".gz")
	files := []struct {
		name string
		fill func(w *bufio.Writer) error
	}{
		{base, func(w *bufio.Writer) error { _, err := w.Write(res.Data); return err }},
		{"events.csv", func(w *bufio.Writer) error {
			return writeCSV(w, inject.EventColumns(), len(res.Events), func(i int) []string { return res.Events[i].Strings() })
		}},
		{"crossings.csv", func(w *bufio.Writer) error {
			return writeCSV(w, inject.CrossingColumns(), len(res.Crossings), func(i int) []string { return res.Crossings[i].Strings() })
		}},
	}
	for _, f := range files {
		sum, _, err := atomicfile.Write(filepath.Join(dir, f.name), f.fill)
		if err != nil {
			return nil, fmt.Errorf("overlay: %w", err)
		}
		m.Files[f.name] = sum
	}
	_, _, err := atomicfile.Write(filepath.Join(dir, "manifest.json"), func(w *bufio.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(m)
	})
	if err != nil {
		return nil, fmt.Errorf("overlay: %w", err)
	}
	return m, nil
}

func writeCSV(w io.Writer, header []string, n int, row func(int) []string) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for i := 0; i < n; i++ {
		if err := cw.Write(row(i)); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

package estimate

import (
	"bufio"
	"fmt"
	"math"
	"strconv"

	"wallcross/internal/atomicfile"
)

// FileSum is the size and SHA-256 checksum of a written file (same fields
// and JSON names as sim.FileSum, for the manifest).
type FileSum struct {
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// LinkColumns returns the links.csv header.
func LinkColumns() []string {
	return []string{"t_s", "station", "satellite", "elevation_deg", "cos_incidence", "delay_s"}
}

// WriteLinksCSV writes links.csv: one row per link with a wall delay,
// t_s (reception time, s since the first epoch), station, satellite,
// elevation_deg, cos_incidence (cosine of the angle between the line of
// sight and the wall normal), delay_s (total wall link delay, s). Floats are
// written in the shortest form that parses back exactly.
func WriteLinksCSV(path string, links []LinkRecord) (FileSum, error) {
	return writeLinks(path, links, false)
}

// WriteLinksDetailCSV writes the links.csv columns followed by bending_s
// (the second-order ray-bending delay, s, reported whether or not it was
// added to delay_s) and direction_rad (change of the emitter's apparent
// direction at the station, rad).
func WriteLinksDetailCSV(path string, links []LinkRecord) (FileSum, error) {
	return writeLinks(path, links, true)
}

func writeLinks(path string, links []LinkRecord, detail bool) (FileSum, error) {
	return writeAtomic(path, func(w *bufio.Writer) error {
		row := []byte("t_s,station,satellite,elevation_deg,cos_incidence,delay_s")
		if detail {
			row = append(row, ",bending_s,direction_rad"...)
		}
		row = append(row, '\n')
		if _, err := w.Write(row); err != nil {
			return err
		}
		for i, l := range links {
			if err := csvName(l.Station); err != nil {
				return fmt.Errorf("link %d: %w", i, err)
			}
			if err := csvName(l.Satellite); err != nil {
				return fmt.Errorf("link %d: %w", i, err)
			}
			row = strconv.AppendFloat(row[:0], l.T, 'f', -1, 64)
			row = append(row, ',')
			row = append(row, l.Station...)
			row = append(row, ',')
			row = append(row, l.Satellite...)
			vals := []float64{l.ElevationDeg, l.CosIncidence, l.Delay}
			if detail {
				vals = append(vals, l.Bending, l.Direction)
			}
			for _, v := range vals {
				row = append(row, ',')
				row = strconv.AppendFloat(row, v, 'g', -1, 64)
			}
			row = append(row, '\n')
			if _, err := w.Write(row); err != nil {
				return err
			}
		}
		return nil
	})
}

// WriteEstimatedCSV writes estimated.csv in the layout of clocks.csv: column
// t_s (s since the first epoch), then one column per clock in the order ids
// (nil = s.Clocks), estimated bias relative to the reference, s; an empty
// cell is a gap.
func WriteEstimatedCSV(path string, s *Solution, ids []string) (FileSum, error) {
	if ids == nil {
		ids = s.Clocks
	}
	m, err := s.Matrix(ids)
	if err != nil {
		return FileSum{}, err
	}
	for _, id := range ids {
		if err := csvName(id); err != nil {
			return FileSum{}, err
		}
	}
	nc := len(ids)
	return writeAtomic(path, func(w *bufio.Writer) error {
		row := []byte("t_s")
		for _, id := range ids {
			row = append(row, ',')
			row = append(row, id...)
		}
		row = append(row, '\n')
		if _, err := w.Write(row); err != nil {
			return err
		}
		for k := range s.Epochs {
			row = strconv.AppendFloat(row[:0], float64(k)*s.Interval, 'f', -1, 64)
			for _, v := range m[k*nc : (k+1)*nc] {
				row = append(row, ',')
				if !math.IsNaN(v) {
					row = strconv.AppendFloat(row, v, 'g', -1, 64)
				}
			}
			row = append(row, '\n')
			if _, err := w.Write(row); err != nil {
				return err
			}
		}
		return nil
	})
}

func csvName(s string) error {
	for _, r := range s {
		if r == ',' || r == '"' || r == '\n' || r == '\r' {
			return fmt.Errorf("estimate: name %q contains a CSV delimiter", s)
		}
	}
	if s == "" {
		return fmt.Errorf("estimate: empty name in CSV output")
	}
	return nil
}

// writeAtomic writes path through fill via a temporary file in the same
// directory, renamed onto path only when everything succeeded.
func writeAtomic(path string, fill func(w *bufio.Writer) error) (FileSum, error) {
	sum, n, err := atomicfile.Write(path, fill)
	if err != nil {
		return FileSum{}, fmt.Errorf("estimate: %w", err)
	}
	return FileSum{Bytes: n, SHA256: sum}, nil
}

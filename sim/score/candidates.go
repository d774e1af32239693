package score

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
)

// A Candidate is one entry of a pipeline's candidate list.
type Candidate struct {
	Line  int     // line in the candidate file (1-based)
	T0    float64 // time the wall passes the geocentre, s since the first epoch
	Stat  float64 // detection statistic; larger is more significant
	N     [3]float64
	HasN  bool    // N holds a unit velocity direction (normalised on reading)
	Speed float64 // reconstructed speed, m/s; NaN if not given
	Thick float64 // reconstructed thickness, m; NaN if not given
}

// ReadCandidatesFile reads a candidate list from a file; see ReadCandidates.
func ReadCandidatesFile(path string) ([]Candidate, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("score: could not open candidates: %w", err)
	}
	defer f.Close()
	return ReadCandidates(f, filepath.Base(path))
}

// ReadCandidates reads a candidate list (CSV with a header; contract of
// DESIGN.md §5): required columns t0_s (s since the first epoch) and stat
// (larger = more significant); optional nx,ny,nz (velocity direction; all
// three or none per row, normalised here), speed_m_s and thickness_m. Other
// columns are ignored. name labels errors, which give file:line, the column
// and the bad value.
func ReadCandidates(r io.Reader, name string) ([]Candidate, error) {
	t, err := readTable(r, name, "t0_s", "stat")
	if err != nil {
		return nil, err
	}
	out := make([]Candidate, 0, len(t.rows))
	for i := range t.rows {
		c := Candidate{Line: t.line[i]}
		if c.T0, err = t.float(i, "t0_s"); err != nil {
			return nil, err
		}
		if c.Stat, err = t.float(i, "stat"); err != nil {
			return nil, err
		}
		var n [3]float64
		given := 0
		for j, col := range []string{"nx", "ny", "nz"} {
			if n[j], err = t.optFloat(i, col); err != nil {
				return nil, err
			}
			if !math.IsNaN(n[j]) {
				given++
			}
		}
		switch given {
		case 0:
		case 3:
			norm := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
			if !(norm > 1e-6) {
				return nil, t.errorf(i, "columns nx,ny,nz: direction (%g, %g, %g) has length %g, want a unit vector", n[0], n[1], n[2], norm)
			}
			c.N = [3]float64{n[0] / norm, n[1] / norm, n[2] / norm}
			c.HasN = true
		default:
			return nil, t.errorf(i, "columns nx,ny,nz: give all three direction components or none, got %q,%q,%q",
				t.str(i, "nx"), t.str(i, "ny"), t.str(i, "nz"))
		}
		if c.Speed, err = t.optFloat(i, "speed_m_s"); err != nil {
			return nil, err
		}
		if !math.IsNaN(c.Speed) && c.Speed <= 0 {
			return nil, t.errorf(i, "column speed_m_s: speed %g m/s must be positive", c.Speed)
		}
		if c.Thick, err = t.optFloat(i, "thickness_m"); err != nil {
			return nil, err
		}
		if !math.IsNaN(c.Thick) && c.Thick <= 0 {
			return nil, t.errorf(i, "column thickness_m: thickness %g m must be positive", c.Thick)
		}
		out = append(out, c)
	}
	return out, nil
}

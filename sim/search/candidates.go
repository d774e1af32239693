package search

import (
	"bufio"
	"fmt"
	"io"
	"strconv"

	"wallcross/internal/atomicfile"
)

// CandidateColumns is the header of a candidate file (DESIGN.md §5: t0_s
// and stat required; the rest optional). amplitude is the fitted bias step
// of a clock with unit sensitivity, s; coupling is the coupling class.
// thickness_m is empty for a thin-wall template (d ≪ v·τ0: unresolved);
// sweep_chi2 is Candidate.SweepChi2 (NaN when it cannot be formed).
func CandidateColumns() []string {
	return []string{"t0_s", "stat", "nx", "ny", "nz", "speed_m_s", "thickness_m", "amplitude", "coupling", "sweep_chi2"}
}

func fmtG(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

// WriteCandidates writes cands as CSV with the CandidateColumns header.
func WriteCandidates(w io.Writer, cands []Candidate) error {
	bw := bufio.NewWriter(w)
	cols := CandidateColumns()
	for i, c := range cols {
		if i > 0 {
			bw.WriteByte(',')
		}
		bw.WriteString(c)
	}
	bw.WriteByte('\n')
	for _, c := range cands {
		thick := "" // thin-wall template: thickness unresolved (≪ v·τ0), left empty
		if c.Thickness > 0 {
			thick = fmtG(c.Thickness)
		}
		row := []string{fmtG(c.T0), fmtG(c.Stat), fmtG(c.N[0]), fmtG(c.N[1]), fmtG(c.N[2]),
			fmtG(c.Speed), thick, fmtG(c.Amplitude), c.Coupling, fmtG(c.SweepChi2)}
		for i, s := range row {
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(s)
		}
		bw.WriteByte('\n')
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("search: could not write candidates: %w", err)
	}
	return nil
}

// WriteCandidatesFile writes cands to path atomically: to a temporary file
// in the same directory, synced, then renamed over path. On error no file
// is left at path and the temporary file is removed.
func WriteCandidatesFile(path string, cands []Candidate) error {
	_, _, err := atomicfile.Write(path, func(w *bufio.Writer) error { return WriteCandidates(w, cands) })
	if err != nil {
		return fmt.Errorf("search: candidate file: %w", err)
	}
	return nil
}

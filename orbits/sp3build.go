package orbits

import (
	"fmt"
	"math"
	"strings"
)

// SP3Options sets the epoch grid and header of a generated SP3 file.
type SP3Options struct {
	// Start is the first epoch (GPS time).
	Start Time
	// Span is the covered duration in seconds (the last epoch is
	// Start + ⌊Span/Step⌋·Step).
	Span float64
	// Step is the epoch interval in seconds (> 0).
	Step float64
	// Agency is the 4-character agency field (default "WALL").
	Agency string
	// OrbitType is the 3-character orbit type (default "BCT", broadcast).
	OrbitType string
	// CoordSys is the coordinate-system label (default "WGS84").
	CoordSys string
	// Comments are extra comment lines.
	Comments []string
	// MaxEpochs caps the number of epochs (default 1e6) to catch unit
	// mistakes before allocating.
	MaxEpochs int
}

// ClockFunc returns the clock bias (s) of sat at t and whether it is known.
type ClockFunc func(sat SatID, t Time) (float64, bool)

// BuildSP3 samples the orbits (and clocks, when clock is not nil) on the
// grid of o. A satellite-epoch that cannot be propagated is written as
// missing (position 0, clock 999999.999999); a satellite with no valid
// epoch at all is left out.
func BuildSP3(orbits []Orbit, clock ClockFunc, o SP3Options) (*SP3, error) {
	if !(o.Step > 0) || math.IsInf(o.Step, 0) {
		return nil, fmt.Errorf("orbits: sp3: step %g s must be positive", o.Step)
	}
	if !(o.Span >= 0) || math.IsInf(o.Span, 0) {
		return nil, fmt.Errorf("orbits: sp3: span %g s must be non-negative", o.Span)
	}
	maxE := o.MaxEpochs
	if maxE == 0 {
		maxE = 1_000_000
	}
	ne := int(math.Floor(o.Span/o.Step+1e-9)) + 1
	if ne > maxE {
		return nil, fmt.Errorf("orbits: sp3: %d epochs (span %g s / step %g s) exceed the limit %d", ne, o.Span, o.Step, maxE)
	}
	epochs := make([]Time, ne)
	for i := range epochs {
		epochs[i] = o.Start.Add(float64(i) * o.Step)
	}
	s := &SP3{Version: 'd', Mode: 'P', Start: o.Start, NumEpochs: ne, DataUsed: "BCT", CoordSys: o.CoordSys,
		OrbitType: o.OrbitType, Agency: o.Agency, Interval: o.Step, TimeSystem: "GPS", Epochs: epochs,
		BasePos: 1.25, BaseClk: 1.025}
	if s.CoordSys == "" {
		s.CoordSys = "WGS84"
	}
	if s.OrbitType == "" {
		s.OrbitType = "BCT"
	}
	if s.Agency == "" {
		s.Agency = "WALL"
	}
	cols := make([][]SP3Entry, 0, len(orbits))
	for _, orb := range orbits {
		col := make([]SP3Entry, ne)
		any := false
		for i, t := range epochs {
			p, _, err := orb.PosVel(t)
			if err != nil {
				continue
			}
			col[i].Pos, col[i].HasPos = p, true
			any = true
			if clock != nil {
				if c, ok := clock(orb.Sat(), t); ok {
					col[i].Clock, col[i].HasClock = c, true
				}
			}
		}
		if !any {
			continue
		}
		s.Sats = append(s.Sats, orb.Sat())
		s.Accuracy = append(s.Accuracy, 0)
		cols = append(cols, col)
	}
	s.Data = make([][]SP3Entry, ne)
	for i := range s.Data {
		row := make([]SP3Entry, len(cols))
		for j := range cols {
			row[j] = cols[j][i]
		}
		s.Data[i] = row
	}
	s.FileType = sp3FileType(s.Sats)
	s.Comments = append([]string{"written by wallcross (orbits.BuildSP3); epochs on GPS time"}, o.Comments...)
	return s, nil
}

// NavSP3 samples the broadcast orbits and clock polynomials (af0–af2 or
// −τN + γN·Δt, without the periodic relativistic term, as in IGS SP3
// clocks) of every satellite of systems (e.g. "GEC"; empty = all) in n.
// When o.Step is 0 it is 300 s; when o.Start is 0 the grid starts at the
// earliest reference epoch rounded down to the step and, when o.Span is 0,
// ends at the latest one.
func NavSP3(n *Nav, systems string, sel SelectOptions, o SP3Options) (*SP3, error) {
	if o.Step == 0 {
		o.Step = 300
	}
	var sats []SatID
	for _, s := range n.Sats() {
		if systems == "" || strings.IndexByte(systems, s.System()) >= 0 {
			sats = append(sats, s)
		}
	}
	if len(sats) == 0 {
		return nil, fmt.Errorf("orbits: %s: no records of systems %q", n.Name, systems)
	}
	if o.Start == 0 {
		first, last := Time(math.MaxInt64), Time(math.MinInt64)
		for _, s := range sats {
			for _, r := range n.RecordsOf(s) {
				first = min(first, r.Ref())
				last = max(last, r.Ref())
			}
		}
		step := secondsToNs(o.Step)
		o.Start = Time(floorDiv(int64(first), step) * step)
		if o.Span == 0 {
			o.Span = last.Sub(o.Start)
		}
	}
	orbs := make([]Orbit, len(sats))
	for i, s := range sats {
		orbs[i] = n.Orbit(s, sel)
	}
	clock := func(sat SatID, t Time) (float64, bool) {
		e, err := n.SelectWith(sat, t, sel)
		if err != nil {
			return 0, false
		}
		return e.ClockBias(t), true
	}
	o.Comments = append([]string{"broadcast orbits and clocks from " + baseName(n.Name)}, o.Comments...)
	return BuildSP3(orbs, clock, o)
}

func baseName(p string) string {
	if i := strings.LastIndexAny(p, `/\`); i >= 0 {
		return p[i+1:]
	}
	return p
}

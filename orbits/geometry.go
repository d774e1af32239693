package orbits

import (
	"fmt"
	"math"
)

// Geometry gives the position of every clock of a network — satellites
// first, in the order given, then stations — at any GPS epoch, Earth-fixed
// or celestial. It is immutable after construction and safe for concurrent
// use.
//
// Cost (BenchmarkKepler, BenchmarkCelestialMatrix, BenchmarkGeometry on
// this shared 2-core machine under load, where one math.Sincos took
// ~40 ns): satellites are propagated directly at each call — a Keplerian
// record ~0.2 µs, a GLONASS record by RK4 from tb up to ~2–5 µs; the
// celestial rotation ~2.6 µs per call with Frame{} and ~0.6 µs with a
// tabulated frame (Frame.Tabulate over the run's span, recommended for
// per-sample work). CelestialAll computes the rotation once per epoch for
// all clocks; EarthFixedGrid samples one clock on a regular grid with
// Kepler.PosGrid (≈ 12 M satellite-epochs per CPU-second measured here).
type Geometry struct {
	ids      []string
	orbits   []Orbit
	stations []Station
	frame    Frame
}

// KeplerOrbits converts Keplerian records to the Orbit slice NewGeometry
// takes.
func KeplerOrbits(ks []*Kepler) []Orbit {
	out := make([]Orbit, len(ks))
	for i, k := range ks {
		out[i] = k
	}
	return out
}

// NewGeometry builds a geometry from satellite orbits and stations. Clock
// ids must be unique (satellite ids are the SatID strings).
func NewGeometry(sats []Orbit, stations []Station, frame Frame) (*Geometry, error) {
	g := &Geometry{frame: frame}
	seen := map[string]bool{}
	for _, o := range sats {
		if o == nil {
			return nil, fmt.Errorf("orbits: geometry: nil orbit")
		}
		id := string(o.Sat())
		if id == "" || seen[id] {
			return nil, fmt.Errorf("orbits: geometry: duplicate or empty clock id %q", id)
		}
		seen[id] = true
		g.ids = append(g.ids, id)
		g.orbits = append(g.orbits, o)
	}
	for _, s := range stations {
		if s.ID == "" || seen[s.ID] {
			return nil, fmt.Errorf("orbits: geometry: duplicate or empty clock id %q", s.ID)
		}
		if err := s.Validate(); err != nil {
			return nil, fmt.Errorf("orbits: geometry: %w", err)
		}
		seen[s.ID] = true
		g.ids = append(g.ids, s.ID)
		g.stations = append(g.stations, s)
	}
	return g, nil
}

// Clocks returns the clock ids: satellites, then stations.
func (g *Geometry) Clocks() []string { return append([]string(nil), g.ids...) }

// Len returns the number of clocks.
func (g *Geometry) Len() int { return len(g.ids) }

// Index returns the index of clock id, or −1.
func (g *Geometry) Index(id string) int {
	for i, s := range g.ids {
		if s == id {
			return i
		}
	}
	return -1
}

// IsSatellite reports whether clock i is a satellite.
func (g *Geometry) IsSatellite(i int) bool { return i < len(g.orbits) }

// Station returns the station of clock i (ok false for a satellite).
func (g *Geometry) Station(i int) (Station, bool) {
	if i < len(g.orbits) || i >= len(g.ids) {
		return Station{}, false
	}
	return g.stations[i-len(g.orbits)], true
}

// Frame returns the Earth-orientation settings in use.
func (g *Geometry) Frame() Frame { return g.frame }

var nanVec = [3]float64{math.NaN(), math.NaN(), math.NaN()}

// EarthFixedErr returns the Earth-fixed position of clock i in metres at t,
// or the propagation error (e.g. no ephemeris covers t).
func (g *Geometry) EarthFixedErr(i int, t Time) ([3]float64, error) {
	if i < 0 || i >= len(g.ids) {
		return nanVec, fmt.Errorf("orbits: geometry: clock index %d outside [0, %d)", i, len(g.ids))
	}
	if i < len(g.orbits) {
		if k, ok := g.orbits[i].(*Kepler); ok && k.prepared && k.Covers(t) {
			return k.Pos(t), nil // position-only path
		}
		p, _, err := g.orbits[i].PosVel(t)
		if err != nil {
			return nanVec, err
		}
		return p, nil
	}
	return g.stations[i-len(g.orbits)].Pos, nil
}

// EarthFixed returns the Earth-fixed position of clock i in metres at t; it
// is NaN when the satellite's ephemeris does not cover t (use Check or
// EarthFixedErr to learn why).
func (g *Geometry) EarthFixed(i int, t Time) [3]float64 {
	p, _ := g.EarthFixedErr(i, t)
	return p
}

// Celestial returns the celestial (GCRS-like) position of clock i in metres
// at t; NaN when the ephemeris does not cover t.
func (g *Geometry) Celestial(i int, t Time) [3]float64 {
	p, err := g.EarthFixedErr(i, t)
	if err != nil {
		return p
	}
	return g.frame.ToCelestial(t, p)
}

// CelestialAll writes the celestial position (m) of every clock at t into
// dst (len(dst) must be Len()); it computes the Earth rotation once. The
// first propagation error is returned and the affected entries are NaN.
func (g *Geometry) CelestialAll(t Time, dst [][3]float64) error {
	if len(dst) != len(g.ids) {
		return fmt.Errorf("orbits: geometry: dst has %d entries for %d clocks", len(dst), len(g.ids))
	}
	m := g.frame.CelestialMatrix(t)
	var first error
	for i := range g.ids {
		p, err := g.EarthFixedErr(i, t)
		if err != nil {
			if first == nil {
				first = err
			}
			dst[i] = nanVec
			continue
		}
		dst[i] = m.Apply(p)
	}
	return first
}

// Check propagates every satellite on the grid start, start+step, …,
// start+span (seconds) and returns the first epoch it cannot serve, so a
// simulation can fail before it starts.
func (g *Geometry) Check(start Time, span, step float64) error {
	if !(step > 0) || !(span >= 0) {
		return fmt.Errorf("orbits: geometry check: step %g s and span %g s must be positive", step, span)
	}
	n := int(math.Floor(span/step + 1e-9))
	for i, o := range g.orbits {
		for j := 0; j <= n; j++ {
			t := start.Add(float64(j) * step)
			if _, _, err := o.PosVel(t); err != nil {
				return fmt.Errorf("orbits: geometry: clock %s at %v: %w", g.ids[i], t, err)
			}
		}
	}
	return nil
}

// EarthFixedState returns the Earth-fixed position (m) and velocity (m/s)
// of clock i at t (a station's velocity is zero).
func (g *Geometry) EarthFixedState(i int, t Time) (pos, vel [3]float64, err error) {
	if i < 0 || i >= len(g.ids) {
		return nanVec, nanVec, fmt.Errorf("orbits: geometry: clock index %d outside [0, %d)", i, len(g.ids))
	}
	if i < len(g.orbits) {
		pos, vel, err = g.orbits[i].PosVel(t)
		if err != nil {
			return nanVec, nanVec, err
		}
		return pos, vel, nil
	}
	return g.stations[i-len(g.orbits)].Pos, [3]float64{}, nil
}

// CelestialState returns the celestial position (m) and velocity (m/s,
// including the Earth-rotation term) of clock i at t.
func (g *Geometry) CelestialState(i int, t Time) (pos, vel [3]float64, err error) {
	p, v, err := g.EarthFixedState(i, t)
	if err != nil {
		return p, v, err
	}
	pos, vel = g.frame.ToCelestialVel(t, p, v)
	return pos, vel, nil
}

// EarthFixedGrid writes the Earth-fixed positions (m) of clock i at
// t0 + j·step seconds, j = 0 … len(dst)−1. Keplerian records whose fit
// interval covers the whole grid use Kepler.PosGrid (about twice as fast as
// per-epoch calls); other orbits are propagated epoch by epoch. On error
// the entries not computed are NaN.
func (g *Geometry) EarthFixedGrid(i int, t0 Time, step float64, dst [][3]float64) error {
	if i < 0 || i >= len(g.ids) {
		return fmt.Errorf("orbits: geometry: clock index %d outside [0, %d)", i, len(g.ids))
	}
	if len(dst) == 0 {
		return nil
	}
	last := t0.Add(float64(len(dst)-1) * step)
	if i < len(g.orbits) {
		if k, ok := g.orbits[i].(*Kepler); ok && k.Covers(t0) && k.Covers(last) {
			return k.PosGrid(t0, step, dst)
		}
	}
	for j := range dst {
		p, err := g.EarthFixedErr(i, t0.Add(float64(j)*step))
		if err != nil {
			for k := j; k < len(dst); k++ {
				dst[k] = nanVec
			}
			return err
		}
		dst[j] = p
	}
	return nil
}

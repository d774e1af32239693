package search

import (
	"fmt"
	"math"

	"wallcross/orbits"
	"wallcross/sim"
)

// Load reads a dataset directory (DESIGN.md §5) with sim.ReadDataset and
// returns its Network: satellite positions from orbits.sp3, station
// positions from stations.csv, both rotated to the celestial frame of
// package orbits (orbits.Frame{}, UT1 = UTC) at every epoch. The dataset is
// returned too (truth catalogue, manifest fields).
func Load(dir string) (*Network, *sim.Dataset, error) {
	d, err := sim.ReadDataset(dir)
	if err != nil {
		return nil, nil, fmt.Errorf("search: %w", err)
	}
	net, err := FromDataset(d)
	if err != nil {
		return nil, nil, fmt.Errorf("search: dataset %s: %w", dir, err)
	}
	return net, d, nil
}

// FromDataset builds the Network of an in-memory dataset. Satellite clocks
// need positions in d.Orbits (orbits.sp3) covering the span; station clocks
// need an entry in d.Stations. A single-clock reference becomes
// Network.Ref; an ensemble reference gives Ref = −1. Only the reference at
// the first epoch is modelled (a later re-referencing is not).
func FromDataset(d *sim.Dataset) (*Network, error) {
	nc := len(d.Clocks)
	if nc == 0 || d.Epochs < 3 || len(d.Bias) != nc*d.Epochs {
		return nil, fmt.Errorf("search: dataset has %d clocks × %d epochs but %d bias values", nc, d.Epochs, len(d.Bias))
	}
	net := &Network{Start: int64(d.Start), Step: d.Interval, Ref: -1,
		Clocks: make([]Clock, nc), Bias: make([][]float64, nc)}
	for j, c := range d.Clocks {
		sens := make(map[string]float64, len(c.Sensitivity))
		for k, v := range c.Sensitivity {
			sens[k] = v
		}
		net.Clocks[j] = Clock{ID: c.ID, IsStation: c.Kind == sim.Station, Sensitivity: sens}
		b := make([]float64, d.Epochs)
		for k := range b {
			b[k] = d.Bias[k*nc+j]
		}
		net.Bias[j] = b
	}
	if len(d.Reference.Clocks) == 1 {
		net.Ref = d.ClockIndex(d.Reference.Clocks[0])
	}
	// Celestial rotation at every epoch.
	rot := make([]orbits.Mat3, d.Epochs)
	for k := range rot {
		rot[k] = orbits.Frame{}.CelestialMatrix(d.EpochTime(k))
	}
	// Earth-fixed positions at every epoch, per clock.
	ef := make([][][3]float64, nc)
	stations := make(map[string][3]float64, len(d.Stations))
	for _, s := range d.Stations {
		stations[s.ID] = [3]float64{s.X, s.Y, s.Z}
	}
	for j, c := range d.Clocks {
		switch c.Kind {
		case sim.Station:
			r, ok := stations[c.ID]
			if !ok {
				return nil, fmt.Errorf("search: station clock %q has no entry in stations.csv", c.ID)
			}
			p := make([][3]float64, d.Epochs)
			for k := range p {
				p[k] = r
			}
			ef[j] = p
		default:
			p, err := satPositions(d, c.ID)
			if err != nil {
				return nil, err
			}
			ef[j] = p
		}
	}
	cel := make([][][3]float64, nc)
	for j := range ef {
		cel[j] = make([][3]float64, d.Epochs)
		for k := range cel[j] {
			cel[j][k] = rot[k].Apply(ef[j][k])
		}
	}
	step := d.Interval
	net.Pos = func(j int, t float64) [3]float64 {
		k := int(math.Round(t / step))
		if k < 0 || k >= len(cel[j]) || math.Abs(t-float64(k)*step) > 1e-6 {
			return [3]float64{math.NaN(), math.NaN(), math.NaN()}
		}
		return cel[j][k]
	}
	return net, nil
}

// satPositions interpolates satellite id's Earth-fixed SP3 positions to
// every epoch of d (orbits.Track: Lagrange over the orbits.LagrangePoints nearest valid epochs).
func satPositions(d *sim.Dataset, id string) ([][3]float64, error) {
	if d.Orbits == nil {
		return nil, fmt.Errorf("search: satellite clock %q needs positions, but the dataset has no orbits.sp3", id)
	}
	sp := d.Orbits
	si := sp.SatIndex(orbits.SatID(id))
	if si < 0 {
		return nil, fmt.Errorf("search: satellite clock %q is not in orbits.sp3", id)
	}
	tr := sp.Tracks(d.Start, false)[orbits.SatID(id)]
	if tr == nil {
		return nil, fmt.Errorf("search: satellite %q has fewer than %d positions in orbits.sp3", id, orbits.LagrangePoints)
	}
	ts := tr.T // s since the dataset start
	span := float64(d.Epochs-1) * d.Interval
	// Allow one SP3 interval of extrapolation at either end at most.
	gapMax := 0.0
	for i := 1; i < len(ts); i++ {
		gapMax = math.Max(gapMax, ts[i]-ts[i-1])
	}
	if ts[0] > gapMax || ts[len(ts)-1] < span-gapMax {
		return nil, fmt.Errorf("search: satellite %q: orbits.sp3 covers [%g, %g] s, the data span [0, %g] s", id, ts[0], ts[len(ts)-1], span)
	}
	out := make([][3]float64, d.Epochs)
	for k := range out {
		out[k] = tr.At(float64(k) * d.Interval)
	}
	return out, nil
}

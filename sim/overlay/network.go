package overlay

import (
	"fmt"
	"math"
	"sort"

	"wallcross/orbits"
	"wallcross/sim/search"
)

// Network turns a RINEX clock file (perturbed or not) and its SP3 orbits
// into the reference search's input: the AS and AR series on the file's
// epoch grid (NaN where a record is missing), positions in the celestial
// frame, and the reference clock. Clocks without a position are left out;
// a file with several reference clocks gets no in-network reference
// (Ref = −1).
func Network(cf *ClockFile, sp3 *orbits.SP3, stations map[string][3]float64) (*search.Network, error) {
	if len(cf.Records) < 2 {
		return nil, fmt.Errorf("overlay: %s: too few clock records for a search", cf.Name)
	}
	// The epoch grid: the smallest spacing between distinct epochs.
	epochs := map[orbits.Time]bool{}
	for _, r := range cf.Records {
		epochs[r.Epoch] = true
	}
	ts := make([]orbits.Time, 0, len(epochs))
	for t := range epochs {
		ts = append(ts, t)
	}
	sort.Slice(ts, func(i, j int) bool { return ts[i] < ts[j] })
	if len(ts) < 3 {
		return nil, fmt.Errorf("overlay: %s: %d epochs, a search needs at least 3", cf.Name, len(ts))
	}
	step := int64(ts[1] - ts[0])
	for i := 2; i < len(ts); i++ {
		step = min(step, int64(ts[i]-ts[i-1]))
	}
	origin := ts[0]
	n := int((int64(ts[len(ts)-1]-origin))/step) + 1
	orbs := sp3.Tracks(origin, true)
	type col struct {
		id  string
		sta bool
		pos func(t float64) [3]float64
		b   []float64
	}
	var cols []*col
	byName := map[string]*col{}
	for _, r := range cf.Records {
		c, ok := byName[r.Name]
		if !ok {
			c = &col{id: r.Name, sta: r.Type == "AR"}
			switch r.Type {
			case "AS":
				if o := orbs[orbits.SatID(r.Name)]; o != nil {
					c.pos = o.At
				}
			case "AR":
				p, ok := stations[r.Name]
				if !ok {
					p, ok = cf.Stations[r.Name]
				}
				if ok {
					tr := stationTrajectory(origin, p)
					c.pos = func(t float64) [3]float64 { return tr(t) }
				}
			}
			c.b = make([]float64, n)
			for k := range c.b {
				c.b[k] = math.NaN()
			}
			byName[r.Name] = c
			if c.pos != nil {
				cols = append(cols, c)
			}
		}
		off := int64(r.Epoch - origin)
		if off%step != 0 {
			return nil, fmt.Errorf("overlay: %s:%d: epoch %s is off the %g s grid", cf.Name, r.Line, r.Epoch, float64(step)/1e9)
		}
		c.b[off/step] = r.Bias
	}
	net := &search.Network{Start: int64(origin), Step: float64(step) / 1e9, Ref: -1}
	for i, c := range cols {
		net.Clocks = append(net.Clocks, search.Clock{ID: c.id, IsStation: c.sta})
		net.Bias = append(net.Bias, c.b)
		if len(cf.Refs) == 1 && c.id == cf.Refs[0] {
			net.Ref = i
		}
	}
	net.Pos = func(i int, t float64) [3]float64 { return cols[i].pos(t) }
	return net, nil
}

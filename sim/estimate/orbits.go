package estimate

import (
	"fmt"

	"wallcross/orbits"
)

// FromGeometry builds a Network from an orbits.Geometry: satellite
// trajectories from g.Celestial, station positions from the geometry's
// stations, and the Earth-fixed → celestial rotation of g.Frame(). A time t
// (s since the run start) maps to the GPS epoch start.Add(t) (whole ns),
// as in sim.Run.
func FromGeometry(g *orbits.Geometry, start orbits.Time) (*Network, error) {
	if g == nil {
		return nil, fmt.Errorf("estimate: nil geometry")
	}
	net := &Network{}
	ids := g.Clocks()
	for i := range g.Len() {
		if g.IsSatellite(i) {
			net.Satellites = append(net.Satellites, Satellite{ID: ids[i], Pos: func(t float64) [3]float64 {
				return g.Celestial(i, start.Add(t))
			}})
			continue
		}
		st, ok := g.Station(i)
		if !ok {
			return nil, fmt.Errorf("estimate: geometry clock %d (%q) is neither satellite nor station", i, ids[i])
		}
		net.Stations = append(net.Stations, Station{ID: st.ID, ECEF: st.Pos})
	}
	frame := g.Frame()
	net.ToCelestial = func(t float64, v [3]float64) [3]float64 { return frame.ToCelestial(start.Add(t), v) }
	return net, nil
}

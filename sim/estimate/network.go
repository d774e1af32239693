package estimate

import (
	"fmt"
	"math"

	"wallcross/inject"
)

// Satellite is one satellite of the network.
type Satellite struct {
	ID  string            // clock id, e.g. "G01"
	Pos inject.Trajectory // celestial (geocentric, inertial) position, m, at t s since the run start
}

// Station is one ground station of the network.
type Station struct {
	ID   string     // clock id
	ECEF [3]float64 // Earth-fixed (WGS 84) position, m
}

// Network is the geometry the observations are simulated from and the
// estimation assumes known.
type Network struct {
	Satellites []Satellite
	Stations   []Station
	// ToCelestial rotates an Earth-fixed vector into the celestial frame at
	// t (s since the run start). Nil means EarthRotation(0).
	ToCelestial func(t float64, v [3]float64) [3]float64
}

// EarthRotationRate is the WGS 84 / IS-GPS-200 Earth rotation rate Ω̇e,
// rad/s (gnss.md §1.1).
const EarthRotationRate = 7.2921151467e-5

// EarthRotation returns a simple Earth-fixed → celestial rotation: a turn
// about z by the angle theta0 + Ω̇e·t (rad), with no precession, nutation or
// polar motion. Use the orbits package's frames for the full model.
func EarthRotation(theta0 float64) func(t float64, v [3]float64) [3]float64 {
	return func(t float64, v [3]float64) [3]float64 {
		s, c := math.Sincos(theta0 + EarthRotationRate*t)
		return [3]float64{c*v[0] - s*v[1], s*v[0] + c*v[1], v[2]}
	}
}

// FromEarthFixed turns an Earth-fixed trajectory (m, t s since the run
// start) into a celestial one with the rotation toCel.
func FromEarthFixed(pos func(t float64) [3]float64, toCel func(t float64, v [3]float64) [3]float64) inject.Trajectory {
	return func(t float64) [3]float64 { return toCel(t, pos(t)) }
}

func (n *Network) rotation() func(t float64, v [3]float64) [3]float64 {
	if n.ToCelestial != nil {
		return n.ToCelestial
	}
	return EarthRotation(0)
}

func (n *Network) validate() error {
	if len(n.Satellites) == 0 || len(n.Stations) == 0 {
		return fmt.Errorf("estimate: network needs satellites and stations (have %d and %d)", len(n.Satellites), len(n.Stations))
	}
	if len(n.Satellites) > math.MaxInt16 || len(n.Stations) > math.MaxInt16 {
		return fmt.Errorf("estimate: network too large (%d satellites, %d stations; at most %d each)", len(n.Satellites), len(n.Stations), math.MaxInt16)
	}
	seen := map[string]bool{}
	for _, s := range n.Satellites {
		if s.ID == "" || seen[s.ID] {
			return fmt.Errorf("estimate: satellite id %q empty or repeated", s.ID)
		}
		if s.Pos == nil {
			return fmt.Errorf("estimate: satellite %q has no trajectory", s.ID)
		}
		seen[s.ID] = true
	}
	for _, s := range n.Stations {
		if s.ID == "" || seen[s.ID] {
			return fmt.Errorf("estimate: station id %q empty or repeated", s.ID)
		}
		r := math.Sqrt(s.ECEF[0]*s.ECEF[0] + s.ECEF[1]*s.ECEF[1] + s.ECEF[2]*s.ECEF[2])
		if !(r > 6.3e6 && r < 6.4e6) {
			return fmt.Errorf("estimate: station %q at geocentric radius %g m, not on the Earth's surface", s.ID, r)
		}
		seen[s.ID] = true
	}
	return nil
}

// WGS 84 ellipsoid (NIMA TR8350.2: a = 6378137 m, 1/f = 298.257223563).
const (
	wgs84A = 6378137.0
	wgs84F = 1 / 298.257223563
)

// Geodetic returns the WGS 84 geodetic latitude and longitude (rad) and
// ellipsoidal height (m) of an Earth-fixed position (m), by fixed-point
// iteration on the latitude (converges to 1e-12 rad in a few steps for
// points near the surface).
func Geodetic(r [3]float64) (lat, lon, h float64) {
	e2 := wgs84F * (2 - wgs84F)
	p := math.Hypot(r[0], r[1])
	lon = math.Atan2(r[1], r[0])
	lat = math.Atan2(r[2], p*(1-e2))
	for range 10 {
		s := math.Sin(lat)
		nrad := wgs84A / math.Sqrt(1-e2*s*s)
		h = p/math.Cos(lat) - nrad
		next := math.Atan2(r[2], p*(1-e2*nrad/(nrad+h)))
		if math.Abs(next-lat) < 1e-14 {
			lat = next
			break
		}
		lat = next
	}
	s := math.Sin(lat)
	nrad := wgs84A / math.Sqrt(1-e2*s*s)
	h = p/math.Cos(lat) - nrad
	return lat, lon, h
}

// up returns the unit ellipsoid normal (local vertical) at geodetic lat, lon.
func up(lat, lon float64) [3]float64 {
	sl, cl := math.Sincos(lat)
	so, co := math.Sincos(lon)
	return [3]float64{cl * co, cl * so, sl}
}

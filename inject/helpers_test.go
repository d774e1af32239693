package inject

import (
	"math"
)

// Test trajectories of our own: circular orbits and Earth-rotating stations.

// gmEarth is GM of the Earth in m³/s² (IS-GPS-200 user algorithm value 3.986005e14, from memory).
const gmEarth = 3.986005e14

// omegaEarth is the Earth rotation rate in rad/s (IS-GPS-200 / WGS 84: 7.2921151467e-5, from memory).
const omegaEarth = 7.2921151467e-5

// circularOrbit returns the trajectory of a circular orbit of radius a (m),
// inclination inc and right ascension of the node raan (rad), argument of
// latitude u0 (rad) at t = 0.
func circularOrbit(a, inc, raan, u0 float64) Trajectory {
	n := math.Sqrt(gmEarth / (a * a * a))
	so, co := math.Sincos(raan)
	si, ci := math.Sincos(inc)
	// p: node direction; q: in-plane, 90° ahead.
	p := [3]float64{co, so, 0}
	q := [3]float64{-so * ci, co * ci, si}
	return func(t float64) [3]float64 {
		s, c := math.Sincos(u0 + n*t)
		return [3]float64{a * (c*p[0] + s*q[0]), a * (c*p[1] + s*q[1]), a * (c*p[2] + s*q[2])}
	}
}

// station returns the celestial trajectory of a point on a sphere of radius
// R (m) at latitude lat and longitude lon (rad) rotating with the Earth.
func station(R, lat, lon float64) Trajectory {
	sl, cl := math.Sincos(lat)
	return func(t float64) [3]float64 {
		s, c := math.Sincos(lon + omegaEarth*t)
		return [3]float64{R * cl * c, R * cl * s, R * sl}
	}
}

// unit returns v/|v|.
func unit(v [3]float64) [3]float64 {
	n := math.Sqrt(dot(v, v))
	return [3]float64{v[0] / n, v[1] / n, v[2] / n}
}

// effWall returns a Gaussian wall with an effective coupling.
func effWall(n [3]float64, v, d, t0, a2, lambda float64, p Profile) Wall {
	return Wall{ID: 1, T0: t0, N: unit(n), Speed: v, Thickness: d, Profile: p, A2: a2,
		Coupling: Coupling{Mode: CouplingEff, LambdaEff: lambda}}
}

package orbits

import (
	"fmt"
	"math"
)

// WalkerConfig describes a Walker-delta constellation i: T/P/F with
// T = Planes·SlotsPerPlane satellites on circular orbits.
//
// Satellite s (0-based) of plane p has the right ascension of its ascending
// node RAAN0 + 2π·p/Planes (Earth-fixed longitude of the node at Epoch) and
// the mean anomaly (argument of latitude) MeanAnomaly0 + 2π·s/SlotsPerPlane
// + 2π·Phasing·p/(Planes·SlotsPerPlane) at Epoch (Walker 1984, J. Brit.
// Interplanet. Soc. 37:559, from memory). PRNs are numbered plane by plane
// from FirstPRN.
type WalkerConfig struct {
	// System is the system letter of the generated ids ('G', 'E', ...).
	System byte
	// Planes is the number of orbital planes P (≥ 1).
	Planes int
	// SlotsPerPlane is the number of satellites per plane (≥ 1).
	SlotsPerPlane int
	// Phasing is the Walker phasing factor F in [0, Planes).
	Phasing int
	// SemiMajorAxis is the orbit radius in metres; when 0, Altitude is used.
	SemiMajorAxis float64
	// Altitude above the WGS 84 equatorial radius in metres (used when
	// SemiMajorAxis is 0).
	Altitude float64
	// Inclination in radians.
	Inclination float64
	// RAAN0 is the Earth-fixed longitude of the first plane's ascending node
	// at Epoch, radians (default 0).
	RAAN0 float64
	// MeanAnomaly0 is the argument of latitude of the first satellite at
	// Epoch, radians (default 0).
	MeanAnomaly0 float64
	// Epoch is the reference epoch (toe and toc) of every record.
	Epoch Time
	// FirstPRN is the PRN of the first satellite (default 1).
	FirstPRN int
	// NoJ2 disables the secular J2 drift of the node. By default the node
	// regresses at Ω̇ = −1.5·n·J2·(a_e/a)²·cos i (Vallado, Fundamentals of
	// Astrodynamics, eq. 9-41, from memory; J2 = 1.08262668e-3 of EGM96,
	// from memory), −0.039°/day for the GPS-like default.
	NoJ2 bool
}

// Default Walker parameters.
const (
	// GPSWalkerA is the GPS-like semi-major axis in m (≈ 26 560 km; the
	// nominal GPS orbit, IS-GPS-200 Table 20-IV fit for a 12-sidereal-hour
	// period, common practice).
	GPSWalkerA = 26559.7e3
	// GalileoWalkerA is the Galileo-like semi-major axis in m (29 600 km,
	// Galileo 24/3/1 reference constellation, common practice).
	GalileoWalkerA = 29599.8e3
	j2EGM96        = 1.08262668e-3
)

// GPSWalkerConfig returns the GPS-like default: 24/6/1 at a = 26 559.7 km,
// i = 55°, system 'G'.
func GPSWalkerConfig(epoch Time) WalkerConfig {
	return WalkerConfig{System: 'G', Planes: 6, SlotsPerPlane: 4, Phasing: 1,
		SemiMajorAxis: GPSWalkerA, Inclination: 55 * math.Pi / 180, Epoch: epoch, FirstPRN: 1}
}

// GalileoWalkerConfig returns the Galileo-like default: 24/3/1 at
// a = 29 599.8 km, i = 56°, system 'E'.
func GalileoWalkerConfig(epoch Time) WalkerConfig {
	return WalkerConfig{System: 'E', Planes: 3, SlotsPerPlane: 8, Phasing: 1,
		SemiMajorAxis: GalileoWalkerA, Inclination: 56 * math.Pi / 180, Epoch: epoch, FirstPRN: 1}
}

// WalkerGPS returns the default GPS-like constellation at epoch.
func WalkerGPS(epoch Time) []*Kepler {
	k, err := Walker(GPSWalkerConfig(epoch))
	if err != nil {
		panic(err) // the default configuration is valid
	}
	return k
}

// WalkerGalileo returns the default Galileo-like constellation at epoch.
func WalkerGalileo(epoch Time) []*Kepler {
	k, err := Walker(GalileoWalkerConfig(epoch))
	if err != nil {
		panic(err)
	}
	return k
}

// Walker builds the constellation as Keplerian ephemeris records (message
// "SYNTH") served by the same propagator as broadcast records. The records
// have an unlimited fit interval (FitHours = +Inf), so one record per
// satellite is valid over any span; the orbit is a circular Kepler orbit
// (plus the optional secular node drift), which stays self-consistent for
// years. Clock terms are zero and every record is healthy.
func Walker(c WalkerConfig) ([]*Kepler, error) {
	if c.Planes < 1 || c.SlotsPerPlane < 1 {
		return nil, fmt.Errorf("orbits: walker needs at least 1 plane and 1 slot, got %d planes × %d slots", c.Planes, c.SlotsPerPlane)
	}
	if c.Phasing < 0 || c.Phasing >= c.Planes && c.Planes > 1 {
		return nil, fmt.Errorf("orbits: walker phasing F = %d outside [0, %d)", c.Phasing, c.Planes)
	}
	a := c.SemiMajorAxis
	if a == 0 {
		a = WGS84A + c.Altitude
	}
	if !(a > WGS84A) || math.IsInf(a, 0) {
		return nil, fmt.Errorf("orbits: walker semi-major axis %.0f m is not above the Earth's surface", a)
	}
	if !(c.Inclination >= 0 && c.Inclination <= math.Pi) {
		return nil, fmt.Errorf("orbits: walker inclination %g rad outside [0, π]", c.Inclination)
	}
	if c.System == 0 {
		c.System = 'G'
	}
	first := c.FirstPRN
	if first == 0 {
		first = 1
	}
	total := c.Planes * c.SlotsPerPlane
	if first+total-1 > 99 {
		return nil, fmt.Errorf("orbits: walker PRNs %d..%d exceed 99", first, first+total-1)
	}
	mu := MuGPS
	if c.System == 'E' || c.System == 'C' {
		mu = MuGalileo
	}
	n := math.Sqrt(mu / (a * a * a))
	omd := 0.0
	if !c.NoJ2 {
		omd = -1.5 * n * j2EGM96 * (WGS84A / a) * (WGS84A / a) * math.Cos(c.Inclination)
	}
	out := make([]*Kepler, 0, total)
	for p := range c.Planes {
		for s := range c.SlotsPerPlane {
			node := c.RAAN0 + 2*math.Pi*float64(p)/float64(c.Planes)
			m := c.MeanAnomaly0 + 2*math.Pi*float64(s)/float64(c.SlotsPerPlane) +
				2*math.Pi*float64(c.Phasing)*float64(p)/float64(total)
			k := &Kepler{
				ID:       MakeSatID(c.System, first+p*c.SlotsPerPlane+s),
				Msg:      "SYNTH",
				Toc:      c.Epoch,
				Toe:      c.Epoch,
				SqrtA:    math.Sqrt(a),
				M0:       math.Remainder(m, 2*math.Pi),
				OmegaD:   omd,
				I0:       c.Inclination,
				FitHours: KeplerFitUnlimited,
			}
			if err := k.Prepare(); err != nil {
				return nil, err
			}
			// Ωk = Ω0 + (Ω̇ − Ω̇e)·tk − Ω̇e·toe: choose Ω0 so that the node's
			// Earth-fixed longitude at Epoch (tk = 0) is node.
			k.Omega0 = math.Remainder(node+k.omegaE*k.toeSOW, 2*math.Pi)
			out = append(out, k)
		}
	}
	return out, nil
}

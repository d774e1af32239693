package orbits

import (
	"fmt"
	"math"
	"strconv"
)

// SatID names a satellite as in RINEX 3 and SP3: the system letter followed
// by a two-digit PRN or slot number, e.g. "G01", "E11", "R24", "C05".
type SatID string

// System returns the system letter of s (G GPS, E Galileo, R GLONASS,
// C BeiDou, J QZSS, I NavIC, S SBAS), or 0 for an empty id.
func (s SatID) System() byte {
	if len(s) == 0 {
		return 0
	}
	return s[0]
}

// PRN returns the number part of s, or 0 when it is not a number.
func (s SatID) PRN() int {
	if len(s) < 2 {
		return 0
	}
	n, err := strconv.Atoi(string(s[1:]))
	if err != nil {
		return 0
	}
	return n
}

// MakeSatID builds the id of system sys and number prn, e.g. ('G', 1) → "G01".
func MakeSatID(sys byte, prn int) SatID {
	return SatID(fmt.Sprintf("%c%02d", sys, prn))
}

// Orbit is anything that gives a satellite's Earth-fixed trajectory: a single
// ephemeris record, or a track that picks the right record per epoch.
type Orbit interface {
	// Sat returns the satellite id.
	Sat() SatID
	// PosVel returns the Earth-fixed (WGS 84 / PZ-90 ≈ ITRF) position in
	// metres and velocity in m/s at GPS epoch t.
	PosVel(t Time) (pos, vel [3]float64, err error)
}

// Ephemeris is one broadcast (or synthetic) ephemeris record.
type Ephemeris interface {
	Orbit
	// Ref returns the reference epoch of the orbit (toe or tb), GPS time.
	Ref() Time
	// ClockRef returns the reference epoch of the clock polynomial (toc).
	ClockRef() Time
	// Covers reports whether t lies inside the record's fit interval.
	Covers(t Time) bool
	// Healthy reports whether the broadcast health word is zero.
	Healthy() bool
	// ClockBias returns the broadcast clock polynomial in seconds at t
	// (af0 + af1·Δt + af2·Δt² for Keplerian records, −τN + γN·Δt for
	// GLONASS), without the relativistic term and without group delays. It
	// refers to the system's ionosphere-free clock (the IGS convention).
	ClockBias(t Time) float64
	// Relativistic returns the periodic relativistic clock correction in
	// seconds at t (F·e·√A·sin E for Keplerian records; −2 r·v/c² for
	// GLONASS, where the broadcast τN already contains it and users must not
	// add it again).
	Relativistic(t Time) float64
	// Message names the navigation message (LNAV, INAV, FNAV, D1, D2, FDMA,
	// or SYNTH for synthetic records).
	Message() string
}

// SpeedOfLight is c in m/s (exact, SI).
const SpeedOfLight = 299792458.0

// relativisticFromState returns −2 r·v/c² in seconds for an inertial or
// Earth-fixed state (the dot product is the same in both).
func relativisticFromState(r, v [3]float64) float64 {
	return -2 * (r[0]*v[0] + r[1]*v[1] + r[2]*v[2]) / (SpeedOfLight * SpeedOfLight)
}

// norm returns the Euclidean length of v.
func norm(v [3]float64) float64 { return math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2]) }

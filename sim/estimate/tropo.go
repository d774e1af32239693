package estimate

import "math"

// Troposphere model: Saastamoinen zenith delays (IERS Conventions 2010,
// §9.2, eq. 9.11–9.12, from memory) with the pressure of the U.S. Standard
// Atmosphere 1976 at the station height and the Black & Eisner (1984)
// mapping function m(e) = 1.001/√(0.002001 + sin²e) (as used in RTCA
// DO-229; from memory) for both the hydrostatic and the wet part.

// StandardPressure returns the pressure of the U.S. Standard Atmosphere 1976
// at geometric height z (m, troposphere layer, z < 11 km), hPa:
// P = 1013.25·(1 − L·H/T₀)^(g₀M/(R*L)) with L = 0.0065 K/m, T₀ = 288.15 K,
// exponent 5.25588 and geopotential height H = r₀·z/(r₀ + z),
// r₀ = 6 356 766 m. (An ellipsoidal height stands in for z here.)
func StandardPressure(z float64) float64 {
	const r0 = 6356766.0
	h := r0 * z / (r0 + z)
	return 1013.25 * math.Pow(1-0.0065*h/288.15, 5.25588)
}

// ZenithHydrostatic returns the Saastamoinen zenith hydrostatic delay, m,
// for pressure p (hPa) at geodetic latitude lat (rad) and height h (m):
// 0.0022768·P/(1 − 0.00266·cos 2φ − 0.28e-6·h) (IERS Conventions 2010 eq. 9.11–9.12).
func ZenithHydrostatic(p, lat, h float64) float64 {
	return 0.0022768 * p / (1 - 0.00266*math.Cos(2*lat) - 0.28e-6*h)
}

// MappingBlackEisner returns the Black & Eisner mapping function
// 1.001/√(0.002001 + sin²e) at elevation e (rad), dimensionless.
func MappingBlackEisner(e float64) float64 {
	s := math.Sin(e)
	return 1.001 / math.Sqrt(0.002001+s*s)
}

// TroposphereDelay returns the slant tropospheric delay, m, at elevation e
// (rad) for a station at geodetic latitude lat (rad) and height h (m), with
// a zenith wet delay zwd (m).
func TroposphereDelay(e, lat, h, zwd float64) float64 {
	zhd := ZenithHydrostatic(StandardPressure(h), lat, h)
	return (zhd + zwd) * MappingBlackEisner(e)
}

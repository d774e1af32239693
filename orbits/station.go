package orbits

import (
	"fmt"
	"math"
)

// WGS 84 ellipsoid (NIMA TR8350.2, 3rd ed., Table 3.1, from memory; checked
// against pyproj/erfa in the tests).
const (
	// WGS84A is the semi-major axis in metres.
	WGS84A = 6378137.0
	// WGS84F is the flattening (dimensionless).
	WGS84F  = 1 / 298.257223563
	wgs84E2 = WGS84F * (2 - WGS84F) // first eccentricity squared
)

// Station is a ground clock at a fixed Earth-fixed position.
type Station struct {
	// ID is the station name (e.g. a 4- or 9-character IGS-style name).
	ID string
	// Pos is the Earth-fixed (WGS 84 / ITRF) position in metres.
	Pos [3]float64
	// Lat and Lon are WGS 84 geodetic latitude and longitude in radians
	// (longitude positive east); Height is the ellipsoidal height in metres.
	Lat, Lon, Height float64
	// Clock names the clock family (a preset name of package noise, e.g.
	// "hmaser"); orbits does not interpret it.
	Clock string
	// Reference marks the network's reference clock.
	Reference bool
}

// StationFromGeodetic builds a station from WGS 84 geodetic coordinates
// (radians, radians, metres).
func StationFromGeodetic(id string, latRad, lonRad, hM float64) Station {
	return Station{ID: id, Pos: GeodeticToECEF(latRad, lonRad, hM), Lat: latRad, Lon: lonRad, Height: hM}
}

// StationFromECEF builds a station from an Earth-fixed position in metres.
func StationFromECEF(id string, pos [3]float64) Station {
	lat, lon, h := Geodetic(pos)
	return Station{ID: id, Pos: pos, Lat: lat, Lon: lon, Height: h}
}

// Validate reports a station whose coordinates are not finite or whose
// geodetic and Earth-fixed coordinates disagree by more than 1 mm.
func (s Station) Validate() error {
	for _, v := range []float64{s.Pos[0], s.Pos[1], s.Pos[2], s.Lat, s.Lon, s.Height} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("orbits: station %q has a non-finite coordinate", s.ID)
		}
	}
	p := GeodeticToECEF(s.Lat, s.Lon, s.Height)
	d := math.Sqrt(sq(p[0]-s.Pos[0]) + sq(p[1]-s.Pos[1]) + sq(p[2]-s.Pos[2]))
	if d > 1e-3 {
		return fmt.Errorf("orbits: station %q geodetic and Earth-fixed coordinates differ by %.3f m", s.ID, d)
	}
	return nil
}

func sq(x float64) float64 { return x * x }

// GeodeticToECEF converts WGS 84 geodetic latitude, longitude (radians) and
// ellipsoidal height (m) to Earth-fixed Cartesian coordinates in metres.
func GeodeticToECEF(lat, lon, h float64) [3]float64 {
	sl, cl := math.Sincos(lat)
	so, co := math.Sincos(lon)
	n := WGS84A / math.Sqrt(1-wgs84E2*sl*sl) // prime-vertical radius
	return [3]float64{(n + h) * cl * co, (n + h) * cl * so, (n*(1-wgs84E2) + h) * sl}
}

// Geodetic converts an Earth-fixed position (m) to WGS 84 geodetic latitude,
// longitude (radians) and ellipsoidal height (m). It iterates the standard
// fixed-point relation tan φ = (z + e² N sin φ)/p to convergence below 1e-15
// rad (sub-nm for terrestrial and GNSS-orbit radii); at the poles it returns
// longitude 0.
func Geodetic(r [3]float64) (lat, lon, h float64) {
	x, y, z := r[0], r[1], r[2]
	p := math.Hypot(x, y)
	lon = math.Atan2(y, x)
	if p < 1e-9 {
		lon = 0
		switch {
		case z > 0:
			return math.Pi / 2, 0, z - WGS84A*(1-WGS84F)
		case z < 0:
			return -math.Pi / 2, 0, -z - WGS84A*(1-WGS84F)
		default:
			return 0, 0, -WGS84A
		}
	}
	lat = math.Atan2(z, p*(1-wgs84E2))
	for range 10 {
		sl := math.Sin(lat)
		n := WGS84A / math.Sqrt(1-wgs84E2*sl*sl)
		nl := math.Atan2(z+wgs84E2*n*sl, p)
		if math.Abs(nl-lat) < 1e-15 {
			lat = nl
			break
		}
		lat = nl
	}
	sl, cl := math.Sincos(lat)
	n := WGS84A / math.Sqrt(1-wgs84E2*sl*sl)
	if math.Abs(cl) > 1e-3 {
		h = p/cl - n
	} else {
		h = z/sl - n*(1-wgs84E2)
	}
	return lat, lon, h
}

package inject

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/integrate/quad"
)

// icrsToGalactic returns the rotation matrix from ICRS to galactic
// coordinates; its rows are the galactic x (toward the Galactic centre),
// y (toward l = 90°) and z (toward the north Galactic pole) axes in ICRS.
// Source: ESA (1997), The Hipparcos and Tycho Catalogues, Vol. 1, §1.5.3,
// matrix A_G (values as in physics.md §4, from memory there); checked against
// erfa.icrs2g/g2icrs in halo_test.go.
func icrsToGalactic() [3][3]float64 {
	return [3][3]float64{
		{-0.0548755604, -0.8734370902, -0.4838350155},
		{+0.4941094279, -0.4448296300, +0.7469822445},
		{-0.8676661490, -0.1980763734, +0.4559837762},
	}
}

// GalacticToICRS rotates a galactic Cartesian vector to ICRS (any unit).
func GalacticToICRS(g [3]float64) [3]float64 {
	m := icrsToGalactic()
	var out [3]float64
	for j := range 3 {
		out[j] = m[0][j]*g[0] + m[1][j]*g[1] + m[2][j]*g[2]
	}
	return out
}

// ICRSToGalactic rotates an ICRS Cartesian vector to galactic (any unit).
func ICRSToGalactic(v [3]float64) [3]float64 {
	m := icrsToGalactic()
	return [3]float64{dot(m[0], v), dot(m[1], v), dot(m[2], v)}
}

// Spherical returns the longitude in [0, 2π) and latitude in [−π/2, π/2]
// (rad) of a Cartesian vector: (RA, Dec) for ICRS, (l, b) for galactic.
func Spherical(v [3]float64) (lon, lat float64) {
	lon = math.Atan2(v[1], v[0])
	if lon < 0 {
		lon += 2 * math.Pi
	}
	return lon, math.Atan2(v[2], math.Hypot(v[0], v[1]))
}

// FromSpherical returns the unit vector at longitude lon and latitude lat (rad).
func FromSpherical(lon, lat float64) [3]float64 {
	sl, cl := math.Sincos(lon)
	sb, cb := math.Sincos(lat)
	return [3]float64{cb * cl, cb * sl, sb}
}

// Halo is the standard halo model of the wall velocities (physics.md §4).
type Halo struct {
	V0   float64 // circular speed v0, m/s (SHM peak; σ_1D = v0/√2)
	VEsc float64 // escape speed in the galactic rest frame, m/s (0: no truncation)
	// SunPeculiar is the Sun's peculiar motion (U, V, W) in m/s: U toward the
	// Galactic centre, V along rotation (v0 is added), W toward the NGP.
	SunPeculiar [3]float64
	// EarthOrbit adds the Earth's orbital velocity (29.79 km/s).
	EarthOrbit bool
	// EquinoxT is the time of a March equinox in s since the run start (t1 of
	// the orbital-velocity formula; may be negative).
	EquinoxT float64
}

// StandardHalo returns v0 = 220 km/s (Lewin & Smith 1996), v_esc = 544 km/s
// (Smith et al. 2007) and (U, V, W) = (11.1, 12.24, 7.25) km/s (Schönrich,
// Binney & Dehnen 2010), without the Earth's orbit (values: physics.md §4).
func StandardHalo() Halo {
	return Halo{V0: 220e3, VEsc: 544e3, SunPeculiar: [3]float64{11.1e3, 12.24e3, 7.25e3}}
}

// EarthOrbitalSpeed is the Earth's mean orbital speed, m/s (physics.md §4,
// Lee, Lisanti & Safdi 2013, from memory).
const EarthOrbitalSpeed = 29.79e3

// Validate reports an unusable halo model.
func (h Halo) Validate() error {
	if !(h.V0 > 0) || math.IsInf(h.V0, 0) {
		return fmt.Errorf("inject: halo v0 %g m/s must be positive and finite", h.V0)
	}
	if h.VEsc != 0 && (!(h.VEsc >= h.V0/2) || math.IsInf(h.VEsc, 0)) {
		return fmt.Errorf("inject: halo escape speed %g m/s must be finite and at least v0/2 = %g m/s (0 = untruncated)", h.VEsc, h.V0/2)
	}
	for i, u := range h.SunPeculiar {
		if math.IsNaN(u) || math.IsInf(u, 0) {
			return fmt.Errorf("inject: solar peculiar velocity component %d = %g m/s not finite", i, u)
		}
	}
	if math.IsNaN(h.EquinoxT) || math.IsInf(h.EquinoxT, 0) {
		return fmt.Errorf("inject: equinox time %g s not finite", h.EquinoxT)
	}
	return nil
}

// SunVelocity returns the Sun's galactic velocity (U, v0 + V, W) in m/s.
func (h Halo) SunVelocity() [3]float64 {
	return [3]float64{h.SunPeculiar[0], h.V0 + h.SunPeculiar[1], h.SunPeculiar[2]}
}

// EarthVelocity returns the geocentre's galactic velocity at t (s since the
// run start) in m/s: the Sun's plus, if EarthOrbit, the orbital velocity
// v_orb·[ε₁ cos ω(t − t1) + ε₂ sin ω(t − t1)] with ω = 2π/yr (Julian year),
// ε₁ = (0.9940, 0.1095, 0.0031), ε₂ = (−0.0517, 0.4945, −0.8677) galactic
// (Lee, Lisanti & Safdi 2013, physics.md §4, from memory).
func (h Halo) EarthVelocity(t float64) [3]float64 {
	v := h.SunVelocity()
	if !h.EarthOrbit {
		return v
	}
	e1 := [3]float64{0.9940, 0.1095, 0.0031}
	e2 := [3]float64{-0.0517, 0.4945, -0.8677}
	s, c := math.Sincos(2 * math.Pi * (t - h.EquinoxT) / JulianYear)
	for i := range 3 {
		v[i] += EarthOrbitalSpeed * (e1[i]*c + e2[i]*s)
	}
	return v
}

// SampleGalactic draws a dark-matter velocity in the galactic rest frame,
// m/s: isotropic Gaussian with σ_1D = v0/√2, rejected at |v| ≥ v_esc.
// The halo must pass Validate (v_esc ≥ v0/2 keeps the acceptance above 7 %).
func (h Halo) SampleGalactic(rng *rand.Rand) [3]float64 {
	s := h.V0 / math.Sqrt2
	for {
		v := [3]float64{s * rng.NormFloat64(), s * rng.NormFloat64(), s * rng.NormFloat64()}
		if h.VEsc == 0 || dot(v, v) < h.VEsc*h.VEsc {
			return v
		}
	}
}

// SampleRelative draws the velocity of dark matter (hence of a wall)
// relative to the geocentre at t (s since the run start), in the celestial
// (ICRS) frame, m/s. Its mean points away from the solar apex.
func (h Halo) SampleRelative(rng *rand.Rand, t float64) [3]float64 {
	g := h.SampleGalactic(rng)
	e := h.EarthVelocity(t)
	return GalacticToICRS([3]float64{g[0] - e[0], g[1] - e[1], g[2] - e[2]})
}

// Mean March equinox used by EquinoxOffset: 2000-03-20 07:35 UTC as Unix
// seconds, and the mean tropical year 365.24219 d (both from memory).
const (
	equinox2000Unix = 953537700
	tropicalYear    = 365.24219 * 86400
)

// EquinoxOffset returns the time in s of the latest mean March equinox at or
// before the run start, relative to that start (so ≤ 0), for Halo.EquinoxT.
// startUnix is the run start in Unix seconds (UTC; the 18-s GPS−UTC offset
// and the ±1 h spread of the true equinox around the mean are negligible for
// the orbital-velocity phase: 1 h is 7e-4 rad).
func EquinoxOffset(startUnix int64) float64 {
	dt := float64(startUnix - equinox2000Unix)
	return -(dt - tropicalYear*math.Floor(dt/tropicalYear))
}

// speedPDF is the unnormalised density of the speed v (m/s) relative to an
// observer moving at vE through the truncated standard halo (Lewin & Smith
// 1996, Astropart. Phys. 6, 87; the angular integral in closed form):
//
//	f(v) ∝ v²·∫_{−1}^{c_max} exp(−(v² + vE² + 2·v·vE·c)/v0²) dc,
//	c_max = min(1, (v_esc² − v² − vE²)/(2·v·vE))   (c_max = 1 untruncated).
func (h Halo) speedPDF(v, vE float64) float64 {
	if v <= 0 {
		return 0
	}
	cmax := 1.0
	if h.VEsc > 0 {
		cmax = math.Min(1, (h.VEsc*h.VEsc-v*v-vE*vE)/(2*v*vE))
	}
	if cmax <= -1 {
		return 0
	}
	v02 := h.V0 * h.V0
	k := 2 * v * vE / v02
	e := -(v*v + vE*vE) / v02
	return v * v * (math.Exp(e+k) - math.Exp(e-k*cmax)) / k
}

// MeanRelativeSpeed returns the mean speed of halo dark matter relative to
// the Sun-moving geocentre, m/s (the annual mean: the Earth's orbit is left
// out), by quadrature of the closed-form speed distribution; with
// fluxWeighted the mean of v weighted by v (encounter rate ∝ speed). For the
// StandardHalo: 329.9 and 378.5 km/s (physics.md §4: 330 and 379 km/s).
// A natural v̄ for AmplitudeSpec. The halo must pass Validate.
func (h Halo) MeanRelativeSpeed(fluxWeighted bool) float64 {
	vE := vnorm(h.SunVelocity())
	vmax := vE + 8*h.V0
	if h.VEsc > 0 {
		vmax = h.VEsc + vE
	}
	knee := vmax // the density has a kink at v_esc − vE
	if h.VEsc > 0 && h.VEsc > vE {
		knee = h.VEsc - vE
	}
	var m [3]float64 // moments 0, 1, 2
	for i := range m {
		f := func(v float64) float64 { return math.Pow(v, float64(i)) * h.speedPDF(v, vE) }
		m[i] = quad.Fixed(f, 0, knee, 200, nil, 0)
		if knee < vmax {
			m[i] += quad.Fixed(f, knee, vmax, 200, nil, 0)
		}
	}
	if fluxWeighted {
		return m[2] / m[1]
	}
	return m[1] / m[0]
}

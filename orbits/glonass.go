package orbits

import (
	"fmt"
	"math"
)

// PZ-90 constants of the GLONASS ICD Ed. 5.1 (2008), Appendix A.3.1.2
// (from memory; ../shared/reference/gnss.md §1.4).
const (
	glonassGM    = 398600.4418e9 // m³/s²
	glonassAe    = 6378136.0     // m
	glonassJ2    = 1082625.75e-9 // second zonal harmonic (dimensionless)
	glonassOmega = 7.292115e-5   // rad/s
	glonassStep  = 60.0          // RK4 step, s (gnss.md §1.4: stable to mm for 10–150 s)
	glonassFit   = 15 * 60.0     // |t − tb| limit, s (ICD A.3.1.2)
)

// Glonass is a GLONASS FDMA broadcast ephemeris record: the PZ-90
// Earth-fixed state at tb and the luni-solar acceleration, propagated by
// 4th-order Runge–Kutta with J2 (ICD Ed. 5.1 Appendix A.3.1.2, simplified
// equations of motion in the rotating frame).
type Glonass struct {
	ID      SatID
	Tb      Time       // reference epoch (GPS time; RINEX gives it in UTC)
	ClkBias float64    // −τN in s (RINEX field 1)
	ClkRate float64    // +γN, relative frequency bias (RINEX field 2)
	Pos     [3]float64 // PZ-90 position at tb, m
	Vel     [3]float64 // PZ-90 velocity at tb, m/s
	Acc     [3]float64 // luni-solar acceleration, m/s² (constant over the fit)
	Health  int        // health flag Bn (0 = healthy)
	FreqNum int        // frequency channel k
	Age     int        // age of operational information, days
}

// Sat returns the satellite id.
func (g *Glonass) Sat() SatID { return g.ID }

// Ref returns tb.
func (g *Glonass) Ref() Time { return g.Tb }

// ClockRef returns tb.
func (g *Glonass) ClockRef() Time { return g.Tb }

// Covers reports |t − tb| ≤ 15 min.
func (g *Glonass) Covers(t Time) bool { return math.Abs(t.Sub(g.Tb)) <= glonassFit }

// Healthy reports Health == 0.
func (g *Glonass) Healthy() bool { return g.Health == 0 }

// Message returns "FDMA".
func (g *Glonass) Message() string { return "FDMA" }

// ClockBias returns −τN + γN·(t − tb) in seconds (RINEX 3.05 §8 GLONASS
// table, from memory; sign checked on R01 of set C [data], see
// ../shared/reference/gnss.md §1.4).
func (g *Glonass) ClockBias(t Time) float64 { return g.ClkBias + g.ClkRate*t.Sub(g.Tb) }

// Relativistic returns −2 r·v/c² at t in seconds. The GLONASS broadcast τN
// already accounts for it; it is given for diagnostics only.
func (g *Glonass) Relativistic(t Time) float64 {
	p, v, err := g.PosVel(t)
	if err != nil {
		return 0
	}
	return relativisticFromState(p, v)
}

// glonassDeriv returns the acceleration of the ICD's simplified model.
func (g *Glonass) accel(p, v [3]float64) [3]float64 {
	x, y, z := p[0], p[1], p[2]
	r2 := x*x + y*y + z*z
	r := math.Sqrt(r2)
	gmr3 := glonassGM / (r2 * r)
	k := 1.5 * glonassJ2 * glonassGM * glonassAe * glonassAe / (r2 * r2 * r)
	z2r2 := 5 * z * z / r2
	w2 := glonassOmega * glonassOmega
	return [3]float64{
		-gmr3*x - k*x*(1-z2r2) + w2*x + 2*glonassOmega*v[1] + g.Acc[0],
		-gmr3*y - k*y*(1-z2r2) + w2*y - 2*glonassOmega*v[0] + g.Acc[1],
		-gmr3*z - k*z*(3-z2r2) + g.Acc[2],
	}
}

// PosVel integrates from tb to t in equal RK4 steps of at most 60 s and
// returns the PZ-90 (≈ ITRF at the metre level) position (m) and velocity
// (m/s). It returns an error when |t − tb| > 15 min.
func (g *Glonass) PosVel(t Time) (pos, vel [3]float64, err error) {
	dt := t.Sub(g.Tb)
	if math.Abs(dt) > glonassFit {
		return pos, vel, fmt.Errorf("orbits: %s ephemeris with tb %v does not cover %v (|t−tb| ≤ 900 s)", g.ID, g.Tb, t)
	}
	pos, vel = g.integrate(dt)
	return pos, vel, nil
}

// integrate runs RK4 over dt seconds from tb without the fit-interval check.
func (g *Glonass) integrate(dt float64) (pos, vel [3]float64) {
	pos, vel = g.Pos, g.Vel
	n := int(math.Ceil(math.Abs(dt)/glonassStep - 1e-12))
	if n == 0 {
		return pos, vel
	}
	h := dt / float64(n)
	add := func(a [3]float64, s float64, b [3]float64) [3]float64 {
		return [3]float64{a[0] + s*b[0], a[1] + s*b[1], a[2] + s*b[2]}
	}
	for range n {
		k1v := g.accel(pos, vel)
		k1p := vel
		p2, v2 := add(pos, h/2, k1p), add(vel, h/2, k1v)
		k2v := g.accel(p2, v2)
		k2p := v2
		p3, v3 := add(pos, h/2, k2p), add(vel, h/2, k2v)
		k3v := g.accel(p3, v3)
		k3p := v3
		p4, v4 := add(pos, h, k3p), add(vel, h, k3v)
		k4v := g.accel(p4, v4)
		k4p := v4
		for i := range 3 {
			pos[i] += h / 6 * (k1p[i] + 2*k2p[i] + 2*k3p[i] + k4p[i])
			vel[i] += h / 6 * (k1v[i] + 2*k2v[i] + 2*k3v[i] + k4v[i])
		}
	}
	return pos, vel
}

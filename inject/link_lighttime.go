package inject

import (
	"fmt"
	"math"
)

// Light-time solution for a satellite → station link (gnss.md §1.1: the
// signal flight time is ~67–86 ms and the Earth turns by Ω̇e·τ ≈ 5–6e-6 rad
// during the flight).

// lightTimeTol is the convergence tolerance on the last step of the flight
// time, s. The fixed-point error shrinks by |v_radial|/c ≤ 1.3e-5 per step,
// so the returned τ is within ~1.3e-17 s (4 nm) of the solution; the
// tolerance is also above the 1.3e-14 s jitter that a trajectory evaluated
// on a whole-nanosecond time grid (orbits.Time) can cause.
const lightTimeTol = 1e-12

// lightTimeMaxIter bounds the fixed-point iteration; each step shrinks the
// error by |v_sat|/c ≈ 1.3e-5, so 3–4 steps suffice.
const lightTimeMaxIter = 20

// LightTime solves the light-time equation in the celestial (inertial,
// geocentric) frame: the flight time τ (s) with
// |rcv(tr) − sat(tr − τ)| = c·τ for a signal received at tr (s since the run
// start). The emission time is tr − τ. The Earth's rotation during the
// flight is included because rcv and sat are inertial trajectories. It
// iterates on τ itself, not on t_e, so the result keeps the precision of τ
// (~1e-17 s) rather than of a float64 epoch (1.5e-11 s at one day).
func LightTime(sat, rcv Trajectory, tr float64) (tau float64, err error) {
	if sat == nil || rcv == nil {
		return 0, fmt.Errorf("inject: light time at t=%g s: nil trajectory", tr)
	}
	r := rcv(tr)
	return iterateLightTime(tr, func(tau float64) [3]float64 {
		s := sat(tr - tau)
		return [3]float64{r[0] - s[0], r[1] - s[1], r[2] - s[2]}
	})
}

// LightTimeEarthFixed solves the light-time equation with Earth-fixed
// trajectories: the satellite position at emission, sat(tr − τ), is
// rotated about the z axis into the Earth-fixed frame of the reception time
// by the angle ω·τ (the Earth-rotation, or Sagnac, correction; gnss.md
// §1.1), x′ = x·cos ωτ + y·sin ωτ, y′ = −x·sin ωτ + y·cos ωτ. omega is the
// Earth rotation rate in rad/s (7.2921151467e-5 for WGS 84). It returns the
// flight time τ (s) and the rotated satellite position (m, Earth-fixed at
// tr).
func LightTimeEarthFixed(sat, rcv Trajectory, tr, omega float64) (tau float64, satRot [3]float64, err error) {
	if sat == nil || rcv == nil {
		return 0, satRot, fmt.Errorf("inject: light time at t=%g s: nil trajectory", tr)
	}
	r := rcv(tr)
	tau, err = iterateLightTime(tr, func(tau float64) [3]float64 {
		satRot = rotateZ(sat(tr-tau), omega*tau)
		return [3]float64{r[0] - satRot[0], r[1] - satRot[1], r[2] - satRot[2]}
	})
	return tau, satRot, err
}

// rotateZ returns the coordinates of v in a frame turned by angle a (rad)
// about z.
func rotateZ(v [3]float64, a float64) [3]float64 {
	s, c := math.Sincos(a)
	return [3]float64{c*v[0] + s*v[1], -s*v[0] + c*v[1], v[2]}
}

// iterateLightTime runs τ ← |sep(τ)|/c to convergence, where sep(τ) is the
// receiver-minus-satellite vector for flight time τ.
func iterateLightTime(tr float64, sep func(tau float64) [3]float64) (float64, error) {
	tau := 0.0
	for range lightTimeMaxIter {
		d := sep(tau)
		next := math.Sqrt(d[0]*d[0]+d[1]*d[1]+d[2]*d[2]) / SpeedOfLight
		if math.IsNaN(next) || math.IsInf(next, 0) {
			return 0, fmt.Errorf("inject: light time at t=%g s: position not finite (flight time %g s)", tr, tau)
		}
		if math.Abs(next-tau) < lightTimeTol {
			return next, nil
		}
		tau = next
	}
	return 0, fmt.Errorf("inject: light time at t=%g s did not converge in %d iterations (last flight time %g s)", tr, lightTimeMaxIter, tau)
}

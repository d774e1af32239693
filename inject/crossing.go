package inject

import (
	"fmt"
	"math"
)

// Trajectory gives a clock's celestial-frame (GCRS-like, geocentric) position
// in metres at t seconds since the run's start epoch. Walls use the same time
// origin. It must be finite near the crossing; elsewhere it may return NaN
// (e.g. outside an ephemeris' coverage): the solver then starts from the
// nearest finite position within 2 h of the wall's T0.
type Trajectory func(t float64) [3]float64

// Crossing is one clock's encounter with one wall: everything needed to
// render the clock's signal δν/ν(t) = Scale·s((t − TCross)/Tau).
type Crossing struct {
	Event    int     // wall id
	Clock    string  // clock id
	Family   string  // clock family
	TCross   float64 // s since the run start: N·r(t) = v·(t − T0)
	VRel     float64 // relative normal speed v − N·ṙ(TCross), m/s (> 0)
	Tau      float64 // crossing time scale, s: d/v (default) or d/VRel (Wall.ClockMotion)
	Profile  Profile
	Scale    float64 // Γ·Aⁿ, dimensionless
	Residual float64 // |N·r(TCross) − v·(TCross − T0)|/v, s
	AccelN   float64 // N·r̈ at the crossing, m/s² (5-s second difference; NaN if unknown)
}

// accelStep is the step of the second difference for N·r̈, s.
const accelStep = 5.0

// LinearError returns the bound on the error of the linear approximation
// within ±3τ of the crossing, in units of the wall thickness:
// |δu| ≤ |N·r̈|·(3τ)²/(2d) = 4.5·|N·r̈|·τ/v_rel (see the package doc). It is
// a local estimate: once 3τ approaches a quarter orbit it understates the
// error, but it grows as τ there anyway. The phase error is much smaller
// (symmetric profiles cancel to first order): on GPS orbits LinearError 1e-2
// (d ≈ 1e9 m) means phase errors of a few 1e-4 of the step, 0.1–0.3
// (d ≈ 1e10 m) up to 7e-3 (measured with Wall.ClockMotion; a default wall
// adds the first-order width error |v − VRel|/v). Above about 1e-2, prefer
// RenderPhaseAlong.
func (c Crossing) LinearError() float64 { return 4.5 * math.Abs(c.AccelN) * c.Tau / c.VRel }

// CrossTolerance is the time tolerance of the crossing solver, s.
const CrossTolerance = 1e-9

// maxResidual is the largest accepted crossing residual, s (the 1 µs budget).
const maxResidual = 1e-6

// velocityStep is the half-step of the central difference for N·ṙ, s.
const velocityStep = 0.5

// Cross solves for the time at which the wall's centre plane meets the clock
// on trajectory tr, N·r(t) = v·(t − T0), and returns the crossing with the
// clock's signal scale for its family. The solver brackets the root of
// f(t) = N·r(t) − v·(t − T0) (decreasing where |ṙ| < v) and refines it by
// secant steps safeguarded by bisection to CrossTolerance; the residual
// |f|/v must end below 1 µs.
func (w *Wall) Cross(clock, family string, tr Trajectory) (Crossing, error) {
	if err := w.Validate(); err != nil {
		return Crossing{}, err
	}
	if tr == nil {
		return Crossing{}, fmt.Errorf("inject: wall %d, clock %q: nil trajectory", w.ID, clock)
	}
	scale, err := w.Scale(family)
	if err != nil {
		return Crossing{}, fmt.Errorf("inject: wall %d, clock %q: %w", w.ID, clock, err)
	}
	tc, res, err := w.solve(tr)
	if err != nil {
		return Crossing{}, fmt.Errorf("inject: wall %d, clock %q: %w", w.ID, clock, err)
	}
	// v_rel = v − N·ṙ at the crossing (central difference).
	p1, p2 := tr(tc+velocityStep), tr(tc-velocityStep)
	ndot := (dot(w.N, p1) - dot(w.N, p2)) / (2 * velocityStep)
	vrel := w.Speed - ndot
	if !(vrel > 0) || math.IsInf(vrel, 0) {
		return Crossing{}, fmt.Errorf("inject: wall %d, clock %q: relative normal speed %g m/s at t=%g s is not positive (clock faster than the wall?)", w.ID, clock, vrel, tc)
	}
	// N·r̈ by a second difference (for LinearError only; NaN if the
	// trajectory is not finite within 5 s of the crossing).
	acc := (dot(w.N, tr(tc+accelStep)) - 2*dot(w.N, tr(tc)) + dot(w.N, tr(tc-accelStep))) / (accelStep * accelStep)
	// physics.md §3.2: the clock sees φ²(v⊥·(t − t_j)), τ = d/v⊥, the same
	// for every clock; ClockMotion uses the clock's own relative speed.
	tau := w.Thickness / w.Speed
	if w.ClockMotion {
		tau = w.Thickness / vrel
	}
	return Crossing{Event: w.ID, Clock: clock, Family: family, TCross: tc, VRel: vrel,
		Tau: tau, Profile: w.Profile, Scale: scale, Residual: res, AccelN: acc}, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// solve returns the root of f(t) = N·r(t) − v(t − T0) and its residual |f|/v in s.
func (w *Wall) solve(tr Trajectory) (float64, float64, error) {
	f := func(t float64) float64 { return dot(w.N, tr(t)) - w.Speed*(t-w.T0) }
	r0 := dot(w.N, tr(w.T0))
	if !finite(r0) {
		// The trajectory may not cover T0 (an ephemeris that starts after a
		// wall passed the geocentre) while it covers the crossing: start
		// from the nearest covered time instead, searched ±2 h in 30-s steps.
		found := false
		for j := 1; j <= 240 && !found; j++ {
			for _, sg := range [2]float64{1, -1} {
				if q := dot(w.N, tr(w.T0+sg*30*float64(j))); finite(q) {
					r0, found = q, true
					break
				}
			}
		}
		if !found {
			return 0, 0, fmt.Errorf("trajectory not finite within 2 h of t=%g s", w.T0)
		}
	}
	g := w.T0 + r0/w.Speed // straight-line first guess
	fg := f(g)
	if math.IsNaN(fg) || math.IsInf(fg, 0) {
		return 0, 0, fmt.Errorf("trajectory not finite at t=%g s", g)
	}
	if fg == 0 {
		return g, 0, nil
	}
	// Bracket: f(lo) > 0 > f(hi), expanding from the first guess.
	step := math.Max(1, 2*math.Abs(fg)/w.Speed)
	lo, hi := g, g
	flo, fhi := fg, fg
	for i := 0; ; i++ {
		if flo > 0 && fhi < 0 {
			break
		}
		if i == 80 {
			return 0, 0, fmt.Errorf("could not bracket the crossing near t=%g s (trajectory faster than the wall, v=%g m/s?)", g, w.Speed)
		}
		if !(flo > 0) {
			lo = g - step
			flo = f(lo)
		}
		if !(fhi < 0) {
			hi = g + step
			fhi = f(hi)
		}
		if math.IsNaN(flo) || math.IsNaN(fhi) || math.IsInf(flo, 0) || math.IsInf(fhi, 0) {
			return 0, 0, fmt.Errorf("trajectory not finite near t=%g s", g)
		}
		step *= 4
	}
	// Secant steps from the best end, safeguarded by bisection.
	t, ft := g, fg
	slope := -w.Speed // f′ ≈ −v (clock speed ≪ v)
	for range 100 {
		next := t - ft/slope
		if !(next > lo && next < hi) {
			next = 0.5 * (lo + hi)
		}
		fn := f(next)
		if math.IsNaN(fn) || math.IsInf(fn, 0) {
			return 0, 0, fmt.Errorf("trajectory not finite at t=%g s", next)
		}
		if fn > 0 {
			lo = next
		} else {
			hi = next
		}
		if next != t {
			if s := (fn - ft) / (next - t); s < 0 {
				slope = s
			}
		}
		dt := math.Abs(next - t)
		t, ft = next, fn
		if ft == 0 || dt < CrossTolerance || hi-lo < CrossTolerance {
			break
		}
	}
	res := math.Abs(ft) / w.Speed
	if !(res < maxResidual) {
		return 0, 0, fmt.Errorf("crossing residual %g s at t=%g s exceeds 1 µs", res, t)
	}
	return t, res, nil
}

// Step returns the total bias change ΔT = Scale·Tau·C_p in s the clock
// accumulates over the whole crossing (physics.md §3.3; Gaussian:
// √π·Γ·A²·d/v, or d/v_rel with Wall.ClockMotion). NaN for the linear kink, whose phase ramps.
func (c Crossing) Step() float64 { return c.Scale * c.Tau * c.Profile.Area() }

// Record returns the crossings.csv row of this crossing.
func (c Crossing) Record() CrossingRecord {
	return CrossingRecord{Event: c.Event, Clock: c.Clock, TCross: c.TCross, Step: c.Step()}
}

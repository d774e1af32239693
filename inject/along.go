package inject

import (
	"fmt"
	"math"
)

// Rendering along the true trajectory, for walls too thick for the linear
// approximation within a crossing (Crossing.LinearError large: crossings
// lasting a good fraction of an orbit). The clock sees
//
//	δν/ν(t) = Scale·s(u(t)),  u(t) = (v·(t − T0) − N·r(t))/d,
//
// evaluated on the trajectory itself, so its orbital motion during the
// crossing is kept exactly. The phase is integrated numerically:
// 5-point Gauss–Legendre on pieces of at most min(τ/10, 300 s), only where
// the pulse is not negligible (|u| ≤ 7 Gaussian, 20 kinks; the top-hat is
// integrated exactly between its edge crossings, solved like the centre).
// The part accumulated before the first epoch, if the pulse has already
// begun there, is taken from the closed form (Crossing.PhaseAt), which only
// shifts the whole series by a constant.

// alongTail is the |u| beyond which the along-trajectory integral skips the pulse.
func alongTail(p Profile) float64 {
	switch p {
	case ProfileGaussian:
		return 7 // e^{−49} = 5e-22
	case ProfileTopHat:
		return 0.5
	}
	return 20 // sech²: 4e-17; linear kink: 1 + tanh(−20) = 8e-18
}

// maxAlongPiece caps the Gauss–Legendre piece length, s (resolves the
// orbital modulation, periods ≥ 1.5 h).
const maxAlongPiece = 300.0

// gl5 are the 5-point Gauss–Legendre nodes and weights on [−1, 1]
// (Abramowitz & Stegun, Table 25.4).
func gl5() (x, wt [5]float64) {
	return [5]float64{-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640},
		[5]float64{0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891}
}

// The integral always includes the clock's motion, as Wall.ClockMotion does
// for the closed form; for a default wall (τ = d/v) the two differ by the
// factor v/v_rel in the pulse width.

// RenderPhaseAlong adds the clock's phase perturbation in s at each of times
// (strictly increasing, s since the run start) to dst, integrating the
// wall's profile along the trajectory tr (see above). c must be the crossing
// of w with the same trajectory (it supplies Scale and TCross). The
// trajectory must be finite over [times[0], times[len−1]].
func RenderPhaseAlong(dst, times []float64, w *Wall, c Crossing, tr Trajectory) error {
	if len(dst) != len(times) {
		return fmt.Errorf("inject: render phase along: %d destination samples for %d epochs", len(dst), len(times))
	}
	if err := w.Validate(); err != nil {
		return err
	}
	if err := c.validRender(); err != nil {
		return err
	}
	if tr == nil {
		return fmt.Errorf("inject: render phase along: nil trajectory")
	}
	if c.Profile != w.Profile || c.Event != w.ID {
		return fmt.Errorf("inject: render phase along: crossing of wall %d (%v) used with wall %d (%v)", c.Event, c.Profile, w.ID, w.Profile)
	}
	for k := 1; k < len(times); k++ {
		if !(times[k] > times[k-1]) {
			return fmt.Errorf("inject: render phase along: epochs %g s and %g s at index %d do not increase", times[k-1], times[k], k)
		}
	}
	if len(times) == 0 {
		return nil
	}
	p, d, v := w.Profile, w.Thickness, w.Speed
	u := func(t float64) float64 { return (v*(t-w.T0) - dot(w.N, tr(t))) / d }
	// Window [tlo, thi] where |u| ≤ L, from the planes u = ∓L.
	L := alongTail(p)
	edge := func(off float64) float64 {
		e := *w
		e.T0 = w.T0 + off*d/v
		if t, _, err := e.solve(tr); err == nil {
			return t
		}
		// Trajectory not covering the edge: the top-hat takes the linear
		// approximation's edge, the smooth pulses a wide window.
		if p == ProfileTopHat {
			return c.TCross + off*c.Tau
		}
		return c.TCross + 2*off*c.Tau
	}
	tlo, thi := edge(-L), edge(L)
	u0 := u(times[0])
	if !finite(u0) {
		return fmt.Errorf("inject: render phase along: trajectory not finite at t=%g s", times[0])
	}
	// Before the first epoch: the closed form (linear approximation).
	x := c.PhaseAt(times[0])
	xg, wg := gl5()
	h := math.Min(c.Tau/10, maxAlongPiece)
	integrate := func(a, b float64) float64 { // ∫_a^b δν/ν dt for a < b
		switch {
		case b <= a:
			return 0
		case p == ProfileTopHat:
			return 0 // handled below
		}
		n := math.Ceil((b - a) / h)
		step := (b - a) / n
		sum := 0.0
		for i := 0.0; i < n; i++ {
			m := a + (i+0.5)*step
			for j := range xg {
				sum += wg[j] * p.Shape(u(m+0.5*step*xg[j]))
			}
		}
		return c.Scale * 0.5 * step * sum
	}
	overlap := func(a, b, lo, hi float64) float64 { return math.Max(0, math.Min(b, hi)-math.Max(a, lo)) }
	dst[0] += x
	for k := 1; k < len(times); k++ {
		a, b := times[k-1], times[k]
		switch {
		case p == ProfileTopHat:
			x += c.Scale * overlap(a, b, tlo, thi) // s = 1 exactly between the edges
		default:
			x += integrate(math.Max(a, tlo), math.Min(b, thi))
			if p == ProfileKinkLinear {
				x += c.Scale * 2 * overlap(a, b, thi, math.Inf(1)) // s = 2 after the wall
			}
		}
		if !finite(x) {
			return fmt.Errorf("inject: render phase along: trajectory not finite in [%g, %g] s", a, b)
		}
		dst[k] += x
	}
	return nil
}

// RenderPhaseAlongGrid is RenderPhaseAlong on the uniform grid
// t_k = start + k·step (s).
func RenderPhaseAlongGrid(dst []float64, start, step float64, w *Wall, c Crossing, tr Trajectory) error {
	if !(step > 0) || math.IsInf(step, 0) || !finite(start) {
		return fmt.Errorf("inject: render phase along: grid start %g s, step %g s must be finite with step > 0", start, step)
	}
	times := make([]float64, len(dst))
	for k := range times {
		times[k] = start + float64(k)*step
	}
	return RenderPhaseAlong(dst, times, w, c, tr)
}

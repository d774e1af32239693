package inject

import (
	"fmt"
	"math"
)

// validRender reports a crossing that cannot be rendered.
func (c Crossing) validRender() error {
	if !c.Profile.valid() {
		return fmt.Errorf("inject: crossing of clock %q: invalid profile %d", c.Clock, int(c.Profile))
	}
	if !(c.Tau > 0) || math.IsInf(c.Tau, 0) {
		return fmt.Errorf("inject: crossing of clock %q: time scale %g s must be positive and finite", c.Clock, c.Tau)
	}
	if math.IsNaN(c.Scale) || math.IsInf(c.Scale, 0) || math.IsNaN(c.TCross) || math.IsInf(c.TCross, 0) {
		return fmt.Errorf("inject: crossing of clock %q: scale %g or crossing time %g s not finite", c.Clock, c.Scale, c.TCross)
	}
	return nil
}

// FrequencyAt returns the instantaneous fractional frequency perturbation
// δν/ν at t (s since the run start): Scale·s((t − TCross)/Tau).
func (c Crossing) FrequencyAt(t float64) float64 {
	return c.Scale * c.Profile.Shape((t-c.TCross)/c.Tau)
}

// PhaseAt returns the accumulated phase (bias) perturbation
// X(t) = ∫_{−∞}^{t} δν/ν dt′ = Scale·Tau·S((t − TCross)/Tau) in s, in closed form.
func (c Crossing) PhaseAt(t float64) float64 {
	r := c.renderer()
	return r.phase(t)
}

// MeanFrequency returns the fractional frequency averaged exactly over
// [ta, tb], [X(tb) − X(ta)]/(tb − ta), computed without cancellation in the
// tails. A wall much thinner than the interval keeps its full area.
func (c Crossing) MeanFrequency(ta, tb float64) float64 {
	r := c.renderer()
	ua, ub := (ta-c.TCross)*r.inv, (tb-c.TCross)*r.inv
	if (ua < -r.tail && ub < -r.tail) || (ua > r.tail && ub > r.tail) {
		return 0
	}
	return r.amp * c.Profile.Between(ua, ub) / (tb - ta)
}

// RenderPhase adds the clock's phase perturbation X(t) in s at each of times
// (s since the run start) to dst, so it can be summed with noise.
// len(dst) must equal len(times).
func RenderPhase(dst, times []float64, c Crossing) error {
	if len(dst) != len(times) {
		return fmt.Errorf("inject: render phase: %d destination samples for %d epochs", len(dst), len(times))
	}
	if err := c.validRender(); err != nil {
		return err
	}
	r := c.renderer()
	for k, t := range times {
		dst[k] += r.phase(t)
	}
	return nil
}

// renderer caches the per-crossing constants of the sample loops.
type renderer struct {
	c         Crossing
	inv, tail float64 // 1/Tau, profile tail in u
	amp, step float64 // Scale·Tau, full step
}

func (c Crossing) renderer() renderer {
	a := c.Scale * c.Tau
	return renderer{c: c, inv: 1 / c.Tau, tail: c.Profile.tail(), amp: a, step: a * c.Profile.Area()}
}

// phase equals c.PhaseAt(t) up to rounding in (t − TCross)/Tau.
func (r *renderer) phase(t float64) float64 {
	u := (t - r.c.TCross) * r.inv
	if u < -r.tail {
		return 0
	}
	if u > r.tail {
		return r.step
	}
	return r.amp * r.c.Profile.Cumulative(u)
}

// RenderPhaseGrid is RenderPhase on the uniform grid t_k = start + k·step (s).
func RenderPhaseGrid(dst []float64, start, step float64, c Crossing) error {
	if !(step > 0) || math.IsInf(step, 0) || math.IsNaN(start) || math.IsInf(start, 0) {
		return fmt.Errorf("inject: render phase: grid start %g s, step %g s must be finite with step > 0", start, step)
	}
	if err := c.validRender(); err != nil {
		return err
	}
	r := c.renderer()
	for k := range dst {
		dst[k] += r.phase(start + float64(k)*step)
	}
	return nil
}

// RenderFrequency adds to dst[k] the fractional frequency perturbation
// averaged exactly over [times[k], times[k+1]], i.e.
// [X(t_{k+1}) − X(t_k)]/(t_{k+1} − t_k), so thin walls never alias.
// len(dst) must equal len(times) − 1 and times must increase strictly.
func RenderFrequency(dst, times []float64, c Crossing) error {
	if len(times) < 2 || len(dst) != len(times)-1 {
		return fmt.Errorf("inject: render frequency: %d destination intervals for %d epochs (want epochs − 1)", len(dst), len(times))
	}
	if err := c.validRender(); err != nil {
		return err
	}
	for k := range dst {
		if !(times[k+1] > times[k]) {
			return fmt.Errorf("inject: render frequency: epochs %g s and %g s at index %d do not increase", times[k], times[k+1], k)
		}
	}
	r := c.renderer()
	ua := (times[0] - c.TCross) * r.inv
	for k := range dst {
		ub := (times[k+1] - c.TCross) * r.inv
		if !((ua < -r.tail && ub < -r.tail) || (ua > r.tail && ub > r.tail)) {
			dst[k] += r.amp * c.Profile.Between(ua, ub) / (times[k+1] - times[k])
		}
		ua = ub
	}
	return nil
}

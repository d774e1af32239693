package inject

import (
	"fmt"
	"math"
	"strconv"
)

// Wall is one planar domain wall. Its centre plane has unit normal N and
// moves along N at Speed relative to the geocentre; it passes the geocentre
// at T0. A clock at celestial position r(t) is at signed distance
// x(t) = N·r(t) − Speed·(t − T0) ahead of the centre plane.
type Wall struct {
	ID        int        // event id (as in events.csv)
	T0        float64    // s since the run's start epoch: the centre plane passes the geocentre
	N         [3]float64 // unit velocity direction, celestial (GCRS-like) frame
	Speed     float64    // normal speed v relative to the geocentre, m/s
	Thickness float64    // d, m
	Profile   Profile
	A2        float64 // squared field amplitude A², GeV² (see AmplitudeSpec.Resolve)
	Coupling  Coupling
	// ClockMotion makes each clock's crossing time scale τ = d/v_rel with
	// its own relative normal speed v_rel = v − N·ṙ, instead of the
	// default τ = d/v of physics.md §3.2 (the same for every clock). The
	// crossing time itself always includes the clock's motion.
	ClockMotion bool
}

// Validate reports a wall that cannot be rendered.
func (w *Wall) Validate() error {
	if math.IsNaN(w.T0) || math.IsInf(w.T0, 0) {
		return fmt.Errorf("inject: wall %d: t0 %g s must be finite", w.ID, w.T0)
	}
	n := math.Sqrt(w.N[0]*w.N[0] + w.N[1]*w.N[1] + w.N[2]*w.N[2])
	if !(math.Abs(n-1) < 1e-9) {
		return fmt.Errorf("inject: wall %d: direction %v has norm %g, want a unit vector", w.ID, w.N, n)
	}
	if !(w.Speed > 0) || !(w.Speed < SpeedOfLight) {
		return fmt.Errorf("inject: wall %d: speed %g m/s must be in (0, c)", w.ID, w.Speed)
	}
	if !(w.Thickness > 0) || math.IsInf(w.Thickness, 0) {
		return fmt.Errorf("inject: wall %d: thickness %g m must be positive and finite", w.ID, w.Thickness)
	}
	if !w.Profile.valid() {
		return fmt.Errorf("inject: wall %d: invalid profile %d", w.ID, int(w.Profile))
	}
	if !(w.A2 >= 0) || math.IsInf(w.A2, 0) {
		return fmt.Errorf("inject: wall %d: amplitude A² %g GeV² must be non-negative and finite", w.ID, w.A2)
	}
	if err := w.Coupling.Validate(); err != nil {
		return fmt.Errorf("inject: wall %d: %w", w.ID, err)
	}
	return nil
}

// amplitudeN returns Aⁿ (GeV^n) for the profile's power n.
func (w *Wall) amplitudeN() float64 {
	if w.Profile.Power() == 1 {
		return math.Sqrt(w.A2)
	}
	return w.A2
}

// Scale returns Γ·Aⁿ for a clock family: the dimensionless factor in
// δν/ν = Γ·Aⁿ·s(u).
func (w *Wall) Scale(family string) (float64, error) {
	g, err := w.Coupling.Gamma(family, w.Profile.Power())
	if err != nil {
		return 0, err
	}
	return g * w.amplitudeN(), nil
}

// PeakDnu returns the signed peak δν/ν of the reporting clock
// (Γ_eff for CouplingEff, Coupling.ReportFamily otherwise): Γ·Aⁿ·Peak().
func (w *Wall) PeakDnu() (float64, error) {
	g, err := w.Coupling.reportGamma(w.Profile.Power())
	if err != nil {
		return 0, err
	}
	return g * w.amplitudeN() * w.Profile.Peak(), nil
}

// LambdaEff returns Λ_eff (Λ′ for the linear kink) of the reporting clock in GeV.
func (w *Wall) LambdaEff() (float64, error) {
	n := w.Profile.Power()
	g, err := w.Coupling.reportGamma(n)
	if err != nil {
		return 0, err
	}
	return math.Pow(math.Abs(g), -1/float64(n)), nil
}

// Event is the truth record of one wall, one row of events.csv (DESIGN.md §5).
type Event struct {
	ID           int        // event
	T0           float64    // t0_s: s since the run start, centre plane at the geocentre
	N            [3]float64 // nx, ny, nz: unit velocity, celestial frame
	Speed        float64    // speed_m_s
	Thickness    float64    // thickness_m
	Profile      string     // profile name
	LambdaEffGeV float64    // lambda_eff_gev of the reporting clock
	PeakDnu      float64    // peak_dnu: signed peak δν/ν of the reporting clock
}

// EventColumns returns the events.csv header (DESIGN.md §5).
func EventColumns() []string {
	return []string{"event", "t0_s", "nx", "ny", "nz", "speed_m_s", "thickness_m", "profile", "lambda_eff_gev", "peak_dnu"}
}

// Event returns the wall's truth record.
func (w *Wall) Event() (Event, error) {
	if err := w.Validate(); err != nil {
		return Event{}, err
	}
	l, err := w.LambdaEff()
	if err != nil {
		return Event{}, err
	}
	p, err := w.PeakDnu()
	if err != nil {
		return Event{}, err
	}
	return Event{ID: w.ID, T0: w.T0, N: w.N, Speed: w.Speed, Thickness: w.Thickness,
		Profile: w.Profile.String(), LambdaEffGeV: l, PeakDnu: p}, nil
}

// Strings formats the record in EventColumns() order (shortest exact float form).
func (e Event) Strings() []string {
	return []string{strconv.Itoa(e.ID), ff(e.T0), ff(e.N[0]), ff(e.N[1]), ff(e.N[2]),
		ff(e.Speed), ff(e.Thickness), e.Profile, ff(e.LambdaEffGeV), ff(e.PeakDnu)}
}

// CrossingRecord is one row of crossings.csv (DESIGN.md §5).
type CrossingRecord struct {
	Event  int     // event id
	Clock  string  // clock id
	TCross float64 // t_cross_s: s since the run start
	Step   float64 // step_s: the bias step this clock receives, s (NaN for the linear kink)
}

// CrossingColumns returns the crossings.csv header (DESIGN.md §5).
func CrossingColumns() []string { return []string{"event", "clock", "t_cross_s", "step_s"} }

// Strings formats the record in CrossingColumns() order.
func (r CrossingRecord) Strings() []string {
	return []string{strconv.Itoa(r.Event), r.Clock, ff(r.TCross), ff(r.Step)}
}

func ff(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

package inject

import (
	"fmt"
	"math"
)

// A2FromDensity returns the squared field amplitude A² in GeV² of a wall
// that makes up the local dark matter (physics.md §1.2, from the
// order-of-magnitude relation ρ_DM = σ/L of Derevianko & Pospelov 2014):
//
//	A² [GeV²] = ħc [GeV·m] · ρ_DM [GeV/m³] · v̄ [m/s] · T [s] · d [m]
//
// rho in GeV/m³ (multiply GeV/cm³ by GeVPerCm3), vbar the population's
// typical speed in m/s, T the mean time between encounters in s, d the
// thickness in m.
func A2FromDensity(rho, vbar, T, d float64) float64 { return HbarC * rho * vbar * T * d }

// KinkTensionFactor is the factor 3/4 applied to A² for kink profiles when the
// wall tension σ = (4/3)A²/(ħc·d) is used instead of σ ~ A²/d (physics.md §1.2, derived).
const KinkTensionFactor = 0.75

// AmplitudeMode selects how a wall's amplitude is specified. The zero value is invalid.
type AmplitudeMode int

const (
	// AmplitudeDensity: A² = ħc·ρ_DM·v̄·T·d (A2FromDensity).
	AmplitudeDensity AmplitudeMode = iota + 1
	// AmplitudePeak: the peak |δν/ν| seen by the reporting clock is given.
	AmplitudePeak
	// AmplitudeStep: the bias step |ΔT| in s of the reporting clock is given
	// (pulse profiles only); A² then depends on each wall's speed.
	AmplitudeStep
	// AmplitudeDirect: A² in GeV² is given.
	AmplitudeDirect
)

// String returns "density", "peak", "step" or "direct".
func (m AmplitudeMode) String() string {
	switch m {
	case AmplitudeDensity:
		return "density"
	case AmplitudePeak:
		return "peak"
	case AmplitudeStep:
		return "step"
	case AmplitudeDirect:
		return "direct"
	}
	return fmt.Sprintf("AmplitudeMode(%d)", int(m))
}

// ParseAmplitudeMode accepts "density", "peak", "step" and "direct".
func ParseAmplitudeMode(s string) (AmplitudeMode, error) {
	for m := AmplitudeDensity; m <= AmplitudeDirect; m++ {
		if s == m.String() {
			return m, nil
		}
	}
	return 0, fmt.Errorf("inject: unknown amplitude mode %q (want density, peak, step or direct)", s)
}

// AmplitudeSpec specifies a wall's amplitude.
type AmplitudeSpec struct {
	Mode AmplitudeMode

	// AmplitudeDensity:
	RhoDM        float64 // ρ_DM in GeV/m³ (0.4 GeV/cm³ = 0.4*GeVPerCm3)
	VBar         float64 // v̄, the population's typical speed, m/s
	MeanInterval float64 // T, mean time between encounters, s (0: the population's)
	// KinkTension multiplies A² by KinkTensionFactor for the kink profiles.
	KinkTension bool

	// AmplitudePeak: |peak δν/ν| of the reporting clock (dimensionless):
	// |Γ|·Aⁿ·|s|max, with |s|max = 2 for the linear kink (the frequency step).
	PeakDnu float64
	// AmplitudeStep: |bias step| of the reporting clock in s, |Γ·C_p|·A²·d/v.
	Step float64
	// AmplitudeDirect: A² in GeV².
	A2 float64
}

// Resolve returns A² in GeV² for a wall of the given profile, coupling,
// thickness d (m) and normal speed v (m/s).
func (s AmplitudeSpec) Resolve(p Profile, c Coupling, d, v float64) (float64, error) {
	if !p.valid() {
		return 0, fmt.Errorf("inject: invalid profile %d", int(p))
	}
	if !(d > 0) || math.IsInf(d, 0) {
		return 0, fmt.Errorf("inject: thickness %g m must be positive and finite", d)
	}
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("inject: wall speed %g m/s must be positive and finite", v)
	}
	var a2 float64
	switch s.Mode {
	case AmplitudeDensity:
		if !(s.RhoDM > 0) || math.IsInf(s.RhoDM, 0) {
			return 0, fmt.Errorf("inject: rho_dm %g GeV/m³ must be positive and finite", s.RhoDM)
		}
		if !(s.VBar > 0) || math.IsInf(s.VBar, 0) {
			return 0, fmt.Errorf("inject: typical speed %g m/s must be positive and finite", s.VBar)
		}
		if !(s.MeanInterval > 0) || math.IsInf(s.MeanInterval, 0) {
			return 0, fmt.Errorf("inject: mean interval %g s must be positive and finite", s.MeanInterval)
		}
		a2 = A2FromDensity(s.RhoDM, s.VBar, s.MeanInterval, d)
		if s.KinkTension && (p == ProfileKink || p == ProfileKinkLinear) {
			a2 *= KinkTensionFactor
		}
	case AmplitudePeak:
		if !(s.PeakDnu > 0) || math.IsInf(s.PeakDnu, 0) {
			return 0, fmt.Errorf("inject: peak fractional frequency %g must be positive and finite", s.PeakDnu)
		}
		g, err := c.reportGamma(p.Power())
		if err != nil {
			return 0, err
		}
		if g == 0 {
			return 0, fmt.Errorf("inject: reporting clock %q is insensitive, cannot set a peak amplitude", c.reportFamily())
		}
		an := s.PeakDnu / (math.Abs(g) * math.Abs(p.Peak())) // Aⁿ
		a2 = an
		if p.Power() == 1 {
			a2 = an * an
		}
	case AmplitudeStep:
		if p == ProfileKinkLinear {
			return 0, fmt.Errorf("inject: a bias step is undefined for the linear kink (its phase ramps); give peak or density")
		}
		if !(s.Step > 0) || math.IsInf(s.Step, 0) {
			return 0, fmt.Errorf("inject: bias step %g s must be positive and finite", s.Step)
		}
		g, err := c.reportGamma(p.Power())
		if err != nil {
			return 0, err
		}
		if g == 0 {
			return 0, fmt.Errorf("inject: reporting clock %q is insensitive, cannot set a step amplitude", c.reportFamily())
		}
		a2 = s.Step * v / (math.Abs(g) * math.Abs(p.Area()) * d) // physics.md §3.3
	case AmplitudeDirect:
		a2 = s.A2
	default:
		return 0, fmt.Errorf("inject: invalid amplitude mode %d", int(s.Mode))
	}
	if !(a2 >= 0) || math.IsInf(a2, 0) {
		return 0, fmt.Errorf("inject: amplitude A² %g GeV² must be non-negative and finite", a2)
	}
	return a2, nil
}

// StepFromDensity returns the bias step ΔT in s of a clock with coupling
// Γ (GeV⁻²) crossed at normal speed v by a pulse-profile wall whose amplitude
// follows A2FromDensity (physics.md §3.3):
//
//	ΔT = C_p · Γ · ħc · ρ_DM · T · d² · (v̄/v)
func StepFromDensity(p Profile, gamma, rho, vbar, T, d, v float64) float64 {
	return p.Area() * gamma * A2FromDensity(rho, vbar, T, d) * d / v
}

// LambdaEffForStep returns the Λ_eff in GeV at which a pulse-profile wall
// with density-fixed amplitude gives a bias step of magnitude step (s) at
// normal speed v (physics.md §7 item 5):
//
//	Λ_eff = √(|C_p|·ħc·ρ_DM·T·d²·(v̄/v) / ΔT)
func LambdaEffForStep(p Profile, step, rho, vbar, T, d, v float64) float64 {
	return math.Sqrt(math.Abs(p.Area()) * A2FromDensity(rho, vbar, T, d) * d / v / step)
}

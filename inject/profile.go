package inject

import (
	"fmt"
	"math"
	"strings"
)

// Profile is the shape of the clock perturbation across a wall. Its functions
// take the dimensionless time-like coordinate u = (t − t_cross)/τ with
// τ = d/v_rel, which equals −x/d for a clock at signed distance x ahead of the
// centre plane (x > 0 before the crossing).
//
// The zero value is invalid, so an unset profile is caught by Validate.
type Profile int

const (
	// ProfileGaussian: φ² = A²·exp(−x²/d²) (physics.md §1.1; [DP14, R17]); s(u) = exp(−u²).
	ProfileGaussian Profile = iota + 1
	// ProfileKink: tanh kink φ = A·tanh(x/d) with a quadratic coupling; after
	// absorbing the outside value A² the clock sees a negative pulse
	// s(u) = −sech²(u) (physics.md §1.1).
	ProfileKink
	// ProfileTopHat: φ² = A² for |x| < d/2, zero outside (full width d); s(u) = 1 for |u| < 1/2.
	ProfileTopHat
	// ProfileKinkLinear: tanh kink with a linear coupling, δν/ν = Γ·φ with the
	// value ahead of the wall absorbed: s(u) = 1 + tanh(u), from 0 to 2
	// (physics.md §1.1 and §3.6, [OPU11]). The perturbation is in units of A, not A².
	ProfileKinkLinear
)

// String returns the canonical profile name ("gaussian", "kink", "tophat",
// "kink-linear"), or "Profile(n)" for an invalid value.
func (p Profile) String() string {
	switch p {
	case ProfileGaussian:
		return "gaussian"
	case ProfileKink:
		return "kink"
	case ProfileTopHat:
		return "tophat"
	case ProfileKinkLinear:
		return "kink-linear"
	}
	return fmt.Sprintf("Profile(%d)", int(p))
}

func (p Profile) valid() bool { return p >= ProfileGaussian && p <= ProfileKinkLinear }

// ParseProfile maps a name to a Profile. Accepted (case-insensitive):
// "gaussian"/"gauss"; "kink"/"tanh"/"sech2"; "tophat"/"top-hat"/"box";
// "kink-linear"/"linear-kink"/"tanh-linear".
func ParseProfile(name string) (Profile, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "gaussian", "gauss":
		return ProfileGaussian, nil
	case "kink", "tanh", "sech2":
		return ProfileKink, nil
	case "tophat", "top-hat", "box":
		return ProfileTopHat, nil
	case "kink-linear", "linear-kink", "tanh-linear":
		return ProfileKinkLinear, nil
	}
	return 0, fmt.Errorf("inject: unknown wall profile %q (want gaussian, kink, tophat or kink-linear)", name)
}

// Power is the power n of the amplitude A in the signal δν/ν = Γ·Aⁿ·s(u):
// 2 for the quadratic couplings, 1 for ProfileKinkLinear.
func (p Profile) Power() int {
	if p == ProfileKinkLinear {
		return 1
	}
	return 2
}

// Shape returns s(u), the perturbation in units of Γ·Aⁿ (dimensionless).
func (p Profile) Shape(u float64) float64 {
	switch p {
	case ProfileGaussian:
		return math.Exp(-u * u)
	case ProfileKink:
		c := math.Cosh(u)
		return -1 / (c * c)
	case ProfileTopHat:
		if math.Abs(u) < 0.5 {
			return 1
		}
		if math.Abs(u) == 0.5 {
			return 0.5 // mid-value at the discontinuity
		}
		return 0
	case ProfileKinkLinear:
		return 1 + math.Tanh(u)
	}
	return math.NaN()
}

// Cumulative returns S(u) = ∫_{−∞}^{u} s(u′) du′ in closed form:
// Gaussian (√π/2)·erfc(−u); kink −(1 + tanh u); top-hat clamp(u + ½, 0, 1);
// linear kink ln(1 + e^{2u}).
func (p Profile) Cumulative(u float64) float64 {
	switch p {
	case ProfileGaussian:
		return sqrtPiHalf * math.Erfc(-u)
	case ProfileKink:
		return -onePlusTanh(u)
	case ProfileTopHat:
		return math.Min(math.Max(u+0.5, 0), 1)
	case ProfileKinkLinear:
		return softplus2(u)
	}
	return math.NaN()
}

// Between returns ∫_{ua}^{ub} s(u) du, computed so that it stays accurate
// when both ends lie far in one tail (no cancellation of two nearly equal
// cumulative values).
func (p Profile) Between(ua, ub float64) float64 {
	if h := ub - ua; p != ProfileTopHat && math.Abs(h) < 1e-2 {
		// Short interval: the difference of two cumulative values would lose
		// digits; 4-point Gauss–Legendre is exact to rounding here
		// (error ~ h⁹·max|s⁽⁸⁾|, below 1e-17 relative).
		m, r := 0.5*(ua+ub), 0.5*h
		return r * (0.6521451548625461*(p.Shape(m-0.3399810435848563*r)+p.Shape(m+0.3399810435848563*r)) +
			0.3478548451374538*(p.Shape(m-0.8611363115940526*r)+p.Shape(m+0.8611363115940526*r)))
	}
	switch p {
	case ProfileGaussian:
		switch {
		case ua >= 0 && ub >= 0:
			return sqrtPiHalf * (math.Erfc(ua) - math.Erfc(ub))
		case ua <= 0 && ub <= 0:
			return sqrtPiHalf * (math.Erfc(-ub) - math.Erfc(-ua))
		}
		return sqrtPiHalf * (math.Erf(ub) - math.Erf(ua))
	case ProfileKink:
		switch {
		case ua >= 0 && ub >= 0:
			// tanh b − tanh a = (1 − tanh a) − (1 − tanh b)
			return -(oneMinusTanh(ua) - oneMinusTanh(ub))
		case ua <= 0 && ub <= 0:
			return -(onePlusTanh(ub) - onePlusTanh(ua))
		}
		return -(math.Tanh(ub) - math.Tanh(ua))
	case ProfileTopHat:
		return p.Cumulative(ub) - p.Cumulative(ua)
	case ProfileKinkLinear:
		if ua >= 0 && ub >= 0 {
			// ln(1+e^{2b}) − ln(1+e^{2a}) = 2(b − a) + log1p(e^{−2b}) − log1p(e^{−2a})
			return 2*(ub-ua) + math.Log1p(math.Exp(-2*ub)) - math.Log1p(math.Exp(-2*ua))
		}
		return softplus2(ub) - softplus2(ua)
	}
	return math.NaN()
}

// Area returns the signed pulse area C_p = ∫ s(u) du (physics.md §1.1):
// √π (Gaussian), −2 (kink dip), 1 (top-hat). The linear kink has no finite
// area (its phase ramps), so Area returns NaN for it.
func (p Profile) Area() float64 {
	switch p {
	case ProfileGaussian:
		return math.Sqrt(math.Pi)
	case ProfileKink:
		return -2
	case ProfileTopHat:
		return 1
	}
	return math.NaN()
}

// Peak returns the signed extreme value of s(u): 1 (Gaussian, top-hat),
// −1 (kink dip) and 2 (linear kink: the frequency step between the domains).
func (p Profile) Peak() float64 {
	switch p {
	case ProfileGaussian, ProfileTopHat:
		return 1
	case ProfileKink:
		return -1
	case ProfileKinkLinear:
		return 2
	}
	return math.NaN()
}

// tail returns U such that for u < −U the phase is exactly 0 and for u > U it
// equals the full step to double precision (for the pulse profiles).
func (p Profile) tail() float64 {
	switch p {
	case ProfileGaussian:
		return 27 // erfc(27) < 1e-318
	case ProfileKink:
		return 40 // 2e^{−80} < 1e-34
	case ProfileTopHat:
		return 0.5
	}
	return math.Inf(1)
}

const sqrtPiHalf = 0.88622692545275801364908374167057 // √π/2

// onePlusTanh returns 1 + tanh(u) = 2/(1 + e^{−2u}) without cancellation for u ≪ 0.
func onePlusTanh(u float64) float64 {
	if u >= 0 {
		return 1 + math.Tanh(u)
	}
	e := math.Exp(2 * u)
	return 2 * e / (1 + e)
}

// oneMinusTanh returns 1 − tanh(u) without cancellation for u ≫ 0.
func oneMinusTanh(u float64) float64 { return onePlusTanh(-u) }

// softplus2 returns ln(1 + e^{2u}) without overflow.
func softplus2(u float64) float64 {
	if u > 0 {
		return 2*u + math.Log1p(math.Exp(-2*u))
	}
	return math.Log1p(math.Exp(2 * u))
}

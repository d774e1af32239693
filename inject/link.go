package inject

// Signal-propagation delay through a wall (physics.md §6).
//
// Inside a wall the fine-structure constant changes by δα/α = Γ_α·Aⁿ·s(u)
// (u = −x/d, x the signed distance ahead of the centre plane, s the
// profile shape of profile.go). A named parametrization turns that into a
// refractive index, n − 1 = k·δα/α:
//
//   - "permittivity": only ε is rescaled (μ fixed), δα/α = −δε/ε, so
//     n − 1 ≈ −½·δα/α (k = −½);
//   - "lorentz": the Lorentz-invariant rescaling of −¼F² changes ε and μ
//     oppositely, εμ is unchanged and n = 1 (k = 0);
//   - "user": k given by the user.
//
// Along a straight line of sight from the emission event (r_e, t_e) to the
// reception event (r_r, t_r), the signal's distance ahead of the moving
// centre plane is linear in the path parameter, so the excess delay
// (1/c)∫(n−1)dl has the closed form of physics.md §6 for every profile,
// whatever part of the wall the link covers (emitter inside, receiver
// inside, wall in between, or both ends on one side).

import (
	"fmt"
	"math"
	"strings"
)

// Refractive-index parametrization names (recorded in the manifest).
const (
	IndexPermittivity = "permittivity" // n − 1 = −½·δα/α (ε rescaled, μ fixed)
	IndexLorentz      = "lorentz"      // n = 1 (Lorentz-invariant coupling)
	IndexUser         = "user"         // n − 1 = k·δα/α with a user coefficient k
)

// IndexModel is a refractive-index parametrization: n − 1 = Coefficient·δα/α.
type IndexModel struct {
	Name        string  `json:"name"`        // IndexPermittivity, IndexLorentz or IndexUser
	Coefficient float64 `json:"coefficient"` // k, dimensionless
}

// NewIndexModel returns the named parametrization. user is the coefficient
// k of IndexUser (dimensionless) and must be 0 for the other two.
// Accepted names (case-insensitive): "permittivity" ("permittivity-only",
// "epsilon"), "lorentz" ("lorentz-invariant"), "user".
func NewIndexModel(name string, user float64) (IndexModel, error) {
	var m IndexModel
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "permittivity", "permittivity-only", "epsilon":
		m = IndexModel{Name: IndexPermittivity, Coefficient: -0.5} // physics.md §6: n − 1 ≈ −½·δα/α
	case "lorentz", "lorentz-invariant":
		m = IndexModel{Name: IndexLorentz, Coefficient: 0} // physics.md §6: εμ unchanged, n = 1
	case "user":
		if math.IsNaN(user) || math.IsInf(user, 0) {
			return IndexModel{}, fmt.Errorf("inject: user refractive-index coefficient %g must be finite", user)
		}
		return IndexModel{Name: IndexUser, Coefficient: user}, nil
	default:
		return IndexModel{}, fmt.Errorf("inject: unknown refractive-index parametrization %q (want permittivity, lorentz or user)", name)
	}
	if user != 0 {
		return IndexModel{}, fmt.Errorf("inject: refractive-index parametrization %q takes no user coefficient (got %g)", m.Name, user)
	}
	return m, nil
}

// AlphaScale returns Γ_α·Aⁿ, the dimensionless factor in
// δα/α = Γ_α·Aⁿ·s(u). With a per-constant coupling Γ_α = ±Λ_α^(−n)
// (0 when α is uncoupled). With an effective coupling the wall is treated as
// coupled to α alone with Λ_α = Λ_eff (the only reading of Λ_eff that fixes
// δα/α without sensitivity coefficients).
func AlphaScale(w *Wall) (float64, error) {
	if err := w.Validate(); err != nil {
		return 0, err
	}
	n := w.Profile.Power()
	an := w.A2
	if n == 1 {
		an = math.Sqrt(w.A2)
	}
	var lambda float64
	var neg bool
	switch w.Coupling.Mode {
	case CouplingEff:
		lambda, neg = w.Coupling.LambdaEff, w.Coupling.Negative
	case CouplingPerConstant:
		lambda, neg = w.Coupling.Alpha.Lambda, w.Coupling.Alpha.Negative
		if lambda == 0 {
			return 0, nil
		}
	default:
		return 0, fmt.Errorf("inject: wall %d: invalid coupling mode %d", w.ID, int(w.Coupling.Mode))
	}
	g := math.Pow(lambda, -float64(n)) * an
	if neg {
		g = -g
	}
	return g, nil
}

// IndexWall is a wall seen as a moving refractive medium:
// n(x) − 1 = Eta·s(−x/d), with s the profile shape.
type IndexWall struct {
	Wall  Wall
	Model IndexModel
	Eta   float64 // k·Γ_α·Aⁿ, dimensionless
}

// NewIndexWall returns the refractive medium of wall w under model m.
func NewIndexWall(w Wall, m IndexModel) (IndexWall, error) {
	g, err := AlphaScale(&w)
	if err != nil {
		return IndexWall{}, err
	}
	if math.IsNaN(m.Coefficient) || math.IsInf(m.Coefficient, 0) {
		return IndexWall{}, fmt.Errorf("inject: refractive-index coefficient %g must be finite", m.Coefficient)
	}
	return IndexWall{Wall: w, Model: m, Eta: m.Coefficient * g}, nil
}

// PeakIndex returns the signed extreme of n − 1 across the wall
// (dimensionless): Eta·s_peak (the peak_index column of events.csv).
func (iw *IndexWall) PeakIndex() float64 { return iw.Eta * iw.Wall.Profile.Peak() }

// IndexAt returns n − 1 at celestial position r (m) and time t (s since the
// run start).
func (iw *IndexWall) IndexAt(r [3]float64, t float64) float64 {
	return iw.Eta * iw.Wall.Profile.Shape(-iw.ahead(r, t)/iw.Wall.Thickness)
}

// ahead returns x = N·r − v·(t − T0), the signed distance ahead of the centre plane, m.
func (iw *IndexWall) ahead(r [3]float64, t float64) float64 {
	w := &iw.Wall
	return w.N[0]*r[0] + w.N[1]*r[1] + w.N[2]*r[2] - w.Speed*(t-w.T0)
}

// LinkDelay is the effect of one wall on one link.
type LinkDelay struct {
	// Delay is the excess delay (1/c)∫(n−1)dl along the straight line of
	// sight, s (phase and group delay alike: the medium is non-dispersive).
	Delay float64
	// Bending is the second-order change of the delay from ray bending in
	// the planar layered medium, s (≤ 0: the bent ray is faster, Fermat).
	Bending float64
	// DirectionChange is the change of the apparent direction of the
	// emitter at the receiver from bending, rad, in the plane of the line
	// of sight and the wall normal; positive = turned away from the normal.
	DirectionChange float64
	// CosIncidence is the cosine of the angle between the line of sight
	// (emitter → receiver) and the wall normal N (dimensionless, signed).
	// The line is straight, so it is the same at every point, including
	// the delay's peak.
	CosIncidence float64
	// Length is the geometric length of the line of sight, m.
	Length float64
}

// Link returns the wall's effect on the signal emitted at celestial
// position re (m) at time te and received at rr at time tr (s since the
// run start). The path is the straight line between the two events,
// traversed at c (|rr − re| = c·(tr − te) for a light-time solution; the
// delay formula uses the actual events either way).
//
// With u = −x/d along the path (linear from u_e to u_r),
//
//	Delay = (L/c)·Eta·∫₀¹ s(u(λ)) dλ = (L/c)·Eta·[∫_{u_e}^{u_r} s du]/(u_r − u_e),
//
// which for a wall at rest is physics.md §6:
// Eta·d·[S(u_r) − S(u_e)]/(c·|cos θ|). For a moving wall the normal
// distance covered is x_r − x_e = L·cos θ − v·(t_r − t_e), i.e. cos θ is
// replaced by cos θ − v/c (Doppler-like factor, exact for a straight path).
//
// Bending: in the wall's rest frame the medium is planar and static, so
// n·sin θ is conserved (Snell). Expanding Fermat's principle to second order
// in ε = n − 1 for fixed end points (our derivation; see link_test.go for
// the exact ray-trace check) gives the optical-path change
//
//	ΔL_bend = −½·tan²θ′·L′·Var_z(ε),   δθ_r = tan θ′·(⟨ε⟩_z − ε_r),
//
// where θ′ and L′ are the incidence angle and length of the straight path
// in the wall frame, ⟨·⟩_z and Var_z are the mean and variance of ε over the
// normal coordinate between the end points, and ε_r is n − 1 at the
// receiver.
func (iw *IndexWall) Link(re [3]float64, te float64, rr [3]float64, tr float64) LinkDelay {
	w := &iw.Wall
	var dr [3]float64
	for i := range dr {
		dr[i] = rr[i] - re[i]
	}
	L := math.Sqrt(dr[0]*dr[0] + dr[1]*dr[1] + dr[2]*dr[2])
	out := LinkDelay{Length: L}
	if L == 0 {
		return out
	}
	nd := w.N[0]*dr[0] + w.N[1]*dr[1] + w.N[2]*dr[2]
	out.CosIncidence = nd / L
	xe, xr := iw.ahead(re, te), iw.ahead(rr, tr)
	d := w.Thickness
	ue, ur := -xe/d, -xr/d
	m1, m2 := pathMeans(w.Profile, ue, ur)
	out.Delay = L / SpeedOfLight * iw.Eta * m1

	// Wall-frame geometry: normal separation Z′ = x_r − x_e, transverse
	// separation R (unchanged by the Galilean boost along N).
	zp := xr - xe
	r2 := L*L - nd*nd
	if r2 < 0 {
		r2 = 0
	}
	if zp != 0 && iw.Eta != 0 {
		lp := math.Sqrt(zp*zp + r2)
		tan2 := r2 / (zp * zp)
		variance := iw.Eta * iw.Eta * m2
		out.Bending = -0.5 * tan2 * lp * variance / SpeedOfLight
		er := iw.Eta * w.Profile.Shape(ur)
		out.DirectionChange = math.Sqrt(tan2) * (iw.Eta*m1 - er)
	}
	return out
}

// pathMeans returns the mean of s over u ∈ [ua, ub] and the variance of s
// over the same interval (uniform weight), in units of s and s².
func pathMeans(p Profile, ua, ub float64) (mean, variance float64) {
	du := ub - ua
	if p == ProfileTopHat {
		// Overlap fraction of [ua, ub] with [−½, ½]; s² = s.
		lo, hi := math.Min(ua, ub), math.Max(ua, ub)
		if hi == lo {
			mean = p.Shape(lo)
		} else {
			mean = math.Max(0, math.Min(hi, 0.5)-math.Max(lo, -0.5)) / (hi - lo)
		}
		return mean, mean * (1 - mean)
	}
	if math.Abs(du) < smallSpan {
		// Gauss–Legendre on the short interval; two-pass variance.
		// Five-point Gauss–Legendre nodes and weights on [−1, 1]
		// (Abramowitz & Stegun, Table 25.4).
		gl5x := [5]float64{-0.9061798459386640, -0.5384693101056831, 0, 0.5384693101056831, 0.9061798459386640}
		gl5w := [5]float64{0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891}
		mid, half := 0.5*(ua+ub), 0.5*du
		var sv [5]float64
		for i, x := range gl5x {
			sv[i] = p.Shape(mid + half*x)
			mean += 0.5 * gl5w[i] * sv[i]
		}
		for i := range gl5x {
			e := sv[i] - mean
			variance += 0.5 * gl5w[i] * e * e
		}
		return mean, variance
	}
	mean = p.Between(ua, ub) / du
	sq := squareBetween(p, ua, ub) / du
	variance = sq - mean*mean
	if variance < 0 {
		variance = 0 // rounding when s is nearly constant over the path
	}
	return mean, variance
}

// smallSpan is the |u_r − u_e| below which the path means are evaluated by
// quadrature instead of differences of antiderivatives (which lose
// ~1e-16/|Δu| relative).
const smallSpan = 1e-3

// squareBetween returns ∫_{ua}^{ub} s(u)² du in closed form:
// Gaussian √(π/8)·[erf(√2 b) − erf(√2 a)]; kink ∫sech⁴ = tanh − tanh³/3;
// top-hat = ∫s; linear kink ∫(1+tanh)² = 2·ln(1+e^{2u}) − tanh u (+const).
func squareBetween(p Profile, ua, ub float64) float64 {
	switch p {
	case ProfileGaussian:
		a, b := math.Sqrt2*ua, math.Sqrt2*ub
		k := math.Sqrt(math.Pi / 8) // ∫e^{−2u²}du = √(π/8)·erf(√2 u)
		switch {
		case a >= 0 && b >= 0:
			return k * (math.Erfc(a) - math.Erfc(b))
		case a <= 0 && b <= 0:
			return k * (math.Erfc(-b) - math.Erfc(-a))
		}
		return k * (math.Erf(b) - math.Erf(a))
	case ProfileKink:
		f := func(u float64) float64 { t := math.Tanh(u); return t - t*t*t/3 }
		if ua > 0 && ub > 0 || ua < 0 && ub < 0 {
			// Far-tail form: with g = 1 − |tanh u|, tanh − tanh³/3 = ±(2/3 − g² + g³/3)
			// up to sign; use g to avoid cancellation.
			sg := 1.0
			if ua < 0 {
				sg, ua, ub = -1, -ua, -ub
			}
			g := func(u float64) float64 { gg := oneMinusTanh(u); return -gg*gg + gg*gg*gg/3 }
			// d/du[tanh − tanh³/3] = sech⁴; with t = 1 − g: t − t³/3 = 2/3 − g² + g³/3.
			return sg * (g(ub) - g(ua))
		}
		return f(ub) - f(ua)
	case ProfileTopHat:
		return p.Between(ua, ub)
	case ProfileKinkLinear:
		return 2*p.Between(ua, ub) - (math.Tanh(ub) - math.Tanh(ua))
	}
	return math.NaN()
}

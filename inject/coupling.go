package inject

import (
	"fmt"
	"math"
	"strings"
)

// Convention selects how the sensitivity coefficients K_X of a clock are
// defined (physics.md §2.3). The zero value is invalid.
type Convention int

const (
	// ConventionR ("atomic units"): ν = cR_∞·F(α, μ, X_q) with μ = m_e/m_p and
	// X_q = m_q/Λ_QCD; the tabulated values, appropriate for ratios of clocks
	// hit at the same time.
	ConventionR Convention = iota + 1
	// ConventionA ("absolute"): adds the dependence of cR_∞ = α²m_ec²/(2h)
	// itself, K_α += 2 and K_me += 1, appropriate when clocks are hit at
	// different times as in a sweep ([KB19]).
	ConventionA
)

// String returns "R" or "A".
func (c Convention) String() string {
	switch c {
	case ConventionR:
		return "R"
	case ConventionA:
		return "A"
	}
	return fmt.Sprintf("Convention(%d)", int(c))
}

// ParseConvention accepts "R"/"atomic" and "A"/"absolute" (case-insensitive).
func ParseConvention(s string) (Convention, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "r", "atomic":
		return ConventionR, nil
	case "a", "absolute":
		return ConventionA, nil
	}
	return 0, fmt.Errorf("inject: unknown sensitivity convention %q (want R or A)", s)
}

// Atomic species of the clock families.
const (
	SpeciesRb87  = "Rb-87"
	SpeciesCs133 = "Cs-133"
	SpeciesH     = "H"
	SpeciesNone  = "none" // quartz: no atomic reference
)

// Coefficients are a clock's sensitivities δν/ν = Σ_X K_X·δX/X
// (dimensionless).
type Coefficients struct {
	Species    string     // atomic species: "Rb-87", "Cs-133", "H" or "none"
	Convention Convention // convention the values belong to
	KAlpha     float64    // K_α, response to δα/α
	KMe        float64    // K_me, response to δm_e/m_e
	KMp        float64    // K_mp, response to δm_p/m_p (through μ = m_e/m_p)
	KXq        float64    // κ_q, response to δX_q/X_q, X_q = m_q/Λ_QCD (through g_I)
	Source     string     // where the numbers come from
}

// KMq returns the total response to δm_q/m_q: κ_q plus the proton-mass
// dependence through the σ-term, κ_q + K_mp·SigmaTermFraction
// (physics.md §2.3, from memory).
func (c Coefficients) KMq() float64 { return c.KXq + c.KMp*SigmaTermFraction }

// hyperfine holds the convention-R values of one hyperfine transition.
type hyperfine struct {
	kAlpha, kXq float64
	source      string
}

// hyperfineR returns the convention-R values of a hyperfine transition,
// physics.md §2.3 table (from memory there): K_α = 2 + K_rel, K_μ = 1, κ_q as listed.
func hyperfineR(species string) hyperfine {
	switch species {
	case SpeciesH:
		// H hyperfine 1.42 GHz: K_α 2.00 (K_rel 0), κ_q −0.100 [FT06]
		return hyperfine{kAlpha: 2.00, kXq: -0.100, source: "Flambaum & Tedesco, PRC 73, 055501 (2006) [FT06]; physics.md §2.3 (from memory)"}
	case SpeciesRb87:
		// ⁸⁷Rb hyperfine 6.835 GHz: K_α 2.34 (K_rel 0.34), κ_q −0.019 [FT06, Dinh09]
		return hyperfine{kAlpha: 2.34, kXq: -0.019, source: "[FT06]; Dinh et al., PRA 79, 054102 (2009) [Dinh09]; physics.md §2.3 (from memory)"}
	case SpeciesCs133:
		// ¹³³Cs hyperfine 9.193 GHz: K_α 2.83 (K_rel 0.83), κ_q +0.002 [FT06, Dinh09]
		return hyperfine{kAlpha: 2.83, kXq: +0.002, source: "[FT06]; [Dinh09] (κ_q 0.009 before the radius term); physics.md §2.3 (from memory)"}
	}
	return hyperfine{}
}

// familySpecies maps the noise package's clock-family names to atomic
// species; GNSS clock types per physics.md §2.3 (from memory there).
func familySpecies(family string) (string, bool) {
	switch family {
	case "gps-iir-rb", // GPS Block IIR/IIR-M rubidium
		"gps-iif-rb",   // GPS Block IIF rubidium
		"gps-iii-rb",   // GPS III rubidium
		"galileo-rafs", // Galileo rubidium atomic frequency standard
		"beidou3-rb",   // BeiDou-3 rubidium
		"rb":           // ground rubidium
		return SpeciesRb87, true
	case "gps-iif-cs", // GPS Block IIF caesium
		"glonass-cs", // GLONASS caesium
		"cs":         // ground caesium beam
		return SpeciesCs133, true
	case "galileo-phm", // Galileo passive hydrogen maser
		"beidou3-phm", // BeiDou-3 passive hydrogen maser
		"hmaser":      // ground active hydrogen maser
		return SpeciesH, true
	case "quartz": // quartz crystal: no atomic reference
		return SpeciesNone, true
	}
	return "", false
}

// Families returns the known clock-family names, sorted.
func Families() []string {
	return []string{"beidou3-phm", "beidou3-rb", "cs", "galileo-phm", "galileo-rafs", "glonass-cs",
		"gps-iif-cs", "gps-iif-rb", "gps-iii-rb", "gps-iir-rb", "hmaser", "quartz", "rb"}
}

// SpeciesOf returns the atomic species of a clock family.
func SpeciesOf(family string) (string, error) {
	s, ok := familySpecies(family)
	if !ok {
		return "", fmt.Errorf("inject: unknown clock family %q", family)
	}
	return s, nil
}

// Sensitivity returns the sensitivity coefficients of a clock family in the
// given convention. Hyperfine clocks (physics.md §2.3):
//
//	R: K_α = 2 + K_rel, K_me = 1, K_mp = −1, κ_q tabulated
//	A: K_α = 4 + K_rel, K_me = 2, K_mp = −1, κ_q tabulated
//
// Quartz has no atomic reference and no tabulated sensitivity; it is returned
// with all coefficients zero (treated as insensitive) and Species "none".
func Sensitivity(family string, conv Convention) (Coefficients, error) {
	sp, err := SpeciesOf(family)
	if err != nil {
		return Coefficients{}, err
	}
	if conv != ConventionR && conv != ConventionA {
		return Coefficients{}, fmt.Errorf("inject: invalid sensitivity convention %d for family %q", int(conv), family)
	}
	if sp == SpeciesNone {
		return Coefficients{Species: sp, Convention: conv, Source: "quartz: no tabulated sensitivity, treated as insensitive"}, nil
	}
	h := hyperfineR(sp)
	c := Coefficients{Species: sp, Convention: conv, KAlpha: h.kAlpha, KMe: 1, KMp: -1, KXq: h.kXq, Source: h.source}
	if conv == ConventionA {
		// cR_∞ = α²m_ec²/(2h): K_α += 2, K_me += 1 (physics.md §2.3, [KB19])
		c.KAlpha += 2
		c.KMe++
		c.Source += "; convention A: K_α+2, K_me+1 (cR_∞ = α²m_ec²/2h)"
	}
	return c, nil
}

// CouplingMode selects how the coupling strength is given. The zero value is invalid.
type CouplingMode int

const (
	// CouplingEff: one effective scale Λ_eff for every clock, Γ = ±1/Λ_effⁿ
	// (n = 2 quadratic, 1 linear), independent of the clock family (the
	// convention of the GPS limits, physics.md §2.2).
	CouplingEff CouplingMode = iota + 1
	// CouplingPerConstant: scales Λ_α, Λ_me, Λ_mq; each clock gets
	// Γ = Σ_X K_X·(±1/Λ_Xⁿ) with its family's coefficients.
	CouplingPerConstant
)

// String returns "effective" or "per-constant".
func (m CouplingMode) String() string {
	switch m {
	case CouplingEff:
		return "effective"
	case CouplingPerConstant:
		return "per-constant"
	}
	return fmt.Sprintf("CouplingMode(%d)", int(m))
}

// ParseCouplingMode accepts "effective" (or "lambda_eff") and "per-constant".
func ParseCouplingMode(s string) (CouplingMode, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "effective", "lambda_eff", "eff":
		return CouplingEff, nil
	case "per-constant", "per_constant", "constants":
		return CouplingPerConstant, nil
	}
	return 0, fmt.Errorf("inject: unknown coupling mode %q (want effective or per-constant)", s)
}

// ConstantCoupling is the coupling to one constant X: δX/X = ±φⁿ/Λⁿ.
type ConstantCoupling struct {
	Lambda   float64 // Λ_X in GeV; 0 means not coupled
	Negative bool    // sign of Γ_X: false = +, true = −
}

func (k ConstantCoupling) gamma(n int) float64 {
	if k.Lambda == 0 {
		return 0
	}
	g := math.Pow(k.Lambda, -float64(n))
	if k.Negative {
		return -g
	}
	return g
}

// Coupling describes how the wall field couples to the clocks.
type Coupling struct {
	Mode CouplingMode

	// CouplingEff:
	LambdaEff float64 // Λ_eff in GeV (Λ′ for the linear kink)
	Negative  bool    // sign of Γ_eff: false = +, true = −

	// CouplingPerConstant:
	Alpha, Me, Mq ConstantCoupling // couplings to α, m_e and the light-quark mass m_q
	Convention    Convention       // convention of the sensitivity coefficients
	// ReportFamily is the clock family whose Λ_eff and peak δν/ν are reported
	// in the truth catalogue and used to resolve peak- or step-given amplitudes
	// (CouplingPerConstant only; default "rb").
	ReportFamily string
}

// DefaultReportFamily is used when Coupling.ReportFamily is empty.
const DefaultReportFamily = "rb"

func (c Coupling) reportFamily() string {
	if c.ReportFamily == "" {
		return DefaultReportFamily
	}
	return c.ReportFamily
}

// Validate reports an inconsistent coupling.
func (c Coupling) Validate() error {
	switch c.Mode {
	case CouplingEff:
		if !(c.LambdaEff > 0) || math.IsInf(c.LambdaEff, 0) {
			return fmt.Errorf("inject: lambda_eff %g GeV must be positive and finite", c.LambdaEff)
		}
	case CouplingPerConstant:
		n := 0
		for _, k := range []struct {
			name string
			v    ConstantCoupling
		}{{"lambda_alpha", c.Alpha}, {"lambda_me", c.Me}, {"lambda_mq", c.Mq}} {
			if k.v.Lambda == 0 {
				continue
			}
			if !(k.v.Lambda > 0) || math.IsInf(k.v.Lambda, 0) {
				return fmt.Errorf("inject: %s %g GeV must be positive and finite (0 = uncoupled)", k.name, k.v.Lambda)
			}
			n++
		}
		if n == 0 {
			return fmt.Errorf("inject: per-constant coupling with no constant coupled")
		}
		if c.Convention != ConventionR && c.Convention != ConventionA {
			return fmt.Errorf("inject: per-constant coupling needs a sensitivity convention (R or A), got %d", int(c.Convention))
		}
		if _, err := SpeciesOf(c.reportFamily()); err != nil {
			return fmt.Errorf("inject: report family: %w", err)
		}
	default:
		return fmt.Errorf("inject: invalid coupling mode %d", int(c.Mode))
	}
	return nil
}

// Gamma returns the effective coupling Γ of a clock family for a signal of
// power n (2: quadratic, GeV⁻²; 1: linear, GeV⁻¹), so that
// δν/ν = Γ·φⁿ (physics.md §2.2: Γ_eff = Σ_X K_X·Γ_X).
func (c Coupling) Gamma(family string, n int) (float64, error) {
	if err := c.Validate(); err != nil {
		return 0, err
	}
	if n != 1 && n != 2 {
		return 0, fmt.Errorf("inject: coupling power %d must be 1 or 2", n)
	}
	if c.Mode == CouplingEff {
		if _, err := SpeciesOf(family); err != nil {
			return 0, err
		}
		g := math.Pow(c.LambdaEff, -float64(n))
		if c.Negative {
			g = -g
		}
		return g, nil
	}
	k, err := Sensitivity(family, c.Convention)
	if err != nil {
		return 0, err
	}
	return k.KAlpha*c.Alpha.gamma(n) + k.KMe*c.Me.gamma(n) + k.KMq()*c.Mq.gamma(n), nil
}

// LambdaEffFor returns Λ_eff = |Γ|^(−1/n) in GeV for a clock family (+Inf if
// the family is insensitive).
func (c Coupling) LambdaEffFor(family string, n int) (float64, error) {
	g, err := c.Gamma(family, n)
	if err != nil {
		return 0, err
	}
	return math.Pow(math.Abs(g), -1/float64(n)), nil
}

// reportGamma returns Γ of the reporting clock: Γ_eff in CouplingEff mode,
// Γ of ReportFamily otherwise.
func (c Coupling) reportGamma(n int) (float64, error) {
	if c.Mode == CouplingEff {
		return c.Gamma(DefaultReportFamily, n)
	}
	return c.Gamma(c.reportFamily(), n)
}

// LambdaQuadFromDilaton converts a quadratic dilaton coupling d_X⁽²⁾ to
// Λ_X in GeV: 1/Λ_X² = 2π·d_X⁽²⁾/M_Pl² (physics.md §2.1; Damour & Donoghue
// 2010, Hees et al. 2018, from memory). d must be positive.
func LambdaQuadFromDilaton(d float64) float64 { return PlanckMass / math.Sqrt(2*math.Pi*d) }

// LambdaLinFromDilaton converts a linear dilaton coupling d_X to Λ′_X in GeV:
// 1/Λ′_X = d_X·√(4π)/M_Pl (physics.md §2.1, from memory). d must be positive.
func LambdaLinFromDilaton(d float64) float64 { return PlanckMass / (d * math.Sqrt(4*math.Pi)) }

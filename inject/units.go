package inject

// Physical constants and unit conversions used by the amplitude relation.
const (
	// HbarC is ħc in GeV·m (CODATA 2018: 197.3269804 MeV·fm; physics.md §0, from memory).
	HbarC = 1.973269804e-16
	// Hbar is ħ in GeV·s (CODATA 2018; physics.md §0, from memory).
	Hbar = 6.582119569e-25
	// SpeedOfLight is c in m/s (exact, SI definition).
	SpeedOfLight = 299792458.0
	// GeVPerCm3 converts an energy density in GeV/cm³ to GeV/m³ (1 m³ = 1e6 cm³, exact).
	GeVPerCm3 = 1e6
	// PlanckMass is the (non-reduced) Planck mass M_Pl in GeV used by the
	// dilaton convention of physics.md §2.1 (1.22e19 GeV, from memory).
	PlanckMass = 1.22e19
	// JulianYear is 365.25 days in seconds (IAU definition).
	JulianYear = 365.25 * 86400.0
	// SigmaTermFraction is δm_p/m_p per δm_q/m_q from the pion–nucleon σ-term,
	// ≈ 0.05 (physics.md §2.3, from memory).
	SigmaTermFraction = 0.05
)

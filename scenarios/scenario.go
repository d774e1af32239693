package scenarios

import (
	"time"
)

// Scenario is one simulation set-up, as read from a YAML file. Every
// section is a plain struct; a zero field takes the default stated in its
// comment (filled in by Decode). Quantities are held in SI units.
//
// A new section is one struct with a yaml tag here plus, if it needs them,
// a defaults and a validate method (see section).
type Scenario struct {
	// Name identifies the scenario (required; letters, digits, '-', '_').
	Name string `yaml:"name"`
	// Description is free text shown by "wallcross scenario list".
	Description string `yaml:"description,omitempty"`
	// Seed is the run seed of every random draw (default 1). The
	// simulate command's --seed overrides it.
	Seed uint64 `yaml:"seed,omitempty"`

	Time           TimeSection     `yaml:"time"`
	Constellations []Constellation `yaml:"constellations,omitempty"`
	Navigation     *Navigation     `yaml:"navigation,omitempty"`
	Stations       []Station       `yaml:"stations"`
	Reference      Reference       `yaml:"reference,omitempty"`
	Noise          Noise           `yaml:"noise,omitempty"`
	Walls          Walls           `yaml:"walls,omitempty"`
	Nuisances      Nuisances       `yaml:"nuisances,omitempty"`
	Links          *Links          `yaml:"links,omitempty"`
}

// Links switches on the observation level: the walls' delay on every
// satellite→station link, ionosphere-free code and phase observations and
// the network clock estimation that turns them into clock solutions
// (written as estimated.clk and estimated.csv beside the true ones).
// Off unless the section is given.
type Links struct {
	// Delay adds each wall's excess propagation delay to the links
	// (default false).
	Delay bool `yaml:"delay,omitempty"`
	// IndexModel sets n − 1 = k·δα/α inside a wall: permittivity (default,
	// k = −½), lorentz (k = 0, n = 1) or user (k = user_coefficient).
	IndexModel string `yaml:"index_model,omitempty"`
	// UserCoefficient is k for index_model: user.
	UserCoefficient float64 `yaml:"user_coefficient,omitempty"`
	// ElevationMask is the lowest elevation of a link (default 10 deg).
	ElevationMask Angle `yaml:"elevation_mask,omitempty"`
	// RayBending adds the second-order excess path of ray bending in the
	// wall to the delay (default false; it is always reported).
	RayBending bool `yaml:"ray_bending,omitempty"`
	// Estimate simulates the observations and estimates the clocks
	// (default true when the section is given).
	Estimate *bool `yaml:"estimate,omitempty"`
	// CodeNoise and PhaseNoise are the ionosphere-free white noise at
	// zenith (default 0.3 m and 3 mm; 0 m for noise-free observations
	// is written "0 m").
	CodeNoise  Length `yaml:"code_noise,omitempty"`
	PhaseNoise Length `yaml:"phase_noise,omitempty"`
	// Troposphere adds a slant tropospheric delay (Saastamoinen zenith
	// hydrostatic delay, zenith wet delay ZenithWet, default 0.1 m) that the
	// estimation models exactly (default false).
	Troposphere bool   `yaml:"troposphere,omitempty"`
	ZenithWet   Length `yaml:"zenith_wet,omitempty"`
	// SlipProbability per link and epoch of a cycle slip (default 0).
	SlipProbability float64 `yaml:"slip_probability,omitempty"`
	// OutlierProbability per observation of a code outlier (default 0).
	OutlierProbability float64 `yaml:"outlier_probability,omitempty"`
}

// EstimateOn reports whether the clock estimation runs.
func (l *Links) EstimateOn() bool { return l != nil && (l.Estimate == nil || *l.Estimate) }

// TimeSection sets the epochs of the dataset, on GPS time.
type TimeSection struct {
	// Start is the first epoch (required), e.g. 2026-01-01T00:00:00.
	Start Epoch `yaml:"start"`
	// Span is the length of the dataset (default 1 d). The last epoch is
	// Start + Span − Step.
	Span Duration `yaml:"span,omitempty"`
	// Step is the sample interval (default 30 s, the IGS clock sampling).
	Step Duration `yaml:"step,omitempty"`
}

// Constellation is a synthetic Walker constellation, used when no
// broadcast navigation file is given.
type Constellation struct {
	// Kind is "gps-like" or "galileo-like" (required); it sets the
	// defaults below and the satellite id letter (G or E).
	Kind string `yaml:"kind"`
	// Planes is the number of orbital planes (default 6 gps-like, 3 galileo-like).
	Planes int `yaml:"planes,omitempty"`
	// Slots is the number of satellites per plane (default 4 gps-like, 8 galileo-like).
	Slots int `yaml:"slots,omitempty"`
	// Phasing is the Walker phasing factor F (default 1).
	Phasing int `yaml:"phasing,omitempty"`
	// Altitude above the WGS 84 equatorial radius (default 20 182 km
	// gps-like, 23 222 km galileo-like; common practice nominal values).
	Altitude Length `yaml:"altitude,omitempty"`
	// Inclination of the planes (default 55 deg gps-like, 56 deg galileo-like).
	Inclination Angle `yaml:"inclination,omitempty"`
	// Clock is the clock family of every satellite (default gps-iif-rb
	// for gps-like, galileo-phm for galileo-like).
	Clock string `yaml:"clock,omitempty"`
}

// Navigation takes satellites from a broadcast navigation file instead of
// synthetic constellations.
type Navigation struct {
	// File is the RINEX navigation file (2.x, 3.x, 4.00; plain or gzip),
	// relative to the scenario file's directory.
	File string `yaml:"file"`
	// Systems is the set of system letters to keep (default "GE").
	Systems string `yaml:"systems,omitempty"`
	// KeepUnhealthy keeps satellites flagged unhealthy (default false).
	KeepUnhealthy bool `yaml:"keep_unhealthy,omitempty"`
}

// Station is one ground station, given either geodetically (lat, lon,
// height on WGS 84) or by Earth-fixed coordinates (x, y, z).
type Station struct {
	ID     string `yaml:"id"`
	Lat    Angle  `yaml:"lat,omitempty"`
	Lon    Angle  `yaml:"lon,omitempty"`
	Height Length `yaml:"height,omitempty"`
	X      Length `yaml:"x,omitempty"`
	Y      Length `yaml:"y,omitempty"`
	Z      Length `yaml:"z,omitempty"`
	// Clock is the station clock family (default hmaser).
	Clock string `yaml:"clock,omitempty"`
	// Reference marks the reference clock of the clock solutions.
	Reference bool `yaml:"reference,omitempty"`
}

// Reference names the reference of the clock solutions: one clock, or a
// weighted ensemble. Default: the station marked reference: true.
type Reference struct {
	// Clock is the id of the reference clock.
	Clock string `yaml:"clock,omitempty"`
	// Ensemble, when given, replaces Clock by a weighted mean of clocks.
	Ensemble []EnsembleMember `yaml:"ensemble,omitempty"`
	// Changes switch the reference clock at given times after start, as
	// analysis centres do when a reference station fails.
	Changes []ReferenceChange `yaml:"changes,omitempty"`
}

// EnsembleMember is one clock of a reference ensemble.
type EnsembleMember struct {
	Clock  string  `yaml:"clock"`
	Weight float64 `yaml:"weight"`
}

// ReferenceChange switches the reference to Clock from At (after start) on.
type ReferenceChange struct {
	At    Duration `yaml:"at"`
	Clock string   `yaml:"clock"`
}

// Noise sets the clock noise.
type Noise struct {
	// Off turns all clock noise off (default false: noise on).
	Off bool `yaml:"off,omitempty"`
	// Relativity adds the satellites' periodic relativistic (eccentricity)
	// clock term, which clock products normally leave out (default false).
	Relativity bool `yaml:"relativity,omitempty"`
	// Families overrides the noise model of a clock family by its h_α
	// (keys "h2","h1","h0","h-1","h-2", values in Hz^(−α−1)).
	Families map[string]map[string]float64 `yaml:"families,omitempty"`
}

// Walls sets the domain walls: their physics and how they are drawn.
type Walls struct {
	// Profile is gaussian (default), kink (tanh field, sech² pulse with
	// quadratic coupling), tophat or linear-kink.
	Profile string `yaml:"profile,omitempty"`
	// Thickness d of the wall (default 1e4 km).
	Thickness Length `yaml:"thickness,omitempty"`
	// RhoDM is the local dark-matter energy density (default 0.4 GeV/cm^3).
	RhoDM EnergyDensity `yaml:"rho_dm,omitempty"`
	// MeanInterval T is the mean time between encounters that sets the
	// amplitude A² = ħc·ρ_DM·v̄·T·d (default 1 yr).
	MeanInterval Duration `yaml:"mean_interval,omitempty"`
	// TypicalSpeed v̄ in the amplitude relation (default 300 km/s).
	TypicalSpeed Speed `yaml:"typical_speed,omitempty"`
	// LambdaEff is the effective coupling scale Λ_eff (default 1e11 GeV).
	LambdaEff Energy `yaml:"lambda_eff,omitempty"`
	// PeakDnu, when non-zero, sets the peak fractional-frequency
	// perturbation of a unit-sensitivity clock directly, instead of
	// RhoDM, MeanInterval and LambdaEff.
	PeakDnu float64 `yaml:"peak_dnu,omitempty"`
	// Step, when set, sets the bias step of a unit-sensitivity clock
	// directly (e.g. "1 ns").
	Step Duration `yaml:"step,omitempty"`
	// Sign of the perturbation, +1 (default) or −1.
	Sign int `yaml:"sign,omitempty"`
	// Sensitivity is "unit" (default: one effective scale lambda_eff and
	// unit effective sensitivity for every clock) or "family" (couplings
	// per constant, lambda_alpha, lambda_me, lambda_mq, and each clock's
	// sensitivity coefficients from its family; see package inject).
	Sensitivity string `yaml:"sensitivity,omitempty"`
	// LambdaAlpha, LambdaMe, LambdaMq are the coupling scales to the fine
	// structure constant, the electron mass and the light-quark mass
	// (sensitivity: family; an absent one is uncoupled).
	LambdaAlpha Energy `yaml:"lambda_alpha,omitempty"`
	LambdaMe    Energy `yaml:"lambda_me,omitempty"`
	LambdaMq    Energy `yaml:"lambda_mq,omitempty"`
	// Convention of the sensitivity coefficients, "R" (default; atomic
	// units) or "A" (absolute), see package inject.
	Convention string `yaml:"convention,omitempty"`
	// ReportFamily is the clock family whose Λ_eff and peak δν/ν go into
	// events.csv, and that peak_dnu and step refer to (sensitivity: family;
	// default rb).
	ReportFamily string `yaml:"report_family,omitempty"`

	// ClockResponse is whether clocks respond to the walls (default
	// true); false leaves only the link delay (see links).
	ClockResponse *bool `yaml:"clock_response,omitempty"`

	// Population draws walls at random; Events gives them explicitly.
	// Both may be used together.
	Population *Population `yaml:"population,omitempty"`
	Events     []WallEvent `yaml:"events,omitempty"`
}

// RespondsToWalls reports whether the clocks' own wall response is on.
func (w *Walls) RespondsToWalls() bool { return w.ClockResponse == nil || *w.ClockResponse }

// Population draws walls from the standard halo model.
type Population struct {
	// ArrivalInterval is the mean interval of the Poisson arrivals in the
	// dataset (default: the walls' mean_interval).
	ArrivalInterval Duration `yaml:"arrival_interval,omitempty"`
	// V0 is the Maxwellian circular speed (default 220 km/s).
	V0 Speed `yaml:"v0,omitempty"`
	// VEsc is the galactic escape speed (default 544 km/s).
	VEsc Speed `yaml:"v_esc,omitempty"`
	// EarthOrbit adds the Earth's orbital velocity (default false).
	EarthOrbit bool `yaml:"earth_orbit,omitempty"`
	// Normal is "velocity" (default: wall normal along the relative
	// velocity) or "isotropic" (random normal, v⊥ = v·n̂).
	Normal string `yaml:"normal,omitempty"`
}

// WallEvent is one explicit wall.
type WallEvent struct {
	// T0 is when the wall's centre plane passes the geocentre, after start.
	T0 Duration `yaml:"t0"`
	// Direction is the wall's velocity direction in the celestial frame
	// (normalised on use), e.g. [0, 0, 1].
	Direction []float64 `yaml:"direction"`
	// Speed (default the walls' typical_speed).
	Speed Speed `yaml:"speed,omitempty"`
	// Thickness overrides the walls' thickness for this event.
	Thickness Length `yaml:"thickness,omitempty"`
}

// Nuisances are the imperfections of real clock products. Each kind is
// off unless given.
type Nuisances struct {
	// Gaps are random missing stretches in every clock.
	Gaps *Gaps `yaml:"gaps,omitempty"`
	// Outages remove one clock's data over a given interval.
	Outages []Outage `yaml:"outages,omitempty"`
	// PhaseJumps are random bias steps.
	PhaseJumps *Jumps `yaml:"phase_jumps,omitempty"`
	// FrequencyJumps are random steps in fractional frequency.
	FrequencyJumps *Jumps `yaml:"frequency_jumps,omitempty"`
	// Outliers are isolated bad samples.
	Outliers *Outliers `yaml:"outliers,omitempty"`
	// Batches are the daily-batch boundary discontinuities of products
	// processed day by day.
	Batches *Batches `yaml:"batches,omitempty"`
}

// Gaps: each clock gets gaps at Rate (Poisson) with exponentially
// distributed lengths of mean MeanLength.
type Gaps struct {
	Rate       Rate     `yaml:"rate"`
	MeanLength Duration `yaml:"mean_length"`
}

// Outage removes Clock's data from Start (after start) for Length.
type Outage struct {
	Clock  string   `yaml:"clock"`
	Start  Duration `yaml:"start"`
	Length Duration `yaml:"length"`
}

// Jumps occur in every clock at Rate (Poisson); their sizes are normal
// with standard deviation Sigma (seconds for phase jumps; dimensionless
// fractional frequency for frequency jumps).
type Jumps struct {
	Rate  Rate    `yaml:"rate"`
	Sigma float64 `yaml:"sigma"`
}

// Outliers replace a sample with probability Probability by the sample
// plus a normal error of standard deviation Sigma (seconds).
type Outliers struct {
	Probability float64 `yaml:"probability"`
	Sigma       float64 `yaml:"sigma"`
}

// Batches: every Interval (default 1 d) each clock's bias jumps by a
// normal offset of standard deviation Sigma (seconds).
type Batches struct {
	Interval Duration `yaml:"interval,omitempty"`
	Sigma    float64  `yaml:"sigma"`
}

// Seconds returns a Duration of s seconds (for defaults and tests).
func Seconds(s float64) Duration { return Duration{quantity{si: s, set: true}} }

// Metres returns a Length of m metres.
func Metres(m float64) Length { return Length{quantity{si: m, set: true}} }

// MetresPerSecond returns a Speed of v m/s.
func MetresPerSecond(v float64) Speed { return Speed{quantity{si: v, set: true}} }

// Radians returns an Angle of a radians.
func Radians(a float64) Angle { return Angle{quantity{si: a, set: true}} }

// GeVPerCm3 returns an EnergyDensity of r GeV/cm³.
func GeVPerCm3(r float64) EnergyDensity {
	return EnergyDensity{quantity{si: r * GeV * 1e6, set: true}}
}

// GeVEnergy returns an Energy of e GeV.
func GeVEnergy(e float64) Energy { return Energy{quantity{si: e * GeV, set: true}} }

// StartTime returns the first epoch's calendar fields (GPS time).
func (s *Scenario) StartTime() time.Time { return s.Time.Start.Time }

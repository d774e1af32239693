package search

import (
	"fmt"
	"math"
	"runtime"

	"wallcross/inject"
)

// Config holds the search settings. The zero value means "all defaults";
// each field's doc gives its default.
type Config struct {
	// Directions is the number of wall directions in the bank. 0 (default)
	// derives it from the timing resolution, 4π/Δθ² with
	// Δθ = v_min·τ0/(2R) (R = network radius), capped at MaxDirections.
	Directions int
	// MaxDirections caps the derived direction count (default 2000).
	MaxDirections int
	// Speeds are the wall normal speeds of the bank, m/s (default
	// DefaultSpeeds: 8 geometric steps from 150 to 700 km/s).
	Speeds []float64
	// Thicknesses are the wall thicknesses of the bank, m; 0 is the thin
	// wall (a one-interval spike, d ≪ v·τ0). Default {0}: each thick class
	// costs about 4·d/(v·τ0) + 3 thin classes (its kernel length).
	Thicknesses []float64
	// Profile is the wall profile of the thick templates (default Gaussian).
	// The linear kink, which has no finite step, is not supported.
	Profile inject.Profile
	// Couplings are the coupling classes, each with its own fitted
	// amplitude: CouplingEff (K = 1, default) or keys of the clocks'
	// sensitivity coefficients.
	Couplings []string
	// T0Substeps is the number of t0 grid points per sample interval (default 2).
	T0Substeps int
	// T0Window, if its end is above its start, limits the searched t0 to
	// [T0Window[0], T0Window[1]), s since the first epoch (default: the
	// whole span). The noise model still uses all the data.
	T0Window [2]float64
	// Threshold is the smallest statistic reported as a candidate (default
	// 6: on the demo day with the default bank, 5 gave ≈ 90 noise clusters
	// per day and 8 none but nuisance outliers).
	Threshold float64
	// ClusterWindow is the half width, s, of the time window around each
	// kept candidate within which other grid points are absorbed
	// (default 2R/v_min, the longest sweep of the bank).
	ClusterWindow float64
	// Whiten is the order p of the shared AR whitening filter; 0 (default)
	// treats the pseudo-frequencies as white. At most 8.
	Whiten int
	// Clip winsorises pseudo-frequencies at Clip robust σ (default 8;
	// negative disables clipping), unless the sample is coherent (see
	// Coincidence). The statistic uses the clipped data; candidate
	// amplitudes are refitted on the unclipped data.
	Clip float64
	// Coincidence is the number of distinct other clocks that must also
	// exceed Clip σ within ±2R/v_min (the longest sweep) for an excursion to
	// be kept unclipped (default 4; negative: clip every excursion). A loud
	// wall exceeds in most clocks; chance coincidences of independent
	// outliers (a few per day in real products) rarely reach 4 clocks.
	Coincidence int
	// SweepVeto is the χ² above which a candidate whose clock-by-clock
	// part is less than half its reference part is dropped as a
	// reference-clock event (default 25; negative disables). See
	// Candidate.SweepChi2.
	SweepVeto float64
	// Workers is the number of goroutines (default GOMAXPROCS, capped at the
	// number of directions). The output does not depend on it.
	Workers int
	// Progress, if not nil, is called after each direction with the number
	// done and the total, from one goroutine at a time.
	Progress func(done, total int)
}

// DefaultSpeeds are the bank's default normal speeds, m/s: geometric steps
// from 150 to 700 km/s (ratio ≈ 1.246), covering the halo-model speeds
// (v₀ ≈ 220–240 km/s, escape ≈ 544 km/s; detection.md §1.1, from memory).
var defaultSpeedsKm = [...]float64{150, 187, 233, 290, 361, 450, 561, 700}

// DefaultSpeeds returns the default speed classes, m/s.
func DefaultSpeeds() []float64 {
	s := make([]float64, len(defaultSpeedsKm))
	for i, v := range defaultSpeedsKm {
		s[i] = v * 1e3
	}
	return s
}

// DefaultThicknesses returns the default thickness classes, m: the thin
// wall only (the regime of the GPS searches, d ≪ v·τ0 ≈ 4,500–21,000 km
// for 30-s data).
func DefaultThicknesses() []float64 { return []float64{0} }

// withDefaults returns a copy of cfg with defaults filled in and checked.
func (cfg Config) withDefaults() (Config, error) {
	c := cfg
	if c.MaxDirections == 0 {
		c.MaxDirections = 2000
	}
	if c.MaxDirections < 1 || c.Directions < 0 {
		return c, fmt.Errorf("search: direction count %d (max %d) must be positive", c.Directions, c.MaxDirections)
	}
	if len(c.Speeds) == 0 {
		c.Speeds = DefaultSpeeds()
	}
	for _, v := range c.Speeds {
		if !(v >= 1e3) || !(v < inject.SpeedOfLight) {
			return c, fmt.Errorf("search: speed %g m/s must be in [1 km/s, c)", v)
		}
	}
	if len(c.Thicknesses) == 0 {
		c.Thicknesses = DefaultThicknesses()
	}
	for _, d := range c.Thicknesses {
		if !(d >= 0) || math.IsInf(d, 0) {
			return c, fmt.Errorf("search: thickness %g m must be non-negative and finite", d)
		}
	}
	if c.Profile == 0 {
		c.Profile = inject.ProfileGaussian
	}
	if a := c.Profile.Area(); math.IsNaN(a) || a == 0 {
		return c, fmt.Errorf("search: profile %v has no finite step; not supported", c.Profile)
	}
	if len(c.Couplings) == 0 {
		c.Couplings = []string{CouplingEff}
	}
	if c.T0Substeps == 0 {
		c.T0Substeps = 2
	}
	if c.T0Substeps < 1 || c.T0Substeps > 16 {
		return c, fmt.Errorf("search: %d t0 substeps per interval, want 1..16", c.T0Substeps)
	}
	if c.Threshold == 0 {
		c.Threshold = 6
	}
	if math.IsNaN(c.Threshold) || c.ClusterWindow < 0 || math.IsNaN(c.ClusterWindow) {
		return c, fmt.Errorf("search: threshold %g, cluster window %g s invalid", c.Threshold, c.ClusterWindow)
	}
	if c.Whiten < 0 || c.Whiten > 8 {
		return c, fmt.Errorf("search: AR whitening order %d, want 0..8", c.Whiten)
	}
	if c.Clip == 0 {
		c.Clip = 8
	}
	if c.Coincidence == 0 {
		c.Coincidence = 4
	}
	if c.Coincidence < 0 {
		c.Coincidence = math.MaxInt32
	}
	if c.Workers <= 0 {
		c.Workers = runtime.GOMAXPROCS(0)
	}
	if c.SweepVeto == 0 {
		c.SweepVeto = 25
	}
	if math.IsNaN(c.SweepVeto) {
		return c, fmt.Errorf("search: sweep veto χ² is NaN")
	}
	return c, nil
}

// FibonacciSphere returns n near-equal-area unit vectors on the golden-angle
// (Fibonacci) lattice: z_i = 1 − (2i + 1)/n, longitude i·π(3 − √5).
func FibonacciSphere(n int) [][3]float64 {
	out := make([][3]float64, n)
	golden := math.Pi * (3 - math.Sqrt(5))
	for i := range out {
		z := 1 - (2*float64(i)+1)/float64(n)
		r := math.Sqrt(math.Max(0, 1-z*z))
		s, c := math.Sincos(golden * float64(i))
		out[i] = [3]float64{r * c, r * s, z}
	}
	return out
}

// DirectionCount returns the bank's direction count for timing resolution:
// 4π/Δθ² with Δθ = vMin·step/(2·radius) rad, at least 12 and at most limit.
func DirectionCount(vMin, step, radius float64, limit int) int {
	dth := vMin * step / (2 * radius)
	n := limit
	if dth > 0 && !math.IsInf(dth, 0) {
		if f := 4 * math.Pi / (dth * dth); f < float64(limit) {
			n = max(int(math.Ceil(f)), 12)
		}
	}
	return max(min(limit, n), 1)
}

// kernelTable holds, for one (speed, thickness), the frequency template of a
// unit bias step for every quantised crossing phase within an interval:
// vals[phase][i] is the value at interval offset lo + i from the interval
// containing the crossing, 1/s, already passed through the AR filter.
type kernelTable struct {
	lo    int
	n     int       // entries per phase
	vals  []float64 // [phases × n]
	phase int       // number of phase bins
}

// thin reports whether the kernel is the bare thin-wall spike: one
// interval at the crossing (value 1/τ0, no AR filter).
func (k *kernelTable) thin() bool { return k.n == 1 && k.lo == 0 }

// phaseBins is the number of crossing-phase bins of a thick-wall kernel.
const phaseBins = 32

// tailU is the profile coordinate |u| beyond which the kernel is dropped:
// the mass outside is ≈ 0.5 % of the step (Gaussian: erfc(2) = 0.47 %;
// kink: 1 − tanh(3) = 0.49 %), which costs < 0.5 % of the SNR and shortens
// the kernel by a third against a 1e-4 cut.
func tailU(p inject.Profile) float64 {
	switch p {
	case inject.ProfileGaussian:
		return 2
	case inject.ProfileKink:
		return 3
	}
	return 0.5
}

// newKernel builds the kernel of a wall of thickness d at speed v for
// sample interval step and AR filter a.
func newKernel(p inject.Profile, d, v, step float64, a []float64) kernelTable {
	tau := d / v
	var raw [][]float64
	lo := 0
	if tau <= 0 || tau < 1e-6*step {
		raw = [][]float64{{1 / step}}
	} else {
		m := int(math.Ceil(tailU(p)*tau/step)) + 1
		lo = -m
		area := p.Area()
		raw = make([][]float64, phaseBins)
		for b := range raw {
			phi := (float64(b) + 0.5) / phaseBins // crossing at (i0 + phi)·step
			row := make([]float64, 2*m+1)
			for o := -m; o <= m; o++ {
				ua := (float64(o) - phi) * step / tau
				ub := (float64(o) + 1 - phi) * step / tau
				row[o+m] = p.Between(ua, ub) / area / step
			}
			raw[b] = row
		}
	}
	np := len(a) - 1
	n := len(raw[0]) + np
	k := kernelTable{lo: lo, n: n, phase: len(raw), vals: make([]float64, len(raw)*n)}
	for b, row := range raw {
		out := k.vals[b*n : (b+1)*n]
		for i, x := range row {
			for l, c := range a {
				out[i+l] += c * x
			}
		}
	}
	return k
}

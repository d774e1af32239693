package noise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
)

// Term indexes the five power-law terms of S_y(f) = Σ h_α f^α.
// Term i has exponent α = 2 − i.
type Term int

// The five power-law noise types (IEEE Std 1139; NIST SP 1065 §6).
const (
	WhitePM      Term = iota // α = +2, h in Hz^(−3)
	FlickerPM                // α = +1, h in Hz^(−2)
	WhiteFM                  // α =  0, h in Hz^(−1)
	FlickerFM                // α = −1, h dimensionless
	RandomWalkFM             // α = −2, h in Hz
)

// Alpha returns the spectral exponent α of S_y(f) ∝ f^α for the term.
func (t Term) Alpha() int { return 2 - int(t) }

// String returns the usual abbreviation (WPM, FPM, WFM, FFM, RWFM).
func (t Term) String() string {
	switch t {
	case WhitePM:
		return "WPM"
	case FlickerPM:
		return "FPM"
	case WhiteFM:
		return "WFM"
	case FlickerFM:
		return "FFM"
	case RandomWalkFM:
		return "RWFM"
	}
	return fmt.Sprintf("Term(%d)", int(t))
}

// Periodic is one sinusoidal term of the clock phase:
// x(t) += Amplitude · sin(2π t / Period + Phase).
type Periodic struct {
	Period    float64 // period, s (> 0)
	Amplitude float64 // phase amplitude, s
	Phase     float64 // phase at t = 0, rad
}

// Steering is a first-order steering loop that pulls the clock phase towards
// zero (the reference) with time constant TimeConstant: at each sample the
// loop removes the fraction τ0/TimeConstant of the current phase,
//
//	x_out[k+1] = x_out[k] + (x_free[k+1] − x_free[k]) − (τ0/T)·x_out[k].
//
// It is a high-pass on phase with corner 1/(2πT); frequency wander slower than
// T is suppressed (as for a clock disciplined to a reference).
type Steering struct {
	TimeConstant float64 // loop time constant T, s (> τ0)
}

// ClockModel describes one clock: power-law noise plus deterministic terms.
//
// The phase (time error) generated is, with t = kτ0,
//
//	x(t) = PhaseOffset + FreqOffset·t + Drift·t²/2 + Σ periodic + x_noise(t)
//
// optionally passed through Steering. The relativistic eccentricity term of
// satellite clocks is not part of the model (it needs orbits).
type ClockModel struct {
	// H holds h_α of the one-sided fractional-frequency PSD
	// S_y(f) = Σ h_α f^α, 0 < f ≤ f_h = 1/(2τ0), indexed by Term
	// (H[WhitePM] = h_{+2} in Hz^(−3), … , H[RandomWalkFM] = h_{−2} in Hz).
	// The white-PM and flicker-PM levels depend on the sampling bandwidth
	// f_h = 1/(2τ0) of the series they are generated with.
	H [5]float64

	PhaseOffset float64    // x at t = 0, s
	FreqOffset  float64    // fractional frequency offset y0, dimensionless
	Drift       float64    // linear frequency drift dy/dt, 1/s
	Periodic    []Periodic // periodic phase terms
	Steering    *Steering  // optional steering loop; nil = free running
}

// Validate reports the first invalid field of m.
func (m ClockModel) Validate() error {
	for i, h := range m.H {
		if h < 0 || math.IsNaN(h) || math.IsInf(h, 0) {
			return fmt.Errorf("noise: h_%+d = %g must be finite and non-negative", Term(i).Alpha(), h)
		}
	}
	for i, p := range m.Periodic {
		if !(p.Period > 0) || math.IsInf(p.Period, 0) {
			return fmt.Errorf("noise: periodic term %d: period %g s must be positive and finite", i, p.Period)
		}
		if math.IsNaN(p.Amplitude) || math.IsInf(p.Amplitude, 0) || math.IsNaN(p.Phase) || math.IsInf(p.Phase, 0) {
			return fmt.Errorf("noise: periodic term %d: amplitude %g s, phase %g rad must be finite", i, p.Amplitude, p.Phase)
		}
	}
	for _, v := range []float64{m.PhaseOffset, m.FreqOffset, m.Drift} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("noise: offsets and drift must be finite, got %g", v)
		}
	}
	if m.Steering != nil && !(m.Steering.TimeConstant > 0) {
		return fmt.Errorf("noise: steering time constant %g s must be positive", m.Steering.TimeConstant)
	}
	return nil
}

// Phase returns n samples of the clock phase x in seconds, spaced tau0
// seconds, with x[0] at t = 0. Random draws come only from rng, in a fixed
// order (n standard normals per non-zero term, in Term order, two normals
// from each rng.Uint64() by the ziggurat method plus the rare extra draws
// of its wedge and tail steps, see fillNormal), so the same seed gives the
// same series, with a given binary on every CPU (internal/fft's vector
// kernels repeat the operations of its Go loops exactly).
//
// Method: white PM as white phase; white FM and random-walk FM by exact
// summation of white frequency; flicker PM (on phase) and flicker FM (on
// frequency) by the Kasdin–Walter filter (1 − z⁻¹)^(−1/2), both applied in
// one linear FFT convolution (the running sum that turns flicker frequency
// into phase commutes with the filter) of padded length L = the power of two
// ≥ 2n, packed into one L/2-point complex transform each way (package
// internal/fft; the transforms skip the zero half of the input and the
// unneeded half of the output, and the kernel spectrum of the last length
// used is cached process-wide up to 64 MiB). Noise levels follow K&W 1992
// eq. (39): Q_d = h_α / (2 (2π)^α τ0^(α−1)) for the phase process (see
// noise.Qd).
//
// Peak memory: 8 bytes per sample (the result, plus a fixed 16 KiB chunk of
// normals for the summed terms) when both flicker terms are zero; otherwise
// 8n (result) + 8L (transform buffer) + 8L (kernel spectrum, cached or
// built for the call) bytes, i.e. 40 bytes per sample when n is a power of
// two and 62 for n = 10⁷ (L = 2^25; measured: 607 MB maximum resident set
// for one such series). No other buffer grows with n. The kernel part is
// shared by all series of the same L; allocated per call are 24 bytes per
// sample when n is a power of two ≤ 2^22 and the kernel is cached.
// It panics if n < 0 or tau0 ≤ 0 or m is invalid (programmer errors; call
// Validate first for user input).
func (m ClockModel) Phase(rng *rand.Rand, n int, tau0 float64) []float64 {
	var g flickerConv
	return m.phase(rng, n, tau0, &g)
}

// phase is Phase with caller-provided convolution buffers.
func (m ClockModel) phase(rng *rand.Rand, n int, tau0 float64, g *flickerConv) []float64 {
	if n < 0 || !(tau0 > 0) {
		panic(fmt.Sprintf("noise: Phase: bad n=%d or tau0=%g s", n, tau0))
	}
	if err := m.Validate(); err != nil {
		panic(err)
	}
	x := make([]float64, n)
	if n == 0 {
		return x
	}
	m.addNoise(x, rng, tau0, g)
	m.addDeterministic(x, tau0, 0)
	if m.Steering != nil {
		steer(x, tau0/m.Steering.TimeConstant)
	}
	return x
}

// Qd returns the white-noise variance Q_d of the discrete Kasdin–Walter phase
// process that has the one-sided low-frequency PSD S_y(f) = h f^α when
// sampled at tau0 (K&W 1992 eq. (39); stability.md §3.1):
// Q_d = h / (2 (2π)^α τ0^(α−1)), in s².
func Qd(t Term, h, tau0 float64) float64 {
	a := float64(t.Alpha())
	return h / (2 * math.Pow(2*math.Pi, a) * math.Pow(tau0, a-1))
}

// normalChunk is the number of normals drawn at a time for the summed
// terms (even, so that chunked and whole-series draws are the same).
const normalChunk = 2048

// addNoise adds the five power-law terms to x (zero on entry).
func (m ClockModel) addNoise(x []float64, rng *rand.Rand, tau0 float64, g *flickerConv) {
	n := len(x)
	var buf [normalChunk]float64
	// White PM: x_k = σ w_k with σ² = Q_d(x) = h_2/(8π²τ0).
	if h := m.H[WhitePM]; h > 0 {
		fillNormal(rng, x, math.Sqrt(Qd(WhitePM, h, tau0)))
	}
	flicker := m.H[FlickerPM] > 0 || m.H[FlickerFM] > 0
	var v []float64
	if flicker {
		v = g.input(n)
	}
	// Flicker PM: phase input of the a = 1 filter, σ² = Q_d(x) = h_1/(4π).
	if h := m.H[FlickerPM]; h > 0 {
		fillNormal(rng, v, math.Sqrt(Qd(FlickerPM, h, tau0)))
	}
	// White FM: y_k white with σ_y² = h_0/(2τ0); x_{k+1} = x_k + τ0 y_k.
	if h := m.H[WhiteFM]; h > 0 {
		addRunningSum(rng, x, buf[:], tau0*math.Sqrt(h/(2*tau0)))
	}
	// Flicker FM: y = filter(white, σ² = Q_d(y) = π h_{−1}); x = τ0 Σ_{j<k} y_j.
	// The running sum commutes with the filter, so the summed white input is
	// added to the same convolution input as flicker PM.
	if h := m.H[FlickerFM]; h > 0 {
		addRunningSum(rng, v, buf[:], tau0*math.Sqrt(math.Pi*h))
	}
	// Random-walk FM: y_{k+1} = y_k + w_k, σ_w² = 2π² h_{−2} τ0; x = τ0 Σ y.
	if h := m.H[RandomWalkFM]; h > 0 {
		s := tau0 * math.Sqrt(2*math.Pi*math.Pi*h*tau0)
		y, c := 0.0, 0.0
		for k0 := 0; k0 < n; k0 += normalChunk {
			w := buf[:min(normalChunk, n-k0)]
			fillNormal(rng, w, 1)
			xs := x[k0 : k0+len(w)]
			for i, r := range w {
				xs[i] += c
				c += y
				y += s * r
			}
		}
	}
	if flicker {
		g.apply(x)
	}
}

// addRunningSum adds to dst the running sum Σ_{j<k} s·w_j of unit normal
// deviates w drawn from rng in chunks of buf (dst[0] gets 0).
func addRunningSum(rng *rand.Rand, dst, buf []float64, s float64) {
	n := len(dst)
	c := 0.0
	for k0 := 0; k0 < n; k0 += normalChunk {
		w := buf[:min(normalChunk, n-k0)]
		fillNormal(rng, w, 1)
		ds := dst[k0 : k0+len(w)]
		for i, r := range w {
			ds[i] += c
			c += s * r
		}
	}
}

// addDeterministic adds offsets, drift and periodic terms; k0 is the index of
// x[0] on the sample grid.
func (m ClockModel) addDeterministic(x []float64, tau0 float64, k0 int) {
	for k := range x {
		t := float64(k0+k) * tau0
		x[k] += m.PhaseOffset + m.FreqOffset*t + 0.5*m.Drift*t*t
	}
	for _, p := range m.Periodic {
		if p.Amplitude == 0 {
			continue
		}
		w := 2 * math.Pi * tau0 / p.Period
		// rotate a phasor instead of calling Sin per sample; re-anchor every
		// 1024 samples to bound round-off growth.
		for k0b := 0; k0b < len(x); k0b += 1024 {
			ph := w*float64(k0+k0b) + p.Phase
			s, c := math.Sincos(ph)
			ds, dc := math.Sincos(w)
			end := min(len(x), k0b+1024)
			for k := k0b; k < end; k++ {
				x[k] += p.Amplitude * s
				s, c = s*dc+c*ds, c*dc-s*ds
			}
		}
	}
}

// steer applies the first-order steering loop of Steering with gain g = τ0/T.
func steer(x []float64, g float64) {
	prevFree := x[0]
	out := x[0]
	for k := 1; k < len(x); k++ {
		free := x[k]
		out = out + (free - prevFree) - g*out
		prevFree = free
		x[k] = out
	}
}

// ParseTerm parses a power-law coefficient key: "h2" or "h+2" (white PM),
// "h1"/"h+1", "h0", "h-1", "h-2", or the abbreviations wpm, fpm, wfm, ffm,
// rwfm (case-insensitive).
func ParseTerm(key string) (Term, error) {
	switch strings.ToLower(strings.TrimSpace(key)) {
	case "h2", "h+2", "wpm":
		return WhitePM, nil
	case "h1", "h+1", "fpm":
		return FlickerPM, nil
	case "h0", "wfm":
		return WhiteFM, nil
	case "h-1", "ffm":
		return FlickerFM, nil
	case "h-2", "rwfm":
		return RandomWalkFM, nil
	}
	return 0, fmt.Errorf("noise: unknown power-law term %q (want h+2, h+1, h0, h-1, h-2 or wpm, fpm, wfm, ffm, rwfm)", key)
}

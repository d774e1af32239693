package search

import (
	"math"
	"math/rand/v2"
	"testing"

	"wallcross/inject"
)

// Synthetic test networks: circular-orbit satellites and ground stations on
// a sphere rotating with the Earth, white-frequency clock noise of known σ,
// and optionally one wall rendered by package inject.

const (
	gm        = 3.986004418e14 // m³/s², WGS 84 / IS-GPS-200 value of GM (from memory)
	orbitA    = 26_560e3       // GPS orbit radius, m (physics.md §3.5, from memory there)
	earthR    = 6_371e3        // mean Earth radius, m (from memory)
	earthRate = 7.2921151467e-5
	// earthRate: WGS 84 Earth rotation rate, rad/s (from memory)
)

type synthOpts struct {
	planes, perPlane int     // satellite constellation (55° inclination)
	stations         int     // ground stations; station 0 is the reference clock
	epochs           int     // number of epochs
	step             float64 // s
	sigmaSat         float64 // white-FM pseudo-frequency σ per interval, satellites
	sigmaSta         float64 // stations
	sigmaRef         float64 // reference clock
	ar1              float64 // optional AR(1) coefficient of every clock's frequency noise
	gapFrac          float64 // fraction of epochs set to NaN (random single gaps)
}

func defaultSynth() synthOpts {
	return synthOpts{planes: 6, perPlane: 4, stations: 12, epochs: 360, step: 30,
		sigmaSat: 1e-12, sigmaSta: 6e-13, sigmaRef: 3e-13}
}

type synthNet struct {
	net   *Network
	sigma []float64 // own pseudo-frequency σ per clock (ref included)
	ref   int
}

// position of clock j at t for the synthetic constellation, celestial m.
func (o synthOpts) posFunc() func(j int, t float64) [3]float64 {
	nsat := o.planes * o.perPlane
	inc := 55 * math.Pi / 180
	nrate := math.Sqrt(gm / (orbitA * orbitA * orbitA))
	stations := FibonacciSphere(max(o.stations, 1))
	return func(j int, t float64) [3]float64 {
		if j < nsat {
			p, s := j/o.perPlane, j%o.perPlane
			raan := 2 * math.Pi * float64(p) / float64(o.planes)
			u := 2*math.Pi*float64(s)/float64(o.perPlane) + 0.5*float64(p) + nrate*t
			cu, su := math.Cos(u), math.Sin(u)
			co, so := math.Cos(raan), math.Sin(raan)
			ci, si := math.Cos(inc), math.Sin(inc)
			return [3]float64{orbitA * (co*cu - so*su*ci), orbitA * (so*cu + co*su*ci), orbitA * su * si}
		}
		e := stations[j-nsat]
		a := earthRate * t
		c, s := math.Cos(a), math.Sin(a)
		return [3]float64{earthR * (c*e[0] - s*e[1]), earthR * (s*e[0] + c*e[1]), earthR * e[2]}
	}
}

// newSynth draws the noise phases x_j(t_k) (s) of every clock.
func newSynth(rng *rand.Rand, o synthOpts) (sn *synthNet, phase [][]float64) {
	nsat := o.planes * o.perPlane
	n := nsat + o.stations
	ref := nsat // station 0
	clocks := make([]Clock, n)
	sigma := make([]float64, n)
	phase = make([][]float64, n)
	for j := range clocks {
		if j < nsat {
			clocks[j] = Clock{ID: satID(j), Sensitivity: map[string]float64{"alpha": 1 + 0.1*float64(j%3)}}
			sigma[j] = o.sigmaSat
		} else {
			clocks[j] = Clock{ID: staID(j - nsat), IsStation: true, Sensitivity: map[string]float64{"alpha": 0.5}}
			sigma[j] = o.sigmaSta
		}
		if j == ref {
			sigma[j] = o.sigmaRef
		}
		x := make([]float64, o.epochs)
		var yprev float64
		for k := 1; k < o.epochs; k++ {
			y := sigma[j] * math.Sqrt(1-o.ar1*o.ar1) * rng.NormFloat64()
			if o.ar1 != 0 {
				y += o.ar1 * yprev
			}
			yprev = y
			x[k] = x[k-1] + y*o.step
		}
		phase[j] = x
	}
	net := &Network{Start: 1_400_000_000_000_000_000, Step: o.step, Clocks: clocks, Ref: ref, Pos: o.posFunc()}
	return &synthNet{net: net, sigma: sigma, ref: ref}, phase
}

// finish forms the biases b_j = x_j − x_ref and applies gaps.
func (sn *synthNet) finish(rng *rand.Rand, o synthOpts, phase [][]float64) {
	n := len(phase)
	sn.net.Bias = make([][]float64, n)
	for j := range phase {
		b := make([]float64, o.epochs)
		for k := range b {
			b[k] = phase[j][k] - phase[sn.ref][k]
			if j != sn.ref && o.gapFrac > 0 && rng.Float64() < o.gapFrac {
				b[k] = math.NaN()
			}
		}
		sn.net.Bias[j] = b
	}
}

// testWall is a thin Gaussian wall whose K = 1 clocks receive step (s).
func testWall(t0 float64, n [3]float64, v, d, step float64) *inject.Wall {
	// Step = Γ·A²·τ·√π with Γ = 1/Λ² = 1 and τ ≈ d/v (physics.md §3.3).
	return &inject.Wall{ID: 0, T0: t0, N: n, Speed: v, Thickness: d, Profile: inject.ProfileGaussian,
		A2: step * v / (d * math.Sqrt(math.Pi)), Coupling: inject.Coupling{Mode: inject.CouplingEff, LambdaEff: 1}}
}

// injectWall adds the wall's phase to every clock (K = 1 for all: the "eff"
// class) using inject's crossing solver and closed-form phase.
func (sn *synthNet) injectWall(t testing.TB, o synthOpts, w *inject.Wall, phase [][]float64) []inject.Crossing {
	t.Helper()
	var out []inject.Crossing
	for j := range phase {
		jj := j
		c, err := w.Cross(sn.net.Clocks[j].ID, "rb", func(tt float64) [3]float64 { return sn.net.Pos(jj, tt) })
		if err != nil {
			t.Fatal(err)
		}
		if err := inject.RenderPhaseGrid(phase[j], 0, o.step, c); err != nil {
			t.Fatal(err)
		}
		out = append(out, c)
	}
	return out
}

// optimalSNR is sqrt(sᵀC⁻¹s) of the injected signal with the true noise
// model: s_j(k) = Δy_j(k) − Δy_ref(k) on every interval, C per interval
// = diag(σ_j²) + σ_ref²·11ᵀ (dense, independent of the package's code path).
func (sn *synthNet) optimalSNR(o synthOpts, cs []inject.Crossing) float64 {
	n := len(cs)
	times := make([]float64, o.epochs)
	for k := range times {
		times[k] = float64(k) * o.step
	}
	freq := make([][]float64, n)
	for j := range cs {
		freq[j] = make([]float64, o.epochs-1)
		_ = inject.RenderFrequency(freq[j], times, cs[j])
	}
	var idx []int
	for j := range n {
		if j != sn.ref {
			idx = append(idx, j)
		}
	}
	tot := 0.0
	sig2 := make([]float64, len(idx))
	for i, j := range idx {
		sig2[i] = sn.sigma[j] * sn.sigma[j]
	}
	s := make([]float64, len(idx))
	out := make([]float64, len(idx))
	for k := range o.epochs - 1 {
		for i, j := range idx {
			s[i] = freq[j][k] - freq[sn.ref][k]
		}
		denseInverseApply(out, s, sig2, sn.sigma[sn.ref]*sn.sigma[sn.ref])
		for i := range s {
			tot += s[i] * out[i]
		}
	}
	return math.Sqrt(tot)
}

func satID(j int) string { return string(rune('G')) + string(rune('0'+j/10)) + string(rune('0'+j%10)) }
func staID(j int) string { return "ST" + string(rune('A'+j/26)) + string(rune('A'+j%26)) }

// angle returns the angle between unit vectors, degrees.
func angle(a, b [3]float64) float64 {
	d := a[0]*b[0] + a[1]*b[1] + a[2]*b[2]
	return math.Acos(math.Max(-1, math.Min(1, d))) * 180 / math.Pi
}

func randomUnit(rng *rand.Rand) [3]float64 {
	z := 2*rng.Float64() - 1
	phi := 2 * math.Pi * rng.Float64()
	r := math.Sqrt(1 - z*z)
	return [3]float64{r * math.Cos(phi), r * math.Sin(phi), z}
}

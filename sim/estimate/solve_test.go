package estimate

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"
)

// TestNoiseFreeRecovery: noise-free, wall-free observations give back the
// true clocks relative to the reference to ≤ 1 ps (the acceptance
// criterion), with troposphere and elevation weighting on.
func TestNoiseFreeRecovery(t *testing.T) {
	net := testNetwork(24, 12)
	rng := rand.New(rand.NewPCG(1, 2))
	const epochs, interval = 120, 30.0
	truth := testTruth(net, epochs, interval, rng)
	t0 := time.Now()
	obs, err := Simulate(net, truth, ObsConfig{Interval: interval, Epochs: epochs, Troposphere: true}, rng)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%d observations in %v", obs.Len(), time.Since(t0))
	for _, ref := range []string{"STAC", "G05"} {
		sol, err := Solve(obs, SolveConfig{Reference: ref, ElevationWeighting: true})
		if err != nil {
			t.Fatal(err)
		}
		worst, n := 0.0, 0
		for k := range epochs {
			for j, id := range sol.Clocks {
				v := sol.At(k, j)
				if math.IsNaN(v) {
					continue
				}
				n++
				worst = math.Max(worst, math.Abs(v-relTruth(truth, k, id, ref)))
			}
		}
		if worst > 1e-12 {
			t.Errorf("ref %s: worst estimation error %.3g s, want ≤ 1 ps", ref, worst)
		}
		if want := epochs * len(sol.Clocks); n < want*95/100 {
			t.Errorf("ref %s: only %d of %d clock epochs estimated", ref, n, want)
		}
		if sol.PhaseRejected != 0 || sol.CodeRejected != 0 {
			t.Errorf("ref %s: %d phase and %d code rejections on noise-free data", ref, sol.PhaseRejected, sol.CodeRejected)
		}
		t.Logf("ref %s: worst error %.3g s over %d clock epochs, %d segments", ref, worst, n, sol.Segments)
	}
}

// TestReferenceRequired: the rank defect needs a reference; a missing or
// unknown reference is a clear error.
func TestReferenceRequired(t *testing.T) {
	obs := handObs(func(int, int, int) float64 { return 0 })
	for _, c := range []struct{ ref, want string }{
		{"", "no reference clock"},
		{"NOPE", `reference clock "NOPE" is not in the network`},
	} {
		_, err := Solve(obs, SolveConfig{Reference: c.ref})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("reference %q: error %v, want one containing %q", c.ref, err, c.want)
		}
	}
}

// handObs builds the hand-solvable network of TestWallTransferHand: stations
// A (index 0), B (1); satellites S1 (0), S2 (1) seen by both, S3 (2) seen by
// B only, over 6 epochs; delay(k, sat, sta) is the link delay in s. True
// clocks are zero, geometry is an arbitrary known range.
func handObs(delay func(k, sat, sta int) float64) *Observations {
	o := &Observations{Interval: 30, Epochs: 6, Satellites: []string{"S1", "S2", "S3"}, Stations: []string{"A", "B"}}
	links := [][2]int{{0, 0}, {1, 0}, {0, 1}, {1, 1}, {2, 1}}
	for k := range o.Epochs {
		o.Start = append(o.Start, len(o.Sat))
		for _, l := range links {
			rho := 2.2e7 + 1e3*float64(l[0]+3*l[1]) + 50*float64(k)
			d := speedOfLight * delay(k, l[0], l[1])
			o.Sat = append(o.Sat, int16(l[0]))
			o.Sta = append(o.Sta, int16(l[1]))
			o.CodeOC = append(o.CodeOC, d)
			o.PhaseOC = append(o.PhaseOC, d+123.456*float64(1+l[0]+l[1]))
			o.Computed = append(o.Computed, rho)
			o.Elev = append(o.Elev, 0.6)
		}
	}
	o.Start = append(o.Start, len(o.Sat))
	return o
}

// TestWallTransferHand: a link delay δ on the link B–S1 of the loop
// A–S1–B–S2 (reference A, equal weights) goes into the clocks as the
// least-squares solution worked out by hand: minimising
// s1² + s2² + (b − s1 − δ)² + (b − s2)² gives b = δ/2, s1 = −δ/4, s2 = δ/4
// (b station B, s1, s2 satellite clock errors, in units of δ). A delay on
// the link B–S3, S3's only link, goes entirely into S3: s3 = −δ.
func TestWallTransferHand(t *testing.T) {
	for _, unit := range []float64{1e-9, 1e-18} { // s; 1e-18 s is the size of physics.md §6's estimate
		pulse := []float64{0, 0, 2 * unit, 5 * unit, unit, 0}
		for _, c := range []struct {
			name string
			sat  int
			want map[string]float64 // error per unit δ
		}{
			{"loop", 0, map[string]float64{"B": 0.5, "S1": -0.25, "S2": 0.25, "S3": 0.5, "A": 0}},
			{"single-link", 2, map[string]float64{"B": 0, "S1": 0, "S2": 0, "S3": -1, "A": 0}},
		} {
			obs := handObs(func(k, sat, sta int) float64 {
				if sat == c.sat && sta == 1 {
					return pulse[k]
				}
				return 0
			})
			sol, err := Solve(obs, SolveConfig{Reference: "A", Threshold: math.Inf(1)})
			if err != nil {
				t.Fatal(err)
			}
			for k := range obs.Epochs {
				for id, f := range c.want {
					got := sol.At(k, sol.Index(id))
					if want := f * pulse[k]; math.Abs(got-want) > 1e-4*unit {
						t.Errorf("%s: epoch %d clock %s: error %.4g s, want %.4g s", c.name, k, id, got, want)
					}
				}
			}
		}
	}
}

// TestScreening: with white noise and cycle slips, screening keeps the
// estimates at the phase-noise level, while without screening the slips
// leak into the clocks.
func TestScreening(t *testing.T) {
	net := testNetwork(24, 16)
	rng := rand.New(rand.NewPCG(5, 6))
	const epochs, interval = 100, 30.0
	truth := testTruth(net, epochs, interval, rng)
	cfg := ObsConfig{Interval: interval, Epochs: epochs, CodeNoise: 0.5, PhaseNoise: 0.003, SlipProbability: 2e-3,
		OutlierProbability: 2e-3}
	obs, err := Simulate(net, truth, cfg, rng)
	if err != nil {
		t.Fatal(err)
	}
	slips := 0
	for _, s := range obs.Slip {
		if s {
			slips++
		}
	}
	if slips < 10 {
		t.Fatalf("only %d slips simulated", slips)
	}
	rms := func(sol *Solution) float64 {
		s, n := 0.0, 0
		for k := range epochs {
			for j, id := range sol.Clocks {
				if v := sol.At(k, j); !math.IsNaN(v) {
					// compare epoch-to-epoch structure: remove each clock's mean error later
					d := v - relTruth(truth, k, id, "STAA")
					s += d * d
					n++
				}
			}
		}
		return math.Sqrt(s / float64(n))
	}
	good, err := Solve(obs, SolveConfig{Reference: "STAA", CodeSigma: 0.5, PhaseSigma: 0.003})
	if err != nil {
		t.Fatal(err)
	}
	bad, err := Solve(obs, SolveConfig{Reference: "STAA", CodeSigma: 0.5, PhaseSigma: 0.003, Threshold: math.Inf(1)})
	if err != nil {
		t.Fatal(err)
	}
	rg, rb := rms(good), rms(bad)
	t.Logf("%d slips, %d phase rejections, %d code rejections; RMS error %.3g s screened, %.3g s unscreened",
		slips, good.PhaseRejected, good.CodeRejected, rg, rb)
	// Code anchor: 0.5 m over ~100 epochs × ~8 links per clock → ~0.2 ns offsets.
	if rg > 0.5e-9 {
		t.Errorf("screened RMS error %.3g s, want < 0.5 ns", rg)
	}
	if !(rb > 2*rg) {
		t.Errorf("unscreened RMS error %.3g s not clearly worse than screened %.3g s", rb, rg)
	}
	if good.PhaseRejected < slips/2 {
		t.Errorf("%d phase rejections for %d slips", good.PhaseRejected, slips)
	}
	outliers := 0
	for _, o := range obs.Outlier {
		if o {
			outliers++
		}
	}
	if outliers < 5 || good.CodeRejected < outliers*3/4 || good.CodeRejected > outliers+outliers/2+5 {
		t.Errorf("%d code rejections for %d simulated outliers", good.CodeRejected, outliers)
	}
}

// TestRereference: the rank defect is a common shift, so a solution referred
// to one clock turns into the solution referred to another (or to an
// ensemble) by subtracting that clock's (the ensemble's) estimate.
func TestRereference(t *testing.T) {
	net := testNetwork(16, 8)
	rng := rand.New(rand.NewPCG(8, 8))
	const epochs, interval = 40, 30.0
	truth := testTruth(net, epochs, interval, rng)
	obs, err := Simulate(net, truth, ObsConfig{Interval: interval, Epochs: epochs, CodeNoise: 0.3, PhaseNoise: 0.002}, rng)
	if err != nil {
		t.Fatal(err)
	}
	a, err := Solve(obs, SolveConfig{Reference: "STAA", CodeSigma: 0.3, PhaseSigma: 0.002})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Solve(obs, SolveConfig{Reference: "STAD", CodeSigma: 0.3, PhaseSigma: 0.002})
	if err != nil {
		t.Fatal(err)
	}
	ab, err := a.Rereference([]string{"STAD"}, []float64{1})
	if err != nil {
		t.Fatal(err)
	}
	for k := range epochs {
		for j := range a.Clocks {
			if d := math.Abs(ab.At(k, j) - b.At(k, j)); d > 1e-15 {
				t.Fatalf("epoch %d clock %s: re-referenced %g s, solved with STAD %g s", k, a.Clocks[j], ab.At(k, j), b.At(k, j))
			}
		}
	}
	ens, err := a.Rereference([]string{"STAA", "STAB", "G01"}, []float64{0.5, 0.25, 0.25})
	if err != nil {
		t.Fatal(err)
	}
	for k := range epochs {
		e := 0.5*ens.At(k, ens.Index("STAA")) + 0.25*ens.At(k, ens.Index("STAB")) + 0.25*ens.At(k, ens.Index("G01"))
		if math.Abs(e) > 1e-18 {
			t.Fatalf("epoch %d: ensemble of the re-referenced solution is %g s, want 0", k, e)
		}
	}
	if _, err := a.Rereference([]string{"STAA"}, []float64{0.9}); err == nil {
		t.Error("weights not summing to 1 accepted")
	}
}

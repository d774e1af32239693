package search

import (
	"bytes"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"wallcross/sim/score"
)

// TestNoiseOnlyStatistic runs the pipeline on noise-only networks: (1) one
// fixed template's signed SNR over t0 must be ≈ N(0, 1) — mean 0, variance
// 1 — which checks the whitening, the Sherman–Morrison common mode and the
// template norm together; (2) the bank maximum's false-alarm rate at the
// threshold is measured and logged.
func TestNoiseOnlyStatistic(t *testing.T) {
	trials := 3
	dirs, thick := 150, []float64{0, 8e6}
	if raceEnabled {
		trials, dirs, thick = 1, 60, []float64{0}
	}
	var all []float64
	var maxima []float64
	thresholds := []float64{4.5, 5, 5.5, 6}
	clusters := make([]int, len(thresholds))
	span := 0.0
	cfg := Config{Directions: dirs, Speeds: []float64{200e3, 300e3, 450e3}, Thicknesses: thick, Threshold: 4.5}
	for trial := range trials {
		rng := rand.New(rand.NewPCG(300, uint64(trial)))
		o := defaultSynth()
		o.epochs = 960
		o.sigmaRef = 8e-13 // a strong common mode, which a diagonal model would get wrong
		o.gapFrac = 0.01
		sn, phase := newSynth(rng, o)
		sn.finish(rng, o, phase)
		// (1) a fixed template (direction 7, 300 km/s, thin) at every t0.
		one := Config{Directions: 50, Speeds: []float64{300e3}, Thicknesses: []float64{0}}
		s, err := newSearcher(sn.net, one)
		if err != nil {
			t.Fatal(err)
		}
		w := s.newWorker()
		w.visit = func(m, id int, num, den float64) {
			if m%2 == 0 && den > 0 { // every other point: neighbours share samples
				all = append(all, num/math.Sqrt(den))
			}
		}
		s.scanDirection(w, 7)
		// (2) the full bank.
		res, err := Search(sn.net, cfg)
		if err != nil {
			t.Fatal(err)
		}
		mx := 0.0
		for _, x := range res.Stat {
			mx = math.Max(mx, x)
		}
		maxima = append(maxima, mx)
		for i, th := range thresholds {
			clusters[i] += len(Cluster(res.Stat, res.Best, res.T0First, res.T0Step, th, res.Config.ClusterWindow))
		}
		span += float64(len(res.Stat)) * res.T0Step
	}
	var mean, vr float64
	for _, x := range all {
		mean += x
	}
	mean /= float64(len(all))
	for _, x := range all {
		vr += (x - mean) * (x - mean)
	}
	vr /= float64(len(all) - 1)
	// The noise model is estimated from 8 h of data (σ to a few %), so the
	// variance is ≈ 1 + O(5 %) (it tends to 1 with longer data); allow
	// ±0.1 on the mean and ±20 % on the variance.
	t.Logf("fixed template: %d samples, mean %.3f, variance %.3f", len(all), mean, vr)
	if math.Abs(mean) > 0.1 || math.Abs(vr-1) > 0.2 {
		t.Fatalf("fixed-template SNR on noise: mean %.3f, variance %.3f; want ≈ 0, 1", mean, vr)
	}
	t.Logf("bank of %d templates, %.1f h of noise: per-trial maxima %.2f", dirs*3*len(thick), span/3600, maxima)
	for i, th := range thresholds {
		t.Logf("threshold %.1f: %d clusters, false-alarm rate %.1f /d", th, clusters[i], float64(clusters[i])/(span/86400))
	}
	for _, mx := range maxima {
		// The maximum of ~10⁴–10⁵ effective trials of N(0,1) is ≈ 4–5; a
		// broken noise model gives far larger values.
		if mx < 3 || mx > 6.5 {
			t.Fatalf("noise-only bank maximum %.2f outside [3, 6.5]", mx)
		}
	}
}

// TestDeterministicWorkers checks the output is the same for 1 and 3 workers.
func TestDeterministicWorkers(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	o := defaultSynth()
	o.epochs = 200
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	var outs [][]byte
	var stats [][]float64
	for _, nw := range []int{1, 3} {
		res, err := Search(sn.net, Config{Directions: 120, Speeds: []float64{250e3, 400e3}, Threshold: 3.5, Workers: nw})
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		if err := WriteCandidates(&b, res.Candidates); err != nil {
			t.Fatal(err)
		}
		outs = append(outs, b.Bytes())
		stats = append(stats, res.Stat)
	}
	if !bytes.Equal(outs[0], outs[1]) || !reflect.DeepEqual(stats[0], stats[1]) {
		t.Fatalf("1 and 3 workers differ:\n%s\n---\n%s", outs[0], outs[1])
	}
	if bytes.Count(outs[0], []byte("\n")) < 2 {
		t.Fatalf("expected some candidates at threshold 3.5, got:\n%s", outs[0])
	}
}

// TestCandidateFileContract writes candidates atomically and reads them
// back with the scorer's reader (the DESIGN.md §5 contract).
func TestCandidateFileContract(t *testing.T) {
	cands := []Candidate{
		{T0: 3600, Stat: 9.5, Template: Template{N: [3]float64{0, 0.6, 0.8}, Speed: 3e5, Thickness: 0, Coupling: "eff", Amplitude: 1e-10}},
		{T0: 7230.5, Stat: 5.25, Template: Template{N: [3]float64{1, 0, 0}, Speed: 2.33e5, Thickness: 2e7, Coupling: "alpha", Amplitude: -3e-11}},
	}
	path := t.TempDir() + "/cands.csv"
	if err := WriteCandidatesFile(path, cands); err != nil {
		t.Fatal(err)
	}
	got, err := score.ReadCandidatesFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(cands) {
		t.Fatalf("read %d candidates, wrote %d", len(got), len(cands))
	}
	for i, c := range got {
		w := cands[i]
		thick := c.Thick
		if w.Thickness == 0 && math.IsNaN(thick) {
			thick = 0 // thin wall written as an empty cell
		}
		if c.T0 != w.T0 || c.Stat != w.Stat || !c.HasN || c.Speed != w.Speed || thick != w.Thickness {
			t.Fatalf("candidate %d read back as %+v, wrote %+v", i, c, w)
		}
		for a := range 3 {
			if math.Abs(c.N[a]-w.N[a]) > 1e-9 {
				t.Fatalf("candidate %d direction %v, wrote %v", i, c.N, w.N)
			}
		}
	}
	// A failed write leaves no file behind.
	if err := WriteCandidatesFile(t.TempDir()+"/missing-dir/c.csv", cands); err == nil {
		t.Fatal("writing into a missing directory succeeded")
	}
}

// TestARWhitening: with AR(1)-correlated frequency noise (φ = 0.5), a thick
// template's SNR has variance (1+φ)/(1−φ)-like excess without whitening and
// ≈ 1 with the AR(1) whitening filter.
func TestARWhitening(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	o := defaultSynth()
	o.epochs = 1200
	o.ar1 = 0.5
	sn, phase := newSynth(rng, o)
	sn.finish(rng, o, phase)
	variance := func(whiten int) (float64, []float64) {
		s, err := newSearcher(sn.net, Config{Directions: 20, Speeds: []float64{300e3}, Thicknesses: []float64{3e7}, Whiten: whiten})
		if err != nil {
			t.Fatal(err)
		}
		var xs []float64
		w := s.newWorker()
		w.visit = func(m, id int, num, den float64) {
			if m%8 == 0 && den > 0 {
				xs = append(xs, num/math.Sqrt(den))
			}
		}
		for d := range s.dirs {
			s.scanDirection(w, d)
		}
		v := 0.0
		for _, x := range xs {
			v += x * x
		}
		return v / float64(len(xs)), s.prep.noise.AR
	}
	v0, _ := variance(0)
	v1, a := variance(1)
	t.Logf("thick-template SNR variance: %.2f without whitening, %.2f with AR(1) filter %v", v0, v1, a)
	if !(v0 > 1.8) || math.Abs(v1-1) > 0.2 || math.Abs(a[1]+0.5) > 0.05 {
		t.Fatalf("variance %.2f (no whitening, want > 1.8), %.2f (AR(1), want ≈ 1), filter %v (want [1 −0.5])", v0, v1, a)
	}
}

// TestClusterSuppression: two loud peaks whose above-threshold stretches
// touch stay two candidates; points around a peak are absorbed.
func TestClusterSuppression(t *testing.T) {
	stat := make([]float64, 200)
	for m := range stat {
		stat[m] = 6 // above the threshold everywhere: a chaining rule would give one cluster
	}
	stat[50], stat[51], stat[150] = 40, 39, 30
	best := make([]Template, len(stat))
	c := Cluster(stat, best, 100, 15, 5, 300) // window 300 s = 20 points
	var t0s []float64
	for _, x := range c {
		t0s = append(t0s, x.T0)
	}
	// Peaks at m = 50 (t0 850 s) and 150 (2350 s) absorb m 30–70 and
	// 130–170; the flat plateau is then covered greedily from its earliest
	// free point in steps of 21 points: m = 0, 21, 71, 92, 113, 171, 192.
	want := []float64{100, 415, 850, 1165, 1480, 1795, 2350, 2665, 2980}
	if !reflect.DeepEqual(t0s, want) {
		t.Fatalf("candidate t0 %v, want %v", t0s, want)
	}
	if c[2].Stat != 40 || c[6].Stat != 30 {
		t.Fatalf("candidate stats %v", c)
	}
}

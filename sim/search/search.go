package search

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Template is one point of the bank with its fitted amplitude.
type Template struct {
	N         [3]float64 // unit wall velocity direction, celestial frame
	Speed     float64    // normal speed, m/s
	Thickness float64    // m (0: thin wall)
	Coupling  string     // coupling class
	// Amplitude is the least-squares bias step of a clock with K = 1, s
	// (signed; the clock's own step is K·Amplitude).
	Amplitude float64
	SNR       float64 // signed matched-filter SNR uᵀC⁻¹y/sqrt(uᵀC⁻¹u)
}

// Candidate is one reported wall candidate (a cluster's loudest grid point).
type Candidate struct {
	T0   float64 // s since the first epoch: the wall passes the geocentre
	Stat float64 // |SNR|, larger is more significant
	Template
	// Sweep consistency. The template is the sum of its clock-by-clock
	// part (each clock's own crossing) and its reference part (the
	// reference clock's crossing, seen with opposite sign in every
	// series). A wall gives both parts the same amplitude; a step of the
	// reference clock itself (a phase jump) gives every series the same
	// step at one instant and loads the reference part alone. OwnAmp and
	// RefAmp are the two amplitudes fitted jointly, SweepChi2 is
	// (OwnAmp − RefAmp)²/Var(OwnAmp − RefAmp), χ² with one degree of
	// freedom for a wall that matches the template (NaN when either part
	// is empty, e.g. the reference's crossing lies outside the data).
	OwnAmp, RefAmp, SweepChi2 float64
}

// Result is the outcome of a search.
type Result struct {
	T0Step  float64 // spacing of the t0 grid, s
	T0First float64 // t0 of grid point 0, s since the first epoch; point m is T0First + m·T0Step
	// Stat[m] is the largest |SNR| over the bank at grid point m.
	Stat []float64
	// Best[m] is the template that reached it (zero Template if none).
	Best       []Template
	Candidates []Candidate // clustered, in time order
	// Vetoed lists the clustered candidates dropped by the sweep veto
	// (Config.SweepVeto), in time order.
	Vetoed     []Candidate
	Noise      NoiseModel
	Directions [][3]float64
	Config     Config  // the settings used, defaults filled in
	Radius     float64 // network radius: largest clock distance from the geocentre, m
	// Evaluations counts template·clock·t0 evaluations (the benchmark unit).
	Evaluations float64
}

// newSearcher validates the inputs and prepares the scan.
func newSearcher(net *Network, cfg Config) (*searcher, error) {
	if err := net.Validate(); err != nil {
		return nil, err
	}
	c, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	// Positions of every clock at every epoch, and the network radius.
	all := make([][][3]float64, len(net.Clocks))
	radius := 0.0
	for j := range all {
		p := make([][3]float64, net.Epochs())
		for k := range p {
			r := net.Pos(j, float64(k)*net.Step)
			for a := range 3 {
				if math.IsNaN(r[a]) || math.IsInf(r[a], 0) {
					return nil, fmt.Errorf("search: clock %q: position (%g, %g, %g) m at epoch %d is not finite", net.Clocks[j].ID, r[0], r[1], r[2], k)
				}
			}
			p[k] = r
			radius = math.Max(radius, math.Sqrt(r[0]*r[0]+r[1]*r[1]+r[2]*r[2]))
		}
		all[j] = p
	}
	if !(radius > 0) || radius > 1e9 {
		return nil, fmt.Errorf("search: network radius %g m: want positive and below 1e9 m", radius)
	}
	vmin := math.Inf(1)
	for _, v := range c.Speeds {
		vmin = math.Min(vmin, v)
	}
	prep, err := prepare(net, &c, int(math.Ceil(2*radius/(vmin*net.Step))))
	if err != nil {
		return nil, err
	}
	s := &searcher{cfg: c, prep: prep, step: net.Step, nEpoch: net.Epochs(), nInt: prep.nInt,
		nData: len(prep.noise.Data), hasRef: net.Ref >= 0, radius: radius}
	scan := append([]int(nil), prep.noise.Data...)
	if s.hasRef {
		scan = append(scan, net.Ref)
	}
	s.pos = make([][][3]float64, len(scan))
	for c, j := range scan {
		s.pos[c] = all[j]
	}
	s.k = make([][]float64, len(c.Couplings))
	for cl, name := range c.Couplings {
		s.k[cl] = make([]float64, len(scan))
		sensitive := false
		for i, j := range scan {
			s.k[cl][i] = net.sensitivity(j, name)
			if math.IsNaN(s.k[cl][i]) || math.IsInf(s.k[cl][i], 0) {
				return nil, fmt.Errorf("search: clock %q: sensitivity %g for coupling %q is not finite", net.Clocks[j].ID, s.k[cl][i], name)
			}
			sensitive = sensitive || (i < s.nData && s.k[cl][i] != 0)
		}
		if !sensitive {
			return nil, fmt.Errorf("search: no data clock has a sensitivity coefficient for coupling %q", name)
		}
	}
	s.kg = make([][]float64, len(s.k))
	for cl, ks := range s.k {
		s.kg[cl] = make([]float64, len(ks))
		for i, K := range ks {
			s.kg[cl][i] = K / net.Step
		}
	}
	nd := c.Directions
	if nd == 0 {
		nd = DirectionCount(vmin, net.Step, s.radius, c.MaxDirections)
	}
	s.dirs = FibonacciSphere(nd)
	if c.ClusterWindow == 0 {
		c.ClusterWindow = 2 * s.radius / vmin
		s.cfg.ClusterWindow = c.ClusterWindow
	}
	ext := 0
	s.kern = make([][]kernelTable, len(c.Speeds))
	s.thinOnly = make([]bool, len(c.Speeds))
	for vi, v := range c.Speeds {
		s.thinOnly[vi] = true
		s.kern[vi] = make([]kernelTable, len(c.Thicknesses))
		for th, d := range c.Thicknesses {
			kt := newKernel(c.Profile, d, v, net.Step, prep.noise.AR)
			s.kern[vi][th] = kt
			s.thinOnly[vi] = s.thinOnly[vi] && kt.thin()
			s.phased = s.phased || kt.phase > 1
			ext = max(ext, -kt.lo, kt.lo+kt.n)
		}
	}
	s.half = int(math.Ceil(s.radius/(vmin*net.Step))) + 3 + ext
	s.dt0 = net.Step / float64(c.T0Substeps)
	s.nT0 = (s.nEpoch - 1) * c.T0Substeps
	if lo, hi := c.T0Window[0], c.T0Window[1]; hi > lo {
		a := max(0, int(math.Ceil(lo/s.dt0)))
		b := min(s.nT0, int(math.Ceil(hi/s.dt0)))
		if b <= a {
			return nil, fmt.Errorf("search: t0 window [%g, %g) s lies outside the data span [0, %g) s", lo, hi, float64(s.nT0)*s.dt0)
		}
		s.m0, s.nT0 = a, b-a
	}
	s.completeBlocks()
	return s, nil
}

// Search runs the matched-filter bank over a network and returns the
// per-t0 statistic and the clustered candidates above cfg.Threshold.
func Search(net *Network, cfg Config) (*Result, error) {
	s, err := newSearcher(net, cfg)
	if err != nil {
		return nil, err
	}
	w := s.run()
	res := &Result{T0Step: s.dt0, T0First: s.t0(0), Stat: w.best, Best: make([]Template, s.nT0), Noise: s.prep.noise,
		Directions: s.dirs, Config: s.cfg, Radius: s.radius,
		Evaluations: float64(len(s.dirs)) * float64(len(s.cfg.Speeds)*len(s.cfg.Thicknesses)*len(s.cfg.Couplings)) * float64(s.nScan()) * float64(s.nT0)}
	for m, id := range w.bestID {
		if id < 0 {
			res.Stat[m] = 0
			continue
		}
		res.Stat[m] = math.Sqrt(w.best[m]) // ranked by ρ² in the scan
		res.Best[m] = s.template(id, w.bestNum[m], w.bestDen[m])
	}
	res.Candidates = Cluster(res.Stat, res.Best, res.T0First, s.dt0, s.cfg.Threshold, s.cfg.ClusterWindow)
	// Refit each candidate's amplitude on the unclipped data: clipping
	// keeps outliers from dominating the statistic but would bias the
	// amplitude of a loud wall low.
	for i := range res.Candidates {
		c := &res.Candidates[i]
		m := int(math.Round((c.T0 - res.T0First) / s.dt0))
		d, vi, th, cl := s.unpackID(w.bestID[m])
		if num, den := s.evalOne(w, &s.prep.raw, d, vi, th, cl, m); den > 0 {
			c.Amplitude = num / den
		}
		c.OwnAmp, c.RefAmp, c.SweepChi2 = s.sweepFit(w, &s.prep.data, d, vi, th, cl, m)
	}
	kept := res.Candidates[:0:0]
	for _, c := range res.Candidates {
		if s.cfg.SweepVeto > 0 && c.SweepChi2 > s.cfg.SweepVeto && math.Abs(c.OwnAmp) < 0.5*math.Abs(c.RefAmp) {
			res.Vetoed = append(res.Vetoed, c)
			continue
		}
		kept = append(kept, c)
	}
	res.Candidates = kept
	return res, nil
}

// template returns the parameters of template id with its fit.
func (s *searcher) template(id int, num, den float64) Template {
	d, v, th, cl := s.unpackID(id)
	return Template{N: s.dirs[d], Speed: s.cfg.Speeds[v], Thickness: s.cfg.Thicknesses[th],
		Coupling: s.cfg.Couplings[cl], Amplitude: num / den, SNR: num / math.Sqrt(den)}
}

// Cluster reduces the grid points m (t0 = first + m·step) with
// stat[m] ≥ threshold to one candidate per cluster by non-maximum
// suppression: the loudest remaining point is kept and every point within
// ±window (s) of it is absorbed, until none remain (ties: the earlier point
// first). Unlike chaining neighbours, this does not merge two loud walls
// whose above-threshold stretches touch. Candidates are returned in time
// order.
func Cluster(stat []float64, best []Template, first, step, threshold, window float64) []Candidate {
	var idx []int
	for m, x := range stat {
		if x >= threshold {
			idx = append(idx, m)
		}
	}
	order := slices.Clone(idx)
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(stat[b], stat[a]) })
	taken := make(map[int]bool, len(idx))
	var keep []int
	for _, m := range order {
		if taken[m] {
			continue
		}
		keep = append(keep, m)
		// Absorb the neighbours within ±window (idx is sorted by m).
		lo := sort.SearchInts(idx, m-int(math.Floor(window/step)))
		for _, m2 := range idx[lo:] {
			if float64(m2-m)*step > window {
				break
			}
			taken[m2] = true
		}
	}
	slices.Sort(keep)
	out := make([]Candidate, len(keep))
	for i, m := range keep {
		out[i] = Candidate{T0: first + float64(m)*step, Stat: stat[m], Template: best[m]}
	}
	return out
}

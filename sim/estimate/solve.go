package estimate

import (
	"fmt"
	"math"
	"strings"
)

// SolveConfig configures Solve. Zero values mean the stated defaults.
type SolveConfig struct {
	// Reference is the id of the reference clock (a station or satellite);
	// required. Its bias is zero by definition and fixes the rank defect.
	Reference string
	// CodeSigma and PhaseSigma are the a-priori standard deviations of the
	// ionosphere-free code and phase at zenith, m (defaults 1 m and 0.01 m).
	CodeSigma, PhaseSigma float64
	// ElevationWeighting scales the a-priori sigmas by 1/sin(e).
	ElevationWeighting bool
	// Threshold is the rejection threshold for |residual|/σ (default 5;
	// +Inf disables outlier and slip screening).
	Threshold float64
	// MaxRejectPerEpoch bounds the phase rejections per epoch (default 50).
	MaxRejectPerEpoch int
}

// Solution is a network clock estimate.
type Solution struct {
	Interval  float64  // epoch interval, s
	Epochs    int      // number of epochs
	Clocks    []string // satellites, then stations
	Reference string   // reference clock id
	// Bias is the row-major matrix [Epochs × len(Clocks)] of estimated
	// biases relative to the reference clock, s; NaN where a clock could
	// not be estimated (not observed or not connected to the reference).
	Bias []float64
	// PhaseRejected counts rejected epoch-differenced phase observations
	// (outliers and cycle slips); CodeRejected rejected code observations.
	PhaseRejected, CodeRejected int
	// Segments is the number of continuous clock segments (each anchored
	// by its own code offset), the reference excluded.
	Segments int
}

// At returns the bias of clock column j at epoch k, s.
func (s *Solution) At(k, j int) float64 { return s.Bias[k*len(s.Clocks)+j] }

// Index returns the column of clock id, or −1.
func (s *Solution) Index(id string) int {
	for j, c := range s.Clocks {
		if c == id {
			return j
		}
	}
	return -1
}

// Matrix returns the biases reordered into the columns ids (e.g. the
// column order of a dataset's clocks.csv), [Epochs × len(ids)], s. Ids not
// in the solution are an error.
func (s *Solution) Matrix(ids []string) ([]float64, error) {
	cols := make([]int, len(ids))
	for i, id := range ids {
		if cols[i] = s.Index(id); cols[i] < 0 {
			return nil, fmt.Errorf("estimate: clock %q is not in the solution", id)
		}
	}
	out := make([]float64, s.Epochs*len(ids))
	for k := range s.Epochs {
		for i, j := range cols {
			out[k*len(ids)+i] = s.At(k, j)
		}
	}
	return out, nil
}

// diffLink is one epoch-differenced phase observation.
type diffLink struct {
	s, r   int     // clock indices (satellite, station)
	y, w   float64 // observed-minus-computed difference, m; weight 1/m²
	active bool
}

// Solve estimates satellite and station clocks relative to cfg.Reference
// from obs (see the package documentation for the method).
func Solve(obs *Observations, cfg SolveConfig) (*Solution, error) {
	if obs == nil {
		return nil, fmt.Errorf("estimate: no observations")
	}
	ns, nr := len(obs.Satellites), len(obs.Stations)
	nclk := ns + nr
	clocks := append(append([]string(nil), obs.Satellites...), obs.Stations...)
	if strings.TrimSpace(cfg.Reference) == "" {
		return nil, fmt.Errorf("estimate: no reference clock given: the clock solution has a rank defect of one (a common shift of all clocks) that only a reference fixes")
	}
	ref := -1
	for j, id := range clocks {
		if id == cfg.Reference {
			ref = j
		}
	}
	if ref < 0 {
		return nil, fmt.Errorf("estimate: reference clock %q is not in the network (%d satellites, %d stations)", cfg.Reference, ns, nr)
	}
	if err := checkObs(obs); err != nil {
		return nil, err
	}
	sc, sp := cfg.CodeSigma, cfg.PhaseSigma
	if sc == 0 {
		sc = 1
	}
	if sp == 0 {
		sp = 0.01
	}
	if !(sc > 0) || !(sp > 0) || math.IsInf(sc, 0) || math.IsInf(sp, 0) {
		return nil, fmt.Errorf("estimate: a-priori sigmas %g m (code), %g m (phase) must be positive and finite", sc, sp)
	}
	thr := cfg.Threshold
	if thr == 0 {
		thr = 5
	}
	if !(thr > 0) {
		return nil, fmt.Errorf("estimate: rejection threshold %g σ must be positive", thr)
	}
	maxRej := cfg.MaxRejectPerEpoch
	if maxRej == 0 {
		maxRej = 50
	}
	sigma := func(o int, s0 float64) float64 {
		if cfg.ElevationWeighting {
			return s0 / math.Sin(obs.Elev[o])
		}
		return s0
	}
	clockS := func(o int) int { return int(obs.Sat[o]) }
	clockR := func(o int) int { return ns + int(obs.Sta[o]) }

	E := obs.Epochs
	sol := &Solution{Interval: obs.Interval, Epochs: E, Clocks: clocks, Reference: cfg.Reference,
		Bias: make([]float64, E*nclk)}
	cum := make([]float64, E*nclk) // accumulated phase clock, m
	seg := make([]int32, E*nclk)   // segment id, −1 none, −2 reference
	for i := range seg {
		seg[i] = -1
	}
	nseg := 0
	refSeen := false

	// scratch
	prevObs := make([]int32, ns*nr)
	for i := range prevObs {
		prevObs[i] = -1
	}
	inP := make([]bool, nclk)
	inC := make([]bool, nclk)
	adj := newGraph(nclk)
	var dl []diffLink
	col := make([]int, nclk)
	var nmat, rhs []float64

	for k := range E {
		o0, o1 := obs.Start[k], obs.Start[k+1]
		// P_k: clocks connected to the reference by the code links of epoch k.
		adj.reset()
		for o := o0; o < o1; o++ {
			adj.add(clockS(o), clockR(o))
		}
		adj.component(ref, inP)
		if !inP[ref] || o1 == o0 {
			// reference not observed: nothing can be referred to it
			for j := range nclk {
				inP[j] = false
			}
		} else {
			refSeen = true
		}
		// continuing clocks from epoch-differenced phase
		for j := range inC {
			inC[j] = false
		}
		if k > 0 && inP[ref] {
			dl = dl[:0]
			for o := o0; o < o1; o++ {
				p := prevObs[int(obs.Sat[o])*nr+int(obs.Sta[o])]
				if p < 0 {
					continue
				}
				po := int(p)
				s, r := clockS(o), clockR(o)
				if seg[(k-1)*nclk+s] == -1 || seg[(k-1)*nclk+r] == -1 {
					continue
				}
				y := obs.PhaseOC[o] - obs.PhaseOC[po]
				v := sigma(o, sp)*sigma(o, sp) + sigma(po, sp)*sigma(po, sp)
				dl = append(dl, diffLink{s: s, r: r, y: y, w: 1 / v, active: true})
			}
			rejected := 0
			for {
				adj.reset()
				for _, l := range dl {
					if l.active {
						adj.add(l.s, l.r)
					}
				}
				adj.component(ref, inC)
				m := 0
				for j := range nclk {
					col[j] = -1
					if inC[j] && j != ref {
						col[j] = m
						m++
					}
				}
				if m == 0 {
					break
				}
				nmat = resize(nmat, m*m)
				rhs = resize(rhs, m)
				for _, l := range dl {
					if !l.active || !inC[l.s] {
						continue
					}
					cs, cr := col[l.s], col[l.r]
					// model: y = x_r − x_s
					if cr >= 0 {
						nmat[cr*m+cr] += l.w
						rhs[cr] += l.w * l.y
					}
					if cs >= 0 {
						nmat[cs*m+cs] += l.w
						rhs[cs] -= l.w * l.y
					}
					if cr >= 0 && cs >= 0 {
						nmat[cr*m+cs] -= l.w
						nmat[cs*m+cr] -= l.w
					}
				}
				if err := cholSolve(nmat, rhs, m); err != nil {
					return nil, fmt.Errorf("estimate: epoch %d: phase adjustment: %w", k, err)
				}
				x := func(j int) float64 {
					if col[j] < 0 {
						return 0
					}
					return rhs[col[j]]
				}
				worst, wv := -1, 0.0
				for i, l := range dl {
					if !l.active || !inC[l.s] {
						continue
					}
					v := math.Abs(l.y-(x(l.r)-x(l.s))) * math.Sqrt(l.w)
					if v > wv {
						worst, wv = i, v
					}
				}
				if worst >= 0 && wv > thr && rejected < maxRej {
					dl[worst].active = false
					rejected++
					continue
				}
				for j := range nclk {
					if inC[j] {
						cum[k*nclk+j] = cum[(k-1)*nclk+j] + x(j)
						seg[k*nclk+j] = seg[(k-1)*nclk+j]
					}
				}
				break
			}
			sol.PhaseRejected += rejected
		}
		for j := range nclk {
			if !inP[j] || inC[j] {
				continue
			}
			if j == ref {
				seg[k*nclk+j] = -2
				continue
			}
			seg[k*nclk+j] = int32(nseg) // new segment
			nseg++
		}
		if inP[ref] {
			seg[k*nclk+ref] = -2
			cum[k*nclk+ref] = 0
		}
		// index this epoch's links for the next difference
		if k > 0 {
			for o := obs.Start[k-1]; o < o0; o++ {
				prevObs[int(obs.Sat[o])*nr+int(obs.Sta[o])] = -1
			}
		}
		for o := o0; o < o1; o++ {
			prevObs[int(obs.Sat[o])*nr+int(obs.Sta[o])] = int32(o)
		}
	}
	if !refSeen {
		return nil, fmt.Errorf("estimate: reference clock %q has no observations", cfg.Reference)
	}
	sol.Segments = nseg

	// Code anchor: one offset per segment.
	off, rejected, err := anchor(obs, seg, cum, nclk, nseg, ns, sc, sigma, thr)
	if err != nil {
		return nil, err
	}
	sol.CodeRejected = rejected
	for k := range E {
		for j := range nclk {
			i := k*nclk + j
			switch s := seg[i]; {
			case s == -2:
				sol.Bias[i] = 0
			case s < 0:
				sol.Bias[i] = math.NaN()
			default:
				sol.Bias[i] = (cum[i] + off[s]) / speedOfLight
			}
		}
	}
	return sol, nil
}

// maxSegments bounds the dense code-anchor system.
const maxSegments = 6000

// anchor fits one offset per segment to the code observations
// (code − computed − accumulated phase clock = o_r − o_s), with iterative
// rejection of code outliers.
func anchor(obs *Observations, seg []int32, cum []float64, nclk, nseg, ns int, sc float64,
	sigma func(int, float64) float64, thr float64) ([]float64, int, error) {
	if nseg == 0 {
		return nil, 0, nil
	}
	if nseg > maxSegments {
		return nil, 0, fmt.Errorf("estimate: %d clock segments exceed the limit of %d (too many gaps or disconnected epochs)", nseg, maxSegments)
	}
	n := obs.Len()
	active := make([]bool, n)
	count := make([]int, nseg)
	for k := range obs.Epochs {
		for o := obs.Start[k]; o < obs.Start[k+1]; o++ {
			ss, sr := seg[k*nclk+int(obs.Sat[o])], seg[k*nclk+ns+int(obs.Sta[o])]
			if ss == -1 || sr == -1 {
				continue
			}
			active[o] = true
			if ss >= 0 {
				count[ss]++
			}
			if sr >= 0 {
				count[sr]++
			}
		}
	}
	nm := make([]float64, nseg*nseg)
	b := make([]float64, nseg)
	rejected := 0
	for iter := range 6 {
		clear(nm)
		clear(b)
		for k := range obs.Epochs {
			for o := obs.Start[k]; o < obs.Start[k+1]; o++ {
				if !active[o] {
					continue
				}
				is, ir := k*nclk+int(obs.Sat[o]), k*nclk+ns+int(obs.Sta[o])
				y := obs.CodeOC[o] - (cum[ir] - cum[is])
				sg := sigma(o, sc)
				w := 1 / (sg * sg)
				ss, sr := seg[is], seg[ir]
				if sr >= 0 {
					nm[int(sr)*nseg+int(sr)] += w
					b[sr] += w * y
				}
				if ss >= 0 {
					nm[int(ss)*nseg+int(ss)] += w
					b[ss] -= w * y
				}
				if sr >= 0 && ss >= 0 {
					nm[int(sr)*nseg+int(ss)] -= w
					nm[int(ss)*nseg+int(sr)] -= w
				}
			}
		}
		if err := cholSolve(nm, b, nseg); err != nil {
			return nil, 0, fmt.Errorf("estimate: code anchor of %d segments: %w", nseg, err)
		}
		if math.IsInf(thr, 1) || iter == 5 {
			break
		}
		off := func(s int32) float64 {
			if s < 0 {
				return 0
			}
			return b[s]
		}
		nrej := 0
		for k := range obs.Epochs {
			for o := obs.Start[k]; o < obs.Start[k+1]; o++ {
				if !active[o] {
					continue
				}
				is, ir := k*nclk+int(obs.Sat[o]), k*nclk+ns+int(obs.Sta[o])
				ss, sr := seg[is], seg[ir]
				y := obs.CodeOC[o] - (cum[ir] - cum[is])
				v := math.Abs(y-(off(sr)-off(ss))) / sigma(o, sc)
				if v <= thr {
					continue
				}
				// keep at least two code observations per segment
				if ss >= 0 && count[ss] <= 2 || sr >= 0 && count[sr] <= 2 {
					continue
				}
				active[o] = false
				nrej++
				if ss >= 0 {
					count[ss]--
				}
				if sr >= 0 {
					count[sr]--
				}
			}
		}
		rejected += nrej
		if nrej == 0 {
			break
		}
	}
	return b, rejected, nil
}

// checkObs reports inconsistent observation tables.
func checkObs(o *Observations) error {
	if o.Epochs < 1 || len(o.Start) != o.Epochs+1 {
		return fmt.Errorf("estimate: observations: %d epochs with %d epoch offsets", o.Epochs, len(o.Start))
	}
	n := len(o.Sat)
	if len(o.Sta) != n || len(o.CodeOC) != n || len(o.PhaseOC) != n || len(o.Computed) != n || len(o.Elev) != n {
		return fmt.Errorf("estimate: observations: column lengths differ (%d links)", n)
	}
	if o.Start[0] != 0 || o.Start[o.Epochs] != n {
		return fmt.Errorf("estimate: observations: epoch offsets %d…%d do not cover %d links", o.Start[0], o.Start[o.Epochs], n)
	}
	for k := range o.Epochs {
		if o.Start[k+1] < o.Start[k] {
			return fmt.Errorf("estimate: observations: epoch offsets decrease at epoch %d", k)
		}
	}
	ns, nr := len(o.Satellites), len(o.Stations)
	for i := range n {
		if int(o.Sat[i]) < 0 || int(o.Sat[i]) >= ns || int(o.Sta[i]) < 0 || int(o.Sta[i]) >= nr {
			return fmt.Errorf("estimate: observation %d: satellite %d or station %d out of range", i, o.Sat[i], o.Sta[i])
		}
		for _, v := range []float64{o.CodeOC[i], o.PhaseOC[i], o.Computed[i], o.Elev[i]} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("estimate: observation %d: value %g not finite", i, v)
			}
		}
		if !(o.Elev[i] > 0) {
			return fmt.Errorf("estimate: observation %d: elevation %g rad not positive", i, o.Elev[i])
		}
	}
	return nil
}

func resize(b []float64, n int) []float64 {
	if cap(b) < n {
		return make([]float64, n)
	}
	b = b[:n]
	clear(b)
	return b
}

// cholSolve solves the symmetric positive-definite system a·x = b in place
// (a is n×n row-major and is overwritten by its Cholesky factor; b by x).
func cholSolve(a, b []float64, n int) error {
	for j := range n {
		d := a[j*n+j]
		for k := range j {
			d -= a[j*n+k] * a[j*n+k]
		}
		if !(d > 0) {
			return fmt.Errorf("normal matrix not positive definite at column %d (pivot %g): clock not connected to the reference?", j, d)
		}
		d = math.Sqrt(d)
		a[j*n+j] = d
		for i := j + 1; i < n; i++ {
			s := a[i*n+j]
			ri, rj := a[i*n:i*n+j], a[j*n:j*n+j]
			for k := range ri {
				s -= ri[k] * rj[k]
			}
			a[i*n+j] = s / d
		}
	}
	for i := range n { // forward: L·z = b
		s := b[i]
		for k := range i {
			s -= a[i*n+k] * b[k]
		}
		b[i] = s / a[i*n+i]
	}
	for i := n - 1; i >= 0; i-- { // back: Lᵀ·x = z
		s := b[i]
		for k := i + 1; k < n; k++ {
			s -= a[k*n+i] * b[k]
		}
		b[i] = s / a[i*n+i]
	}
	return nil
}

// graph is a small adjacency structure for connectivity on the clocks.
type graph struct {
	adj   [][]int
	queue []int
}

func newGraph(n int) *graph { return &graph{adj: make([][]int, n)} }

func (g *graph) reset() {
	for i := range g.adj {
		g.adj[i] = g.adj[i][:0]
	}
}

func (g *graph) add(a, b int) {
	g.adj[a] = append(g.adj[a], b)
	g.adj[b] = append(g.adj[b], a)
}

// component marks in seen the vertices connected to start (start included
// only if it has an edge).
func (g *graph) component(start int, seen []bool) {
	for i := range seen {
		seen[i] = false
	}
	if len(g.adj[start]) == 0 {
		return
	}
	g.queue = append(g.queue[:0], start)
	seen[start] = true
	for len(g.queue) > 0 {
		v := g.queue[0]
		g.queue = g.queue[1:]
		for _, u := range g.adj[v] {
			if !seen[u] {
				seen[u] = true
				g.queue = append(g.queue, u)
			}
		}
	}
}

// Rereference returns a copy of the solution referred to the weighted
// ensemble Σ w_k·b_k of the clocks ids (weights dimensionless, summing to
// 1): b′_j = b_j − Σ w_k·b_k at every epoch. An epoch where any ensemble
// member is missing becomes a gap for every clock.
func (s *Solution) Rereference(ids []string, weights []float64) (*Solution, error) {
	if len(ids) == 0 || len(ids) != len(weights) {
		return nil, fmt.Errorf("estimate: ensemble of %d clocks with %d weights", len(ids), len(weights))
	}
	cols := make([]int, len(ids))
	sum := 0.0
	for i, id := range ids {
		if cols[i] = s.Index(id); cols[i] < 0 {
			return nil, fmt.Errorf("estimate: ensemble clock %q is not in the solution", id)
		}
		if math.IsNaN(weights[i]) || math.IsInf(weights[i], 0) {
			return nil, fmt.Errorf("estimate: ensemble weight %g of %q not finite", weights[i], id)
		}
		sum += weights[i]
	}
	if math.Abs(sum-1) > 1e-9 {
		return nil, fmt.Errorf("estimate: ensemble weights sum to %g, want 1", sum)
	}
	out := *s
	out.Reference = strings.Join(ids, "+")
	nc := len(s.Clocks)
	out.Bias = make([]float64, len(s.Bias))
	for k := range s.Epochs {
		e := 0.0
		for i, j := range cols {
			e += weights[i] * s.At(k, j)
		}
		for j := range nc {
			out.Bias[k*nc+j] = s.At(k, j) - e // NaN propagates
		}
	}
	return &out, nil
}

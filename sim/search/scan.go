package search

import (
	"math"
	"sync"
)

// searcher holds everything the bank scan shares between workers (read only).
type searcher struct {
	cfg    Config
	prep   *prepared
	step   float64
	nEpoch int
	nInt   int
	nData  int             // data clocks (scan clocks 0..nData−1)
	hasRef bool            // scan clock nData is the reference
	pos    [][][3]float64  // [scan clock][epoch] celestial position, m
	k      [][]float64     // [coupling][scan clock] sensitivity K
	kern   [][]kernelTable // [speed][thickness]
	dirs   [][3]float64
	m0     int     // first t0 grid point: t0 = (m0 + m)·dt0
	nT0    int     // t0 grid points
	dt0    float64 // t0 grid step, s
	half   int     // half width H of the per-t0 interval buffer
	radius float64 // largest clock distance from the geocentre, m
}

// nScan returns the number of scan clocks (data clocks plus the reference).
func (s *searcher) nScan() int {
	if s.hasRef {
		return s.nData + 1
	}
	return s.nData
}

// templateID orders templates: direction, speed, thickness, coupling.
func (s *searcher) templateID(d, v, th, cl int) int {
	return ((d*len(s.cfg.Speeds)+v)*len(s.cfg.Thicknesses)+th)*len(s.cfg.Couplings) + cl
}

// unpackID inverts templateID.
func (s *searcher) unpackID(id int) (d, v, th, cl int) {
	nc, nt, nv := len(s.cfg.Couplings), len(s.cfg.Thicknesses), len(s.cfg.Speeds)
	cl = id % nc
	id /= nc
	th = id % nt
	id /= nt
	v = id % nv
	d = id / nv
	return
}

// worker holds one goroutine's scratch and its running maxima.
type worker struct {
	proj    [][]float64 // [scan clock][epoch] n̂·r, m
	ci      []int       // crossing interval per scan clock
	ph      []int       // crossing phase bin per scan clock
	g, q, r []float64   // per-t0 interval buffers: Σ m·K·g, Σ m·(K·g)², reference K·g
	best    []float64   // per t0: largest |ρ|
	bestID  []int       // per t0: its template id (−1: none)
	bestNum []float64   // per t0: its numerator
	bestDen []float64   // per t0: its denominator
	// visit, if set, receives every (t0 index, template id, numerator,
	// denominator) instead of the running maxima (tests).
	visit func(m, id int, num, den float64)
}

func (s *searcher) newWorker() *worker {
	n := s.nScan()
	w := &worker{proj: make([][]float64, n), ci: make([]int, n), ph: make([]int, n)}
	for c := range w.proj {
		w.proj[c] = make([]float64, s.nEpoch)
	}
	b := 2*s.half + 1
	w.g, w.q, w.r = make([]float64, b), make([]float64, b), make([]float64, b)
	w.best = make([]float64, s.nT0)
	w.bestID = make([]int, s.nT0)
	w.bestNum = make([]float64, s.nT0)
	w.bestDen = make([]float64, s.nT0)
	for i := range w.bestID {
		w.bestID[i] = -1
	}
	return w
}

// better reports whether (stat a, id ia) ranks above (b, ib): larger stat,
// then lower template id. A total order, so merging maxima from any number
// of workers in any order gives the same result.
func better(a float64, ia int, b float64, ib int) bool {
	if ib < 0 {
		return true
	}
	if a != b {
		return a > b
	}
	return ia < ib
}

// crossing returns the crossing time, in sample intervals since the first
// epoch, of the clock whose projection n̂·r (m) at the epochs is p, for a
// wall at geocentre time t0 (s) with 1/v = invV (s/m). It solves
// f(t) = t − t0 − n̂·r(t)/v = 0: a first guess t1 = t0 + p(t_k0)/v from the
// epoch k0 nearest t0, then one Newton step on the linear interpolation of
// p around t1 (clamped to the tabulated span, whose last index is lastX),
// whose slope is the clock's projected velocity.
func crossing(p []float64, k0 int, t0, invV, invStep, lastX float64) float64 {
	x := (t0 + p[k0]*invV) * invStep
	x = math.Max(0, math.Min(lastX, x))
	i := int(x)
	fr := x - float64(i)
	dp := p[i+1] - p[i]
	pp := p[i] + fr*dp
	// In units of intervals: f(x) = x − x0 − pp·invV/τ0, f′ = 1 − dp·invV/τ0.
	f := x - (t0+pp*invV)*invStep
	return x - f/(1-dp*invV*invStep)
}

// t0 returns the geocentre time of grid point m, s since the first epoch.
func (s *searcher) t0(m int) float64 { return float64(s.m0+m) * s.dt0 }

// scanDirection evaluates every template of direction d at every t0.
func (s *searcher) scanDirection(w *worker, d int) {
	n := s.dirs[d]
	ns := s.nScan()
	for c := range ns {
		p, pos := w.proj[c], s.pos[c]
		for k := range p {
			r := &pos[k]
			p[k] = n[0]*r[0] + n[1]*r[1] + n[2]*r[2]
		}
	}
	invStep := 1 / s.step
	lastX := float64(s.nEpoch-1) - 1e-9
	nInt := s.nInt
	pr := s.prep
	for vi, v := range s.cfg.Speeds {
		invV := 1 / v
		for m := range s.nT0 {
			t0 := s.t0(m)
			k0 := min(int(t0*invStep+0.5), s.nEpoch-1)
			base := int(math.Floor(t0 * invStep))
			// Crossing times t_c = t0 + n̂·r_c(t_c)/v on the tabulated projection.
			for c := range ns {
				x := crossing(w.proj[c], k0, t0, invV, invStep, lastX)
				fi := math.Floor(x)
				w.ci[c] = int(fi)
				w.ph[c] = min(int((x-fi)*phaseBins), phaseBins-1)
			}
			for th := range s.cfg.Thicknesses {
				kt := &s.kern[vi][th]
				for cl := range s.cfg.Couplings {
					kc := s.k[cl]
					bmin, bmax := len(w.g), -1
					num := 0.0
					for c := range s.nData {
						K := kc[c]
						if K == 0 {
							continue
						}
						z, mk := pr.z[c], pr.m[c]
						ph := 0
						if kt.phase > 1 {
							ph = w.ph[c]
						}
						row := kt.vals[ph*kt.n : (ph+1)*kt.n]
						i0 := w.ci[c] + kt.lo
						for q, gv := range row {
							i := i0 + q
							if i < 0 || i >= nInt {
								continue
							}
							kg := K * gv
							num += kg * z[i]
							mw := mk[i]
							if mw == 0 {
								continue
							}
							b := i - base + s.half
							if b < 0 || b >= len(w.g) {
								continue
							}
							if b < bmin {
								bmin = b
							}
							if b > bmax {
								bmax = b
							}
							w.g[b] += mw * kg
							w.q[b] += mw * kg * kg
						}
					}
					if s.hasRef {
						c := s.nData
						if K := kc[c]; K != 0 {
							ph := 0
							if kt.phase > 1 {
								ph = w.ph[c]
							}
							row := kt.vals[ph*kt.n : (ph+1)*kt.n]
							i0 := w.ci[c] + kt.lo
							for q, gv := range row {
								i := i0 + q
								if i < 0 || i >= nInt {
									continue
								}
								kg := K * gv
								num += kg * pr.zr[i]
								b := i - base + s.half
								if b < 0 || b >= len(w.g) {
									continue
								}
								if b < bmin {
									bmin = b
								}
								if b > bmax {
									bmax = b
								}
								w.r[b] += kg
							}
						}
					}
					// uᵀC⁻¹u per interval with u_j = g_j − g_r (Sherman–Morrison):
					// Σ_j m_j u_j² − γ(Σ_j m_j u_j)² = Q − 2RG + R²W − γ(G − RW)².
					den := 0.0
					for b := bmin; b <= bmax; b++ {
						G, Q, R := w.g[b], w.q[b], w.r[b]
						w.g[b], w.q[b], w.r[b] = 0, 0, 0
						e := base - s.half + b
						if e < 0 || e >= nInt {
							continue
						}
						W := pr.w[e]
						u := G - R*W
						den += Q - 2*R*G + R*R*W - pr.gamma[e]*u*u
					}
					id := s.templateID(d, vi, th, cl)
					if w.visit != nil {
						w.visit(m, id, num, den)
						continue
					}
					if !(den > 0) {
						continue
					}
					stat := math.Abs(num) / math.Sqrt(den)
					if better(stat, id, w.best[m], w.bestID[m]) {
						w.best[m], w.bestID[m] = stat, id
						w.bestNum[m], w.bestDen[m] = num, den
					}
				}
			}
		}
	}
}

// run scans all directions with a worker pool and merges the maxima.
func (s *searcher) run() *worker {
	nw := max(1, min(s.cfg.Workers, len(s.dirs)))
	jobs := make(chan int)
	workers := make([]*worker, nw)
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for i := range workers {
		w := s.newWorker()
		workers[i] = w
		wg.Add(1)
		go func() {
			defer wg.Done()
			for d := range jobs {
				s.scanDirection(w, d)
				if s.cfg.Progress != nil {
					mu.Lock()
					done++
					s.cfg.Progress(done, len(s.dirs))
					mu.Unlock()
				}
			}
		}()
	}
	for d := range s.dirs {
		jobs <- d
	}
	close(jobs)
	wg.Wait()
	out := workers[0]
	for _, w := range workers[1:] {
		for m := range out.best {
			if w.bestID[m] >= 0 && better(w.best[m], w.bestID[m], out.best[m], out.bestID[m]) {
				out.best[m], out.bestID[m] = w.best[m], w.bestID[m]
				out.bestNum[m], out.bestDen[m] = w.bestNum[m], w.bestDen[m]
			}
		}
	}
	return out
}

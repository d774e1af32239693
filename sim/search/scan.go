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
	kg     [][]float64     // [coupling][scan clock] K/τ0, the thin-wall spike, 1/s
	phased bool            // some kernel depends on the crossing phase (thick walls)
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

// zm is one interval of one data clock: the numerator series z = (C⁻¹y)
// and the weight m = 1/σ² where the sample is present (0 in a gap).
type zm struct{ z, m float64 }

// blockLen is the number of t0 grid points whose crossings are solved
// together (keeps the per-block crossing table in L1 cache).
const blockLen = 32

// worker holds one goroutine's scratch and its running maxima.
type worker struct {
	proj  [][]float64 // [scan clock][epoch] n̂·r, m
	x     []float64   // [scan clock × blockLen] crossing time, intervals since the first epoch (if keepX)
	keepX bool        // fill x (tests)
	ci    []int32     // [scan clock × blockLen] crossing interval
	ph    []uint8     // [scan clock × blockLen] crossing phase bin
	g, r  []float64   // per-t0 interval buffers: Σ m·K·g, reference K·g
	// Per-block results and the thin-wall block buffers.
	bnum, bden, bq []float64 // [blockLen] numerator, denominator, Σ m·(K·g)²
	boff           []int     // [blockLen] half − interval of t0
	bg, br         []float64 // [blockLen × (2·half+1)] G and R per t0
	best           []float64 // per t0: largest |ρ|
	bestID         []int     // per t0: its template id (−1: none)
	bestNum        []float64 // per t0: its numerator
	bestDen        []float64 // per t0: its denominator
	// visit, if set, receives every (t0 index, template id, numerator,
	// denominator) instead of the running maxima (tests).
	visit func(m, id int, num, den float64)
}

func (s *searcher) newWorker() *worker {
	n := s.nScan()
	w := &worker{proj: make([][]float64, n), x: make([]float64, n*blockLen), ci: make([]int32, n*blockLen), ph: make([]uint8, n*blockLen)}
	for c := range w.proj {
		w.proj[c] = make([]float64, s.nEpoch)
	}
	b := 2*s.half + 1
	w.g, w.r = make([]float64, b), make([]float64, b)
	w.bnum, w.bden, w.bq = make([]float64, blockLen), make([]float64, blockLen), make([]float64, blockLen)
	w.boff = make([]int, blockLen)
	w.bg, w.br = make([]float64, blockLen*b), make([]float64, blockLen*b)
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
// p around t1 (the end segments extended beyond the table, whose last
// index is lastX), whose slope is the clock's projected velocity.
func crossing(p []float64, k0 int, t0, invV, invStep, lastX float64) float64 {
	x := (t0 + p[k0]*invV) * invStep
	// The segment of p around x; beyond the table's ends the end segments
	// are extended linearly, so x(t0) stays smooth there.
	i := 0
	if x > 0 {
		i = min(int(x), int(lastX))
	}
	fr := x - float64(i)
	p0 := p[i]
	dp := p[i+1] - p0
	// In units of intervals: f(x) = x − (t0 + p(x)/v)/τ0, f′ = 1 − dp/(v·τ0).
	f := x - (t0+(p0+fr*dp)*invV)*invStep
	return x - f/(1-dp*invV*invStep)
}

// blockCrossings fills the worker's crossing table for the nb grid points
// from m0 at speed 1/invV. The crossing time x(t0) (in intervals) is solved
// exactly (crossing) at the block's first, middle and last t0 and
// interpolated by the quadratic through them in between: the lag n̂·r/v
// varies smoothly, and the cubic remainder over a block of ≤ 16 min is
// ≈ 0.01 s at 150 km/s (satellite jerk ω²·|ṙ| ≈ 8e-5 m/s³; ≤ 0.03 s
// measured by TestBlockCrossingsAgainstInject, within the data span), against
// ≈ 25 flops and a division per exact solve.
func (s *searcher) blockCrossings(w *worker, m0, nb int, invV float64) {
	invStep := 1 / s.step
	lastX := float64(s.nEpoch-1) - 1e-9
	ta := s.t0(m0)
	tb := s.t0(m0 + nb - 1)
	tm := 0.5 * (ta + tb)
	solve := func(p []float64, t0 float64) float64 {
		k0 := max(0, min(int(t0*invStep+0.5), s.nEpoch-1))
		return crossing(p, k0, t0, invV, invStep, lastX)
	}
	keep := w.keepX
	scale := 0.0
	if nb > 1 {
		scale = 2 / float64(nb-1)
	}
	for c := range s.nScan() {
		p := w.proj[c]
		ci := w.ci[c*blockLen : c*blockLen+nb]
		ph := w.ph[c*blockLen : c*blockLen+nb]
		xa, xm, xb := solve(p, ta), solve(p, tm), solve(p, tb)
		// x(u) = xm + u·c1 + u²·c2 for u = 2·mm/(nb−1) − 1 ∈ [−1, 1].
		c1, c2 := 0.5*(xb-xa), 0.5*(xa+xb)-xm
		xs := w.x[c*blockLen : c*blockLen+nb] // kept for tests only (w.keepX)
		for mm := range ci {
			u := float64(mm)*scale - 1
			x := xm + u*(c1+u*c2)
			if nb == 1 {
				x = xa
			}
			if keep {
				xs[mm] = x
			}
			fi := floorInt(x)
			ci[mm] = int32(fi)
			if s.phased {
				ph[mm] = uint8(min(int((x-float64(fi))*phaseBins), phaseBins-1))
			}
		}
	}
}

// floorBias makes floorInt one truncating conversion: x + floorBias > 0
// for every crossing of a valid network (|lag| ≤ R/v < 1e6 s), and its
// resolution, 2⁻²² intervals (7 µs at 30 s), is far below the solver's.
const floorBias = 1 << 30

// floorInt returns ⌊x⌋ for −2³⁰ < x < 2³⁰ (to 2⁻²²).
func floorInt(x float64) int { return int(x+floorBias) - floorBias }

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
	// Blocks of t0 outside, speeds inside: the block's stretch of the
	// projections and of the whitened data stays in cache for every speed.
	for m0 := 0; m0 < s.nT0; m0 += blockLen {
		nb := min(blockLen, s.nT0-m0)
		for vi, v := range s.cfg.Speeds {
			invV := 1 / v
			// Interval offsets (crossing interval − t0 interval) this speed can
			// reach: |lag| ≤ R/v, plus the kernel extent.
			reach := int(math.Ceil(s.radius*invV*invStep)) + 2
			s.blockCrossings(w, m0, nb, invV)
			for th := range s.cfg.Thicknesses {
				kt := &s.kern[vi][th]
				// Buffer entries this template can touch.
				blo := max(0, s.half-reach+kt.lo)
				bhi := min(2*s.half, s.half+reach+kt.lo+kt.n)
				for cl := range s.cfg.Couplings {
					id := s.templateID(d, vi, th, cl)
					if kt.n == 1 && kt.lo == 0 {
						s.thinBlock(w, &s.prep.data, cl, m0, nb, blo, bhi)
					} else {
						for mm := range nb {
							base := floorInt(s.t0(m0+mm) * invStep)
							num, qtot := s.accumulate(w, &s.prep.data, kt, cl, mm, base)
							w.bnum[mm] = num
							w.bden[mm] = s.denominator(w, base, blo, bhi, qtot)
						}
					}
					for mm := range nb {
						m := m0 + mm
						num, den := w.bnum[mm], w.bden[mm]
						if w.visit != nil {
							w.visit(m, id, num, den)
							continue
						}
						stat := math.Abs(num) / math.Sqrt(den)
						if !(den > 0) || math.IsNaN(stat) {
							continue
						}
						if better(stat, id, w.best[m], w.bestID[m]) {
							w.best[m], w.bestID[m] = stat, id
							w.bestNum[m], w.bestDen[m] = num, den
						}
					}
				}
			}
		}
	}
}

// thinBlock evaluates the thin-wall template of coupling cl at the nb grid
// points of the block from m0 (crossings in the worker's table), leaving
// numerators and denominators in w.bnum, w.bden. The loop runs clock by
// clock over the block, so each clock's data are read in order and the
// block's t0 accumulate independently (no loop-carried dependency).
func (s *searcher) thinBlock(w *worker, ser *series, cl, m0, nb, blo, bhi int) {
	nInt := s.nInt
	invStep := 1 / s.step
	B := 2*s.half + 1
	kg := s.kg[cl]
	num, qt, off := w.bnum[:nb], w.bq[:nb], w.boff[:nb]
	G, R := w.bg[:nb*B], w.br[:nb*B]
	for mm := range nb {
		num[mm], qt[mm] = 0, 0
		off[mm] = s.half - floorInt(s.t0(m0+mm)*invStep)
	}
	for c, zc := range ser.zc {
		K := kg[c]
		if K == 0 {
			continue
		}
		ci := w.ci[c*blockLen : c*blockLen+nb]
		for mm, i32 := range ci {
			i := int(i32)
			if uint(i) >= uint(nInt) {
				continue
			}
			x := zc[i]
			num[mm] += K * x.z
			mk := x.m * K
			qt[mm] += mk * K
			if b := i + off[mm]; mk != 0 && uint(b) < uint(B) {
				G[mm*B+b] += mk
			}
		}
	}
	if s.hasRef {
		c := s.nData
		if K := kg[c]; K != 0 {
			ci := w.ci[c*blockLen : c*blockLen+nb]
			for mm, i32 := range ci {
				i := int(i32)
				if b := i + off[mm]; uint(i) < uint(nInt) && uint(b) < uint(B) {
					num[mm] += K * ser.zr[i]
					R[mm*B+b] += K
				}
			}
		}
	}
	pr := s.prep
	for mm := range nb {
		base := s.half - off[mm]
		g, r := G[mm*B:(mm+1)*B], R[mm*B:(mm+1)*B]
		den := qt[mm]
		for b := blo; b <= bhi; b++ {
			gb, rb := g[b], r[b]
			if gb == 0 && rb == 0 {
				continue
			}
			g[b], r[b] = 0, 0
			e := base - s.half + b
			if e < 0 || e >= nInt {
				continue
			}
			W := pr.w[e]
			u := gb - rb*W
			den += rb*rb*W - 2*rb*gb - pr.gamma[e]*u*u
		}
		w.bden[mm] = den
	}
}

// denominator returns uᵀC⁻¹u from qtot = Σ_j Σ_k m_j(k)·g_j(k)² and the
// interval buffers b ∈ [blo, bhi] (interval base − half + b) of
// G = Σ_j m_j·g_j and R = g_r, which it clears. Per interval, with
// u_j = g_j − g_r over the present clocks (Sherman–Morrison):
// Σ_j m_j u_j² − γ(Σ_j m_j u_j)² = Q − 2RG + R²W − γ(G − RW)²,
// and the Q terms sum to qtot.
func (s *searcher) denominator(w *worker, base, blo, bhi int, qtot float64) float64 {
	den := qtot
	pr := s.prep
	for b := blo; b <= bhi; b++ {
		G, R := w.g[b], w.r[b]
		if G == 0 && R == 0 {
			continue
		}
		w.g[b], w.r[b] = 0, 0
		e := base - s.half + b
		if e < 0 || e >= s.nInt {
			continue
		}
		W := pr.w[e]
		u := G - R*W
		den += R*R*W - 2*R*G - pr.gamma[e]*u*u
	}
	return den
}

// evalOne returns the numerator and denominator of template
// (direction d, speed vi, thickness th, coupling cl) at grid point m on ser.
func (s *searcher) evalOne(w *worker, ser *series, d, vi, th, cl, m int) (num, den float64) {
	n := s.dirs[d]
	invStep, invV := 1/s.step, 1/s.cfg.Speeds[vi]
	lastX := float64(s.nEpoch-1) - 1e-9
	t0 := s.t0(m)
	k0 := min(int(t0*invStep+0.5), s.nEpoch-1)
	for c := range s.nScan() {
		p, pos := w.proj[c], s.pos[c]
		for k := range p {
			r := &pos[k]
			p[k] = n[0]*r[0] + n[1]*r[1] + n[2]*r[2]
		}
		x := crossing(p, k0, t0, invV, invStep, lastX)
		fi := floorInt(x)
		w.ci[c*blockLen] = int32(fi)
		w.ph[c*blockLen] = uint8(min(int((x-float64(fi))*phaseBins), phaseBins-1))
	}
	base := floorInt(t0 * invStep)
	kt := &s.kern[vi][th]
	num, qtot := s.accumulate(w, ser, kt, cl, 0, base)
	return num, s.denominator(w, base, 0, 2*s.half, qtot)
}

// accumulate adds every scan clock's template (kernel kt, coupling cl) at
// block position mm into the worker's interval buffers and returns the
// numerator uᵀC⁻¹y. base is the interval of t0.
func (s *searcher) accumulate(w *worker, ser *series, kt *kernelTable, cl, mm, base int) (num, qtot float64) {
	nInt := s.nInt
	off := s.half - base
	g := w.g
	if kt.n == 1 && kt.lo == 0 {
		// Thin wall without AR filter: one interval per clock, value
		// K/τ0 (s.kg).
		kg := s.kg[cl]
		zms, nd := ser.zm, ser.nd
		for c := range nd {
			K := kg[c]
			i := int(w.ci[c*blockLen+mm])
			if K == 0 || uint(i) >= uint(nInt) {
				continue
			}
			x := zms[i*nd+c]
			num += K * x.z
			mk := x.m * K
			qtot += mk * K
			if b := i + off; mk != 0 && uint(b) < uint(len(g)) {
				g[b] += mk
			}
		}
		if s.hasRef {
			c := s.nData
			if K := kg[c]; K != 0 {
				if i := int(w.ci[c*blockLen+mm]); uint(i) < uint(nInt) && uint(i+off) < uint(len(g)) {
					num += K * ser.zr[i]
					w.r[i+off] += K
				}
			}
		}
		return num, qtot
	}
	kc := s.k[cl]
	zms, nd := ser.zm, ser.nd
	for c := range nd {
		K := kc[c]
		if K == 0 {
			continue
		}
		ph := 0
		if kt.phase > 1 {
			ph = int(w.ph[c*blockLen+mm])
		}
		row := kt.vals[ph*kt.n : (ph+1)*kt.n]
		i0 := int(w.ci[c*blockLen+mm]) + kt.lo
		for j, gv := range row {
			i := i0 + j
			if uint(i) >= uint(nInt) {
				continue
			}
			kg := K * gv
			x := zms[i*nd+c]
			num += kg * x.z
			mk := x.m * kg
			qtot += mk * kg
			if b := i + off; mk != 0 && uint(b) < uint(len(g)) {
				g[b] += mk
			}
		}
	}
	if s.hasRef {
		c := s.nData
		if K := kc[c]; K != 0 {
			ph := 0
			if kt.phase > 1 {
				ph = int(w.ph[c*blockLen+mm])
			}
			row := kt.vals[ph*kt.n : (ph+1)*kt.n]
			i0 := int(w.ci[c*blockLen+mm]) + kt.lo
			for j, gv := range row {
				i := i0 + j
				if uint(i) >= uint(nInt) || uint(i+off) >= uint(len(g)) {
					continue
				}
				kg := K * gv
				num += kg * ser.zr[i]
				w.r[i+off] += kg
			}
		}
	}
	return num, qtot
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

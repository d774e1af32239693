package search

import (
	"math"
	"slices"
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
	// thinOnly[speed]: every thickness class is the bare thin spike, so
	// the per-grid-point crossing table is needed only off the lane form.
	thinOnly []bool
	// full[blk·data clocks + c]: data clock c is present (prep.data) over
	// every interval t0 block blk can reach, [base − half, base′ + half].
	full   []bool
	dirs   [][3]float64
	m0     int     // first t0 grid point: t0 = (m0 + m)·dt0
	nT0    int     // t0 grid points
	dt0    float64 // t0 grid step, s
	half   int     // half width H of the per-t0 interval buffer
	radius float64 // largest clock distance from the geocentre, m
}

// completeBlocks fills s.full.
func (s *searcher) completeBlocks() {
	ser := &s.prep.data
	S := s.cfg.T0Substeps
	nblk := (s.nT0 + blockLen - 1) / blockLen
	s.full = make([]bool, nblk*ser.nd)
	for b := range nblk {
		m0 := b * blockLen
		nb := min(blockLen, s.nT0-m0)
		lo := (s.m0+m0)/S - s.half
		hi := (s.m0+m0+nb-1)/S + s.half + 1 // exclusive
		if lo < 0 || hi > s.nInt {
			continue
		}
		for c := range ser.nd {
			s.full[b*ser.nd+c] = ser.miss[c][hi] == ser.miss[c][lo]
		}
	}
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

// maxSub is the largest number of t0 grid points per interval (Config).
const maxSub = 16

// worker holds one goroutine's scratch and its running maxima.
type worker struct {
	proj  [][]float64 // [scan clock][epoch] n̂·r, m
	proj2 [][]float64 // the same for the second direction of a pair (run)
	x     []float64   // [scan clock × blockLen] crossing time, intervals since the first epoch (if keepX)
	keepX bool        // fill x (tests)
	// perElement, if set, makes every clock of every block take the
	// per-element path (tests compare it with the lane path).
	perElement bool
	ci         []int32 // [scan clock × blockLen] crossing interval (per-element clocks, or every clock if needCI)
	ph         []uint8 // [scan clock × blockLen] crossing phase bin
	// Lane form of a block's crossings. Grid point mm of the block lies in
	// interval base[mm] = (m0 + mm) div S (S = t0 points per interval); its
	// lane is mm mod S. When uni[c], clock c's crossing interval is
	// base[mm] + dl[c·maxSub + mm mod S] for every mm of the block: the lag
	// in whole intervals is constant along each lane.
	uni []bool
	dl  []int32
	// Positions. Within a block the grid points are kept lane by lane
	// (lane-major): position j holds grid point jmm[j], lane l holds
	// positions [lane0[l], lane0[l+1]) in increasing t0, and jof inverts
	// jmm. With one t0 per interval, j = mm. base, ci, ph and x are by
	// position.
	jmm, jof []int
	jlane    []uint8
	lane0    []int // [maxSub + 1]
	layoutNb int   // nb the layout was made for (0: none)
	pnum     []float64
	pden     []float64
	base     []int     // [blockLen]
	baseM    int       // the global grid index base was filled for (−1: none)
	rl       []float64 // [maxSub] lane offsets within the interval
	// Interpolation nodes of the crossing times (blockCrossings), kept from
	// block to block: nodes[(speed·scan clocks + c)·4 + k] is the exact
	// crossing at the first grid point of block nodeBlk[speed] − 1 + k.
	nodes   []float64
	nodeBlk []int     // [speed] (−2: none)
	xg      []float64 // [scan clock] first guesses (solveNode)
	g, r    []float64 // per-t0 interval buffers: Σ m·K·g, reference K·g
	// Per-block results and the thin-wall block buffers.
	bnum, bden, bq []float64 // [blockLen] numerator, denominator, Σ m·(K·g)²
	// bg, br: G and R of the block, row major by buffer entry b:
	// bg[b·blockLen + mm] is G at interval base[mm] − half + b.
	bg, br []float64
	// Lane constants of a block (thinBlock): qlane[l] the Q sum, and
	// glane, rlane[row·maxSub + l] the G and R shares of complete lanes.
	qlane, glane, rlane []float64
	dlane               []float64 // [maxSub] per-lane denominator terms
	dirty               []bool    // [row] row has per-element G or R entries
	refRow              []bool    // [row] row has per-element R entries
	sink                float64   // keeps warm's loads
	blk                 int       // index of the block being scanned (m0/blockLen)
	best                []float64 // per t0: largest ρ² (its |ρ| after run)
	bestID              []int     // per t0: its template id (−1: none)
	bestNum             []float64 // per t0: its numerator
	bestDen             []float64 // per t0: its denominator
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
	w.uni, w.dl, w.base, w.rl = make([]bool, n), make([]int32, n*maxSub), make([]int, blockLen), make([]float64, maxSub)
	w.jmm, w.jof, w.jlane, w.lane0 = make([]int, blockLen), make([]int, blockLen), make([]uint8, blockLen), make([]int, maxSub+1)
	w.pnum, w.pden = make([]float64, blockLen), make([]float64, blockLen)
	w.nodes, w.nodeBlk, w.xg = make([]float64, len(s.cfg.Speeds)*n*4), make([]int, len(s.cfg.Speeds)), make([]float64, n)
	w.resetCrossings()
	w.baseM = -1
	b := 2*s.half + 1
	w.g, w.r = make([]float64, b), make([]float64, b)
	w.bnum, w.bden, w.bq = make([]float64, blockLen), make([]float64, blockLen), make([]float64, blockLen)
	w.bg, w.br = make([]float64, blockLen*b), make([]float64, blockLen*b)
	w.qlane, w.glane, w.rlane = make([]float64, maxSub), make([]float64, maxSub*b), make([]float64, maxSub*b)
	w.dlane, w.dirty, w.refRow = make([]float64, maxSub), make([]bool, b), make([]bool, b)
	w.best = make([]float64, s.nT0)
	w.bestID = make([]int, s.nT0)
	w.bestNum = make([]float64, s.nT0)
	w.bestDen = make([]float64, s.nT0)
	for i := range w.bestID {
		w.bestID[i] = -1
	}
	return w
}

// resetCrossings forgets the kept interpolation nodes (call when the
// projections change, i.e. for a new direction).
func (w *worker) resetCrossings() {
	for i := range w.nodeBlk {
		w.nodeBlk[i] = -2
	}
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
	return newtonStep(p, (t0+p[k0]*invV)*invStep, t0, invV, invStep, lastX)
}

// newtonStep is crossing's Newton step from the first guess x (intervals).
func newtonStep(p []float64, x, t0, invV, invStep, lastX float64) float64 {
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

// solveNode sets out[4c] to the exact crossing (crossing) of every scan
// clock c at node j, the first grid point of block j, at 1/v = invV. It
// runs the first guesses of all clocks, then all Newton steps: each
// solve is a chain of dependent loads and a division, and two short
// independent loops let the processor overlap the clocks' chains.
func (s *searcher) solveNode(w *worker, out []float64, j int, invV float64) {
	invStep := 1 / s.step
	lastX := float64(s.nEpoch-1) - 1e-9
	t0 := float64(s.m0+j*blockLen) * s.dt0
	k0 := s.nearestEpoch(t0)
	ns := s.nScan()
	xg := w.xg[:ns]
	for c := range xg {
		xg[c] = (t0 + w.proj[c][k0]*invV) * invStep
	}
	for c, x := range xg {
		out[4*c] = newtonStep(w.proj[c], x, t0, invV, invStep, lastX)
	}
}

// laneEps is the margin, in intervals, by which a block's lag range must
// clear an interval boundary for the lane form: far above the round-off of
// the per-element evaluation and the 2⁻²² resolution of floorInt.
const laneEps = 1e-6

// blockCrossings fills the worker's crossing table for the nb grid points
// from m0 (a multiple of blockLen) at speed index vi (1/v = invV). The
// crossing time x(t0) (in intervals) is solved exactly (crossing) at nodes
// every blockLen grid points and interpolated in between by the cubic
// through the four nodes around the block (one before it, its first, the
// next block's first and one after): the lag n̂·r/v varies smoothly, and
// the quartic remainder over 16-min node spacing at 150 km/s is
// ≈ 2 ms (ω⁴·a/v·h⁴·(9/16)/24 for a GPS orbit; TestBlockCrossingsAgainstInject
// checks ≤ 0.05 s within the data span), against ≈ 25 flops and a division
// per exact solve. The nodes slide from block to block, so each block costs
// one solve per clock. Blocks whose outer nodes fall outside the data (the
// first and the last two) use three solves inside the block instead.
//
// The lag in intervals, λ = x − t0/τ0, changes by less than one interval
// over most blocks (≲ 0.8 for a satellite at 150 km/s, ≲ 0.1 for a
// station), so the block is stored in lane form (worker.uni, worker.dl)
// whenever the cubic's range, including its turning points, keeps every
// lane inside one interval; otherwise, and when needCI (thick or filtered
// kernels, tests), the interval (and phase) of every grid point is stored.
// Both forms give the same interval for every grid point.
func (s *searcher) blockCrossings(w *worker, m0, nb, vi int, invV float64, needCI bool) {
	invStep := 1 / s.step
	lastX := float64(s.nEpoch-1) - 1e-9
	S := s.cfg.T0Substeps
	M := s.m0 + m0 // global grid index of the block's first point
	if w.layoutNb != nb {
		w.layout(nb, S)
		w.baseM = -1
	}
	if w.baseM != M {
		for j, mm := range w.jmm[:nb] {
			w.base[j] = (M + mm) / S
		}
		w.baseM = M
	}
	ns := s.nScan()
	blk := m0 / blockLen
	nodes := w.nodes[vi*ns*4 : (vi+1)*ns*4]
	shift := w.nodeBlk[vi] == blk-1
	w.nodeBlk[vi] = blk
	if shift {
		for c := range ns {
			y := nodes[c*4 : c*4+4]
			y[0], y[1], y[2] = y[1], y[2], y[3]
		}
		s.solveNode(w, nodes[3:], blk+2, invV)
	} else {
		for k := range 4 {
			s.solveNode(w, nodes[k:], blk-1+k, invV)
		}
	}
	keep := w.keepX
	const scale = 1.0 / blockLen // u = mm/blockLen
	const third, sixth = 1.0 / 3, 1.0 / 6
	uEnd := float64(nb-1) * scale
	dev2, dev3 := 0.25*uEnd*uEnd, 0.385*uEnd*uEnd*uEnd
	mS, lS := float64(M)/float64(S), blockLen/float64(S)
	nl := min(S, nb)
	// Lane l's grid points sit rl[l] intervals after their interval's start.
	rl := w.rl[:nl]
	for l := range rl {
		rl[l] = float64((M+l)%S) / float64(S)
	}
	// Near the ends of the data the outer nodes would rest on the
	// linearly extended projection table: there the block uses the
	// quadratic through three exact solves inside it (first, middle and
	// last grid point) instead.
	tEnd := float64(s.nEpoch-1) * s.step
	edge := float64(s.m0+(blk-1)*blockLen)*s.dt0 < 0 || float64(s.m0+(blk+2)*blockLen)*s.dt0 > tEnd
	L := float64(max(nb-1, 1)) // edge nodes at mm = 0, L/2, L
	ta := s.t0(m0)
	edgeSolve := func(p []float64, t0 float64) float64 {
		k0 := s.nearestEpoch(t0)
		return crossing(p, k0, t0, invV, invStep, lastX)
	}
	for c := range ns {
		var c0, c1, c2, c3 float64
		if edge {
			p := w.proj[c]
			xa, xm, xb := edgeSolve(p, ta), edgeSolve(p, ta+0.5*L*s.dt0), edgeSolve(p, ta+L*s.dt0)
			// x = xa + q1·mm + q2·mm², in u = mm/blockLen.
			h := 0.5 * L
			q1 := (4*xm - 3*xa - xb) / (2 * h)
			q2 := (xa - 2*xm + xb) / (2 * h * h)
			c0, c1, c2 = xa, q1*blockLen, q2*blockLen*blockLen
		} else {
			y := nodes[c*4 : c*4+4]
			// x(u) = c0 + u·(c1 + u·(c2 + u·c3)), the cubic through the
			// nodes at u = −1, 0, 1, 2.
			c0 = y[1]
			c1 = y[2] - y[0]*third - y[1]*0.5 - y[3]*sixth
			c2 = (y[0]+y[2])*0.5 - y[1]
			c3 = (y[3]-y[0])*sixth + (y[1]-y[2])*0.5
		}
		// Lag λ(u) = x(u) − (M + mm)/S = a0 + a1·u + c2·u² + c3·u³ and its
		// range over the block, u ∈ [0, uEnd]: first a cheap bound (the
		// chord between the ends widened by the largest departure of the
		// u² and u³ terms from their chords, U²/4 and 2U³/(3√3) < 0.385·U³),
		// then, if that straddles an interval boundary, the exact range
		// from the ends and the turning points inside.
		a0 := c0 - mS
		a1 := c1 - lS
		lag := func(u float64) float64 { return a0 + u*(a1+u*(c2+u*c3)) }
		lo, hi := a0, lag(uEnd)
		if lo > hi {
			lo, hi = hi, lo
		}
		dev := math.Abs(c2)*dev2 + math.Abs(c3)*dev3
		dl := w.dl[c*maxSub : c*maxSub+nl]
		uni := !w.perElement && s.lanes(dl, rl, lo-dev, hi+dev)
		if !uni && !w.perElement && dev > 0 {
			// λ′(u) = a1 + 2c2·u + 3c3·u² = 0.
			qa, qb := 3*c3, 2*c2
			if qa == 0 {
				if qb != 0 {
					if u := -a1 / qb; u > 0 && u < uEnd {
						lo, hi = min(lo, lag(u)), max(hi, lag(u))
					}
				}
			} else if disc := qb*qb - 4*qa*a1; disc >= 0 {
				sq, inv := math.Sqrt(disc), 0.5/qa
				for _, u := range [2]float64{(-qb - sq) * inv, (-qb + sq) * inv} {
					if u > 0 && u < uEnd {
						lo, hi = min(lo, lag(u)), max(hi, lag(u))
					}
				}
			}
			uni = s.lanes(dl, rl, lo, hi)
		}
		w.uni[c] = uni
		if uni && !needCI && !keep {
			continue
		}
		ci := w.ci[c*blockLen : c*blockLen+nb]
		ph := w.ph[c*blockLen : c*blockLen+nb]
		xs := w.x[c*blockLen : c*blockLen+nb] // kept for tests only (w.keepX)
		for j, mm := range w.jmm[:nb] {
			u := float64(mm) * scale
			x := c0 + u*(c1+u*(c2+u*c3))
			if keep {
				xs[j] = x
			}
			fi := floorInt(x)
			ci[j] = int32(fi)
			if s.phased {
				ph[j] = uint8(min(int((x-float64(fi))*phaseBins), phaseBins-1))
			}
		}
	}
}

// layout fills the lane-major positions of a block of nb grid points with
// S points per interval (worker.jmm).
func (w *worker) layout(nb, S int) {
	j := 0
	nl := min(S, nb)
	for l := range nl {
		w.lane0[l] = j
		for mm := l; mm < nb; mm += S {
			w.jmm[j], w.jof[mm], w.jlane[j] = mm, j, uint8(l)
			j++
		}
	}
	w.lane0[nl] = j
	w.layoutNb = nb
}

// lanes reports whether, for a lag range [lo, hi] (intervals), every lane
// l (grid points rl[l] intervals into their interval) stays inside one
// interval with a lag inside the buffer, and if so stores each lane's lag
// ⌊rl[l] + λ⌋ in dl.
func (s *searcher) lanes(dl []int32, rl []float64, lo, hi float64) bool {
	for l, r := range rl {
		f1, f2 := floorInt(r+lo-laneEps), floorInt(r+hi+laneEps)
		if f1 != f2 || uint(f1+s.half) > uint(2*s.half) {
			return false
		}
		dl[l] = int32(f1)
	}
	return true
}

// denConstW finishes thinBlock's denominators (by position) when W and γ
// are the same over every interval the block's rows touch: per row and
// lane, the lane constants alone add one number per lane; per-element
// rows add R²W − 2RG − γ(G − RW)² at every grid point (−γG² where the row
// has no reference entry).
func (s *searcher) denConstW(w *worker, nb, rowLo, rowHi int, W, gm float64) {
	S := s.cfg.T0Substeps
	nl := min(S, nb)
	den, dlane := w.pden[:nb], w.dlane[:nl]
	for row := rowLo; row <= rowHi; row++ {
		g, r := w.bg[row*blockLen:row*blockLen+nb], w.br[row*blockLen:row*blockLen+nb]
		gl, rl := w.glane[row*maxSub:row*maxSub+nl], w.rlane[row*maxSub:row*maxSub+nl]
		dr, hr := w.dirty[row], w.refRow[row]
		w.dirty[row], w.refRow[row] = false, false
		for l := range gl {
			gc, rc := gl[l], rl[l]
			gl[l], rl[l] = 0, 0
			a, b := w.lane0[l], w.lane0[l+1]
			switch {
			case !dr:
				u := gc - rc*W
				dlane[l] += rc*rc*W - 2*rc*gc - gm*u*u
			case !hr && rc == 0:
				gs, ds := g[a:b], den[a:b]
				for j, gv := range gs {
					gb := gv + gc
					ds[j] -= gm * gb * gb
				}
				clear(gs)
			default:
				for j := a; j < b; j++ {
					gb, rb := g[j]+gc, r[j]+rc
					g[j], r[j] = 0, 0
					u := gb - rb*W
					den[j] += rb*rb*W - 2*rb*gb - gm*u*u
				}
			}
		}
	}
}

// thinElements adds one data clock's thin-wall terms (sensitivity K/τ0,
// data z and weights mw, crossing intervals ci) at the block's positions
// [a, b), one at a time, and returns the widened range of touched rows.
func (s *searcher) thinElements(w *worker, z, mw []float64, ci []int32, K float64, a, b, rowLo, rowHi int) (int, int) {
	nInt, B := s.nInt, 2*s.half+1
	num, qt, base, G := w.pnum, w.bq, w.base, w.bg
	for j := a; j < b; j++ {
		i := int(ci[j])
		if uint(i) >= uint(nInt) {
			continue
		}
		num[j] += K * z[i]
		mk := K * mw[i]
		qt[j] += mk * K
		if row := i - base[j] + s.half; uint(row) < uint(B) {
			rowLo, rowHi = min(rowLo, row), max(rowHi, row)
			w.dirty[row] = true
			G[row*blockLen+j] += mk
		}
	}
	return rowLo, rowHi
}

// axpy adds a·x to y (len(x) ≥ len(y)), four at a time.
func axpy(y, x []float64, a float64) {
	x = x[:len(y)]
	k := 0
	for ; k+4 <= len(y); k += 4 {
		yy, xx := y[k:k+4:k+4], x[k:k+4:k+4]
		yy[0] += a * xx[0]
		yy[1] += a * xx[1]
		yy[2] += a * xx[2]
		yy[3] += a * xx[3]
	}
	for ; k < len(y); k++ {
		y[k] += a * x[k]
	}
}

// floorBias makes floorInt one truncating conversion: x + floorBias > 0
// for every crossing of a valid network (|lag| ≤ R/v < 1e6 s), and its
// resolution, 2⁻²² intervals (7 µs at 30 s), is far below the solver's.
const floorBias = 1 << 30

// floorInt returns ⌊x⌋ for −2³⁰ < x < 2³⁰ (to 2⁻²²).
func floorInt(x float64) int { return int(x+floorBias) - floorBias }

// nearestEpoch returns the data epoch nearest t0 (s since the first
// epoch), clamped to the table: the first guess of the crossing solver.
func (s *searcher) nearestEpoch(t0 float64) int {
	return max(0, min(int(t0/s.step+0.5), s.nEpoch-1))
}

// t0 returns the geocentre time of grid point m, s since the first epoch.
func (s *searcher) t0(m int) float64 { return float64(s.m0+m) * s.dt0 }

// project tabulates every scan clock's projection n̂·r (m) on direction d
// at the data epochs into w.proj.
func (s *searcher) project(w *worker, d int) {
	n := s.dirs[d]
	for c := range s.nScan() {
		p, pos := w.proj[c], s.pos[c]
		for k := range p {
			r := &pos[k]
			p[k] = n[0]*r[0] + n[1]*r[1] + n[2]*r[2]
		}
	}
}

// projectPair tabulates the projections on directions d and d2 in one
// pass over the positions (the pass is limited by memory traffic): d into
// w.proj, d2 into w.proj2.
func (s *searcher) projectPair(w *worker, d, d2 int) {
	n, n2 := s.dirs[d], s.dirs[d2]
	for c := range s.nScan() {
		p, p2, pos := w.proj[c], w.proj2[c], s.pos[c]
		p2 = p2[:len(p)]
		for k := range p {
			r := &pos[k]
			p[k] = n[0]*r[0] + n[1]*r[1] + n[2]*r[2]
			p2[k] = n2[0]*r[0] + n2[1]*r[1] + n2[2]*r[2]
		}
	}
}

// scanPair scans directions d and d2 (d2 < 0: d alone).
func (s *searcher) scanPair(w *worker, d, d2 int) {
	if d2 < 0 {
		s.scanDirection(w, d)
		return
	}
	if w.proj2 == nil {
		w.proj2 = make([][]float64, len(w.proj))
		for c := range w.proj2 {
			w.proj2[c] = make([]float64, len(w.proj[c]))
		}
	}
	s.projectPair(w, d, d2)
	s.scanProjected(w, d)
	w.proj, w.proj2 = w.proj2, w.proj
	s.scanProjected(w, d2)
}

// scanDirection evaluates every template of direction d at every t0.
func (s *searcher) scanDirection(w *worker, d int) {
	s.project(w, d)
	s.scanProjected(w, d)
}

// scanProjected is scanDirection with w.proj already filled for d.
func (s *searcher) scanProjected(w *worker, d int) {
	w.resetCrossings()
	invStep := 1 / s.step
	// Blocks of t0 outside, speeds inside: the block's stretch of the
	// projections and of the whitened data stays in cache for every speed.
	for m0 := 0; m0 < s.nT0; m0 += blockLen {
		nb := min(blockLen, s.nT0-m0)
		w.blk = m0 / blockLen
		s.warm(w, m0, nb)
		for vi, v := range s.cfg.Speeds {
			invV := 1 / v
			// Interval offsets (crossing interval − t0 interval) this speed can
			// reach: |lag| ≤ R/v, plus the kernel extent.
			reach := int(math.Ceil(s.radius*invV*invStep)) + 2
			s.blockCrossings(w, m0, nb, vi, invV, !s.thinOnly[vi])
			for th := range s.cfg.Thicknesses {
				kt := &s.kern[vi][th]
				// Buffer entries this template can touch.
				blo := max(0, s.half-reach+kt.lo)
				bhi := min(2*s.half, s.half+reach+kt.lo+kt.n)
				for cl := range s.cfg.Couplings {
					id := s.templateID(d, vi, th, cl)
					if kt.thin() {
						s.thinBlock(w, cl, nb)
					} else {
						for mm := range nb {
							base := floorInt(s.t0(m0+mm) * invStep)
							num, qtot := s.accumulate(w, &s.prep.data, kt, cl, w.jof[mm], base)
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
						// Ranked by ρ² = num²/den (no square root per template).
						q := num * num / den
						if !(den > 0) || q != q {
							continue
						}
						if better(q, id, w.best[m], w.bestID[m]) {
							w.best[m], w.bestID[m] = q, id
							w.bestNum[m], w.bestDen[m] = num, den
						}
					}
				}
			}
		}
	}
}

// warm touches one value per cache line of the stretch of every clock's
// whitened data that the block from m0 can reach, and of the projections
// its crossing solves read, before they are needed. The loads are independent, so the
// memory system serves them in parallel; the solves' own loads are
// chained through the first guess and would each wait for memory (the
// per-clock arrays, ~70 streams, are too many for the hardware
// prefetchers).
func (s *searcher) warm(w *worker, m0, nb int) {
	S := s.cfg.T0Substeps
	lo := max(0, (s.m0+m0)/S-s.half)
	hi := min(s.nEpoch, (s.m0+m0+nb-1)/S+s.half+2)
	var acc float64
	// The block's new crossing node is two blocks ahead (blockCrossings);
	// its solves read the projections within the largest lag of it.
	k0 := (s.m0 + m0 + 2*blockLen) / S
	plo, phi := min(s.nEpoch, max(0, k0-s.half)), min(s.nEpoch, k0+s.half+2)
	for c := range s.nScan() {
		p := w.proj[c][plo:phi]
		for k := 0; k < len(p); k += 8 {
			acc += p[k]
		}
	}
	ser := &s.prep.data
	dhi := max(lo, min(hi, s.nInt))
	full := s.full[w.blk*ser.nd : (w.blk+1)*ser.nd]
	for c := range ser.nd {
		z := ser.zz[c][lo:dhi]
		for k := 0; k < len(z); k += 8 {
			acc += z[k]
		}
		if !full[c] { // the weights and gap counts are read too
			mw, miss := ser.mw[c][lo:dhi], ser.miss[c][lo:dhi]
			for k := 0; k < len(mw); k += 8 {
				acc += mw[k] + float64(miss[k])
			}
		}
	}
	w.sink += acc
}

// thinBlock evaluates the thin-wall template of coupling cl on the data
// series (prep.data) at the nb grid points of the block (crossings in the
// worker's table, see blockCrossings), leaving numerators and denominators
// in w.bnum, w.bden (by grid point). It works by position (lane-major,
// worker.jmm) and runs clock by clock over the block, so each clock's data
// are read in order and the block's t0 accumulate independently (no
// loop-carried dependency).
//
// For a clock in lane form the crossing interval steps by one along each
// lane and its buffer entry (row = lag in intervals + half) is fixed. When
// the lane's intervals are all inside the data and present, its weight is
// the clock's constant m = 1/σ², so its Q sum and its share of row G are
// one number per lane (w.qlane, w.glane) and only the numerator is summed
// per grid point: one contiguous multiply-add per clock and t0. Other
// clocks are split into runs of one lag within each lane, summed the same
// way, with Q and G per grid point.
func (s *searcher) thinBlock(w *worker, cl, nb int) {
	ser := &s.prep.data
	nInt := s.nInt
	B := 2*s.half + 1
	S := s.cfg.T0Substeps
	kg := s.kg[cl]
	num, qt := w.pnum[:nb], w.bq[:nb]
	base := w.base[:nb]
	lane0 := w.lane0
	G, R := w.bg, w.br
	clear(num)
	clear(qt)
	nl := min(S, nb)
	qlane := w.qlane[:nl]
	clear(qlane)
	rowLo, rowHi := B, -1
	dirty := w.dirty
	// full[c]: clock c is present over every interval the block can reach.
	full := s.full[w.blk*ser.nd : (w.blk+1)*ser.nd]
	for c := range ser.nd {
		K := kg[c]
		if K == 0 {
			continue
		}
		z, mw := ser.zz[c], ser.mw[c]
		miss, wK := ser.miss[c], K*ser.wc[c]
		if w.uni[c] {
			full := full[c]
			for l, d := range w.dl[c*maxSub : c*maxSub+nl] {
				row := int(d) + s.half // inside the buffer (blockCrossings)
				rowLo, rowHi = min(rowLo, row), max(rowHi, row)
				// Lane l: positions [a, b), intervals i, i + 1, ….
				a, b := lane0[l], lane0[l+1]
				n := b - a
				i := base[a] + int(d)
				if full || i >= 0 && i+n <= nInt && miss[i+n] == miss[i] {
					// Complete lane: constant weight.
					qlane[l] += wK * K
					w.glane[row*maxSub+l] += wK
					axpy(num[a:b], z[i:i+n], K)
					continue
				}
				dirty[row] = true
				g := G[row*blockLen : row*blockLen+nb]
				j := a
				if i < 0 { // skip to the first interval inside the data
					j += -i
					i = 0
				}
				for ; j < b && i < nInt; j, i = j+1, i+1 {
					num[j] += K * z[i]
					mk := K * mw[i]
					qt[j] += mk * K
					g[j] += mk
				}
			}
			continue
		}
		// Runs of one lag within each lane: contiguous sums, constant
		// weight where the run's intervals are all present.
		ci := w.ci[c*blockLen : c*blockLen+nb]
		for l := range nl {
			end := lane0[l+1]
			for a := lane0[l]; a < end; {
				i0 := int(ci[a])
				d := i0 - base[a]
				b := a + 1
				for b < end && int(ci[b])-base[b] == d {
					b++
				}
				n, row := b-a, d+s.half
				if i0 >= 0 && i0+n <= nInt && uint(row) < uint(B) {
					rowLo, rowHi = min(rowLo, row), max(rowHi, row)
					dirty[row] = true
					axpy(num[a:b], z[i0:i0+n], K)
					g := G[row*blockLen+a : row*blockLen+b]
					if miss[i0+n] == miss[i0] {
						q := wK * K
						for k := range g {
							qt[a+k] += q
							g[k] += wK
						}
					} else {
						for k, m := range mw[i0 : i0+n] {
							mk := K * m
							qt[a+k] += mk * K
							g[k] += mk
						}
					}
				} else {
					rowLo, rowHi = s.thinElements(w, z, mw, ci, K, a, b, rowLo, rowHi)
				}
				a = b
			}
		}
	}
	if s.hasRef {
		c := s.nData
		if K := kg[c]; K != 0 {
			if w.uni[c] {
				for l, d := range w.dl[c*maxSub : c*maxSub+nl] {
					row := int(d) + s.half
					rowLo, rowHi = min(rowLo, row), max(rowHi, row)
					a, b := lane0[l], lane0[l+1]
					n := b - a
					i := base[a] + int(d)
					if i >= 0 && i+n <= nInt {
						w.rlane[row*maxSub+l] += K
						axpy(num[a:b], ser.zr[i:i+n], K)
						continue
					}
					dirty[row], w.refRow[row] = true, true
					r := R[row*blockLen : row*blockLen+nb]
					j := a
					if i < 0 {
						j += -i
						i = 0
					}
					for ; j < b && i < nInt; j, i = j+1, i+1 {
						num[j] += K * ser.zr[i]
						r[j] += K
					}
				}
			} else {
				ci := w.ci[c*blockLen : c*blockLen+nb]
				for j, i32 := range ci {
					i := int(i32)
					if row := i - base[j] + s.half; uint(i) < uint(nInt) && uint(row) < uint(B) {
						rowLo, rowHi = min(rowLo, row), max(rowHi, row)
						dirty[row], w.refRow[row] = true, true
						num[j] += K * ser.zr[i]
						R[row*blockLen+j] += K
					}
				}
			}
		}
	}
	// Per interval e = base − half + row, with u_j = g_j − g_r over the
	// present clocks (Sherman–Morrison): Σ_j m_j u_j² − γ(Σ_j m_j u_j)² =
	// Q − 2RG + R²W − γ(G − RW)², the Q terms summing to qt. G and R are
	// the per-element rows plus the lane constants; untouched entries are
	// zero and add nothing. A row with lane constants only, over intervals
	// of one W and γ, adds one number per lane (dlane).
	den := w.pden[:nb]
	for l := range nl {
		for j := lane0[l]; j < lane0[l+1]; j++ {
			den[j] = qt[j] + qlane[l]
		}
	}
	dlane := w.dlane[:nl]
	clear(dlane)
	pr := s.prep
	// Most blocks see one W and γ over every interval they touch (no clock
	// has a gap there): the rows then take a loop without per-interval
	// look-ups. The block's intervals run from base[0] (lane 0's first) to
	// the base of its last grid point.
	if rowLo <= rowHi {
		eLo, eHi := base[0]-s.half+rowLo, base[w.jof[nb-1]]-s.half+rowHi
		if eLo >= 0 && eHi < nInt && pr.wrun[eLo] == pr.wrun[eHi] {
			s.denConstW(w, nb, rowLo, rowHi, pr.w[eLo], pr.gamma[eLo])
			s.thinOut(w, nb)
			return
		}
	}
	for row := rowLo; row <= rowHi; row++ {
		g, r := G[row*blockLen:row*blockLen+nb], R[row*blockLen:row*blockLen+nb]
		gl, rl := w.glane[row*maxSub:row*maxSub+nl], w.rlane[row*maxSub:row*maxSub+nl]
		dr := dirty[row]
		dirty[row], w.refRow[row] = false, false
		for l := range gl {
			gc, rc := gl[l], rl[l]
			gl[l], rl[l] = 0, 0
			a, b := lane0[l], lane0[l+1]
			if !dr {
				if gc == 0 && rc == 0 {
					continue
				}
				e0, e1 := base[a]-s.half+row, base[b-1]-s.half+row
				if e0 >= 0 && e1 < nInt && pr.wrun[e0] == pr.wrun[e1] {
					W := pr.w[e0]
					u := gc - rc*W
					dlane[l] += rc*rc*W - 2*rc*gc - pr.gamma[e0]*u*u
					continue
				}
			}
			for j := a; j < b; j++ {
				gb, rb := g[j]+gc, r[j]+rc
				if gb == 0 && rb == 0 {
					continue
				}
				g[j], r[j] = 0, 0
				e := base[j] - s.half + row
				if uint(e) >= uint(nInt) {
					continue
				}
				W := pr.w[e]
				u := gb - rb*W
				den[j] += rb*rb*W - 2*rb*gb - pr.gamma[e]*u*u
			}
		}
	}
	s.thinOut(w, nb)
}

// thinOut adds the lane terms to thinBlock's denominators and writes the
// numerators and denominators by grid point into w.bnum, w.bden.
func (s *searcher) thinOut(w *worker, nb int) {
	num, den := w.pnum[:nb], w.pden[:nb]
	for j, mm := range w.jmm[:nb] {
		w.bnum[mm] = num[j]
		w.bden[mm] = den[j] + w.dlane[w.jlane[j]]
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
	invStep, invV := 1/s.step, 1/s.cfg.Speeds[vi]
	lastX := float64(s.nEpoch-1) - 1e-9
	t0 := s.t0(m)
	k0 := s.nearestEpoch(t0)
	s.project(w, d)
	for c := range s.nScan() {
		x := crossing(w.proj[c], k0, t0, invV, invStep, lastX)
		fi := floorInt(x)
		w.ci[c*blockLen] = int32(fi)
		w.ph[c*blockLen] = uint8(min(int((x-float64(fi))*phaseBins), phaseBins-1))
	}
	base := floorInt(t0 * invStep)
	kt := &s.kern[vi][th]
	num, qtot := s.accumulate(w, ser, kt, cl, 0, base)
	return num, s.denominator(w, base, 0, 2*s.half, qtot)
}

// sweepFit splits template (direction d, speed vi, thickness th, coupling
// cl) at grid point m into its clock-by-clock part u_o (each data clock's
// own kernel) and its reference part u_r (the reference's kernel, with
// opposite sign in every present series) and fits both amplitudes jointly
// on ser by weighted least squares under C: with N_ab = u_aᵀC⁻¹u_b and
// b_a = u_aᵀC⁻¹y, â = N⁻¹b, and χ² = (â_o − â_r)²/([1, −1]N⁻¹[1, −1]ᵀ).
// Per interval e, with Q = Σ m_j g_j², G = Σ m_j g_j over the present
// clocks and R the reference kernel (Sherman–Morrison, as in the scan):
// N_oo = Σ Q − γG², N_or = −Σ R·G·(1 − γW), N_rr = Σ R²·(W − γW²); their
// sum is the scan's denominator. It returns NaNs when either part is
// empty or the system is singular.
func (s *searcher) sweepFit(w *worker, ser *series, d, vi, th, cl, m int) (own, ref, chi2 float64) {
	nan := math.NaN()
	if !s.hasRef {
		return nan, nan, nan
	}
	invStep, invV := 1/s.step, 1/s.cfg.Speeds[vi]
	lastX := float64(s.nEpoch-1) - 1e-9
	t0 := s.t0(m)
	k0 := s.nearestEpoch(t0)
	kt := &s.kern[vi][th]
	kc := s.k[cl]
	type sums struct{ q, g, r float64 }
	per := map[int]*sums{}
	at := func(e int) *sums {
		a := per[e]
		if a == nil {
			a = &sums{}
			per[e] = a
		}
		return a
	}
	var bo, br float64
	s.project(w, d)
	for c := range s.nScan() {
		K := kc[c]
		if K == 0 {
			continue
		}
		x := crossing(w.proj[c], k0, t0, invV, invStep, lastX)
		fi := floorInt(x)
		ph := 0
		if kt.phase > 1 {
			ph = min(int((x-float64(fi))*phaseBins), phaseBins-1)
		}
		row := kt.vals[ph*kt.n : (ph+1)*kt.n]
		for j, gv := range row {
			e := fi + kt.lo + j
			if uint(e) >= uint(s.nInt) {
				continue
			}
			g := K * gv
			if c == s.nData { // the reference
				br += g * ser.zr[e]
				at(e).r += g
				continue
			}
			mw := ser.zm[e*ser.nd+c].m
			if mw == 0 {
				continue
			}
			bo += g * ser.zm[e*ser.nd+c].z
			a := at(e)
			a.q += mw * g * g
			a.g += mw * g
		}
	}
	var noo, nor, nrr float64
	es := make([]int, 0, len(per))
	for e := range per {
		es = append(es, e)
	}
	slices.Sort(es) // a fixed order of summation: the same bits every run
	for _, e := range es {
		a := per[e]
		W, gm := s.prep.w[e], s.prep.gamma[e]
		noo += a.q - gm*a.g*a.g
		nor -= a.r * a.g * (1 - gm*W)
		nrr += a.r * a.r * (W - gm*W*W)
	}
	det := noo*nrr - nor*nor
	if !(noo > 0) || !(nrr > 0) || !(det > 1e-12*noo*nrr) {
		return nan, nan, nan
	}
	// N⁻¹ = [nrr, −nor; −nor, noo]/det.
	own = (nrr*bo - nor*br) / det
	ref = (noo*br - nor*bo) / det
	v := (nrr + 2*nor + noo) / det
	return own, ref, (own - ref) * (own - ref) / v
}

// accumulate adds every scan clock's template (kernel kt, coupling cl) at
// block position mm into the worker's interval buffers and returns the
// numerator uᵀC⁻¹y. base is the interval of t0.
func (s *searcher) accumulate(w *worker, ser *series, kt *kernelTable, cl, mm, base int) (num, qtot float64) {
	nInt := s.nInt
	off := s.half - base
	g := w.g
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
	// Jobs are pairs of directions (projectPair reads the positions once
	// for both); a lone last direction goes alone.
	jobs := make(chan [2]int)
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
			for j := range jobs {
				s.scanPair(w, j[0], j[1])
				if s.cfg.Progress != nil {
					mu.Lock()
					for _, d := range j {
						if d >= 0 {
							done++
							s.cfg.Progress(done, len(s.dirs))
						}
					}
					mu.Unlock()
				}
			}
		}()
	}
	for d := 0; d < len(s.dirs); d += 2 {
		j := [2]int{d, -1}
		if d+1 < len(s.dirs) {
			j[1] = d + 1
		}
		jobs <- j
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

package inject

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// linkWall returns an IndexWall with n − 1 = eta·s(u) for a wall with
// normal n (normalised here), speed v (m/s), thickness d (m), passing the
// geocentre at t0 (s).
func linkWall(p Profile, n [3]float64, v, d, t0, eta float64) IndexWall {
	l := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
	w := Wall{ID: 7, T0: t0, N: [3]float64{n[0] / l, n[1] / l, n[2] / l}, Speed: v, Thickness: d,
		Profile: p, A2: 1, Coupling: Coupling{Mode: CouplingEff, LambdaEff: 1e12}}
	return IndexWall{Wall: w, Model: IndexModel{Name: IndexUser, Coefficient: 1}, Eta: eta}
}

// linkQuadrature integrates (1/c)∫(n − 1) dl numerically along the straight
// path from (re, te) to (rr, tr), evaluating n − 1 at each space-time point
// of the path (IndexAt), with composite Gauss–Legendre panels (gonum quad)
// whose breaks follow the wall coordinate u and include the top-hat edges.
func linkQuadrature(iw *IndexWall, re [3]float64, te float64, rr [3]float64, tr float64) float64 {
	var dr [3]float64
	for i := range dr {
		dr[i] = rr[i] - re[i]
	}
	L := math.Sqrt(dr[0]*dr[0] + dr[1]*dr[1] + dr[2]*dr[2])
	at := func(lam float64) ([3]float64, float64) {
		return [3]float64{re[0] + lam*dr[0], re[1] + lam*dr[1], re[2] + lam*dr[2]}, te + lam*(tr-te)
	}
	f := func(lam float64) float64 { r, t := at(lam); return iw.IndexAt(r, t) }
	// u(λ) is linear: find λ for the breaks.
	d := iw.Wall.Thickness
	re0, te0 := at(0)
	re1, te1 := at(1)
	u0, u1 := -iw.ahead(re0, te0)/d, -iw.ahead(re1, te1)/d
	breaks := []float64{0, 1}
	if u1 != u0 {
		for k := -800; k <= 800; k++ {
			u := 0.05 * float64(k)
			lam := (u - u0) / (u1 - u0)
			if lam > 0 && lam < 1 {
				breaks = append(breaks, lam)
			}
		}
		for _, u := range []float64{-0.5, 0.5} { // top-hat edges exactly
			lam := (u - u0) / (u1 - u0)
			if lam > 0 && lam < 1 {
				breaks = append(breaks, lam)
			}
		}
	}
	lkSort(breaks)
	sum := 0.0
	for i := 1; i < len(breaks); i++ {
		a, b := breaks[i-1], breaks[i]
		if b-a < 1e-15 {
			continue
		}
		// 8 sub-panels of 20 nodes each
		for j := range 8 {
			pa, pb := a+(b-a)*float64(j)/8, a+(b-a)*float64(j+1)/8
			sum += quad.Fixed(f, pa, pb, 20, quad.Legendre{}, 0)
		}
	}
	return L / SpeedOfLight * sum
}

func lkSort(x []float64) {
	for i := 1; i < len(x); i++ {
		for j := i; j > 0 && x[j] < x[j-1]; j-- {
			x[j], x[j-1] = x[j-1], x[j]
		}
	}
}

// TestLinkDelayQuadrature: the closed-form delay equals numerical quadrature
// of (n − 1) along the path to 1e-9 relative for every profile, with the
// wall between the ends, over the emitter, over the receiver, covering both,
// beyond both, nearly parallel to the link, and moving at 300 km/s.
func TestLinkDelayQuadrature(t *testing.T) {
	// A GPS-like link: satellite at 26 560 km, station on the surface.
	sat := [3]float64{15.3e6, -3.1e6, 21.2e6}
	sta := [3]float64{4.33e6, 0.57e6, 4.63e6}
	tr := 1000.0
	te := tr - lkDist(sat, sta)/SpeedOfLight
	los := lkUnit(lkSub(sta, sat))
	mid := [3]float64{0.5 * (sat[0] + sta[0]), 0.5 * (sat[1] + sta[1]), 0.5 * (sat[2] + sta[2])}
	n := lkUnit([3]float64{0.3, 0.5, 0.81})
	// t0 that puts the centre plane at point q at time tm for speed v.
	t0At := func(q [3]float64, tm, v float64) float64 { return tm - lkDot(n, q)/v }
	tm := 0.5 * (te + tr)
	cases := []struct {
		name  string
		d, v  float64
		where [3]float64 // point the centre plane passes at time tm
	}{
		{"between", 2e6, 3e5, mid},
		{"over-emitter", 2e6, 3e5, sat},
		{"over-receiver", 2e6, 3e5, sta},
		{"covers-both", 6e7, 3e5, mid},
		{"beyond-receiver", 2e6, 3e5, lkAdd(sta, lkScale(n, 3e6))},
		{"beyond-emitter", 2e6, 3e5, lkAdd(sat, lkScale(n, -2.5e6))},
		{"thin-between", 1e4, 3e5, mid},
		{"slow", 2e6, 1e-3, mid},
		{"fast", 2e6, 7e5, sat},
	}
	compared := 0
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat, ProfileKinkLinear} {
		for _, c := range cases {
			iw := linkWall(p, n, c.v, c.d, t0At(c.where, tm, c.v), 1e-17)
			got := iw.Link(sat, te, sta, tr)
			want := linkQuadrature(&iw, sat, te, sta, tr)
			if want == 0 {
				continue
			}
			compared++
			if !scalar.EqualWithinRel(got.Delay, want, 1e-9) {
				t.Errorf("%s/%s: closed-form delay %.12e s, quadrature %.12e s (rel %.2e)",
					p, c.name, got.Delay, want, math.Abs(got.Delay/want-1))
			}
			if !scalar.EqualWithinAbs(got.CosIncidence, lkDot(los, n), 1e-15) {
				t.Errorf("%s/%s: cos_incidence %v, want %v", p, c.name, got.CosIncidence, lkDot(los, n))
			}
		}
	}
	if compared < 32 {
		t.Errorf("only %d of 36 cases had a non-zero delay to compare", compared)
	}
	// Nearly parallel link: the wall normal almost perpendicular to the line
	// of sight, so u hardly changes along the path (quadrature branch).
	perp := lkUnit(lkCross(los, [3]float64{0, 0, 1}))
	nPar := lkUnit(lkAdd(perp, lkScale(los, 1e-6)))
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileKinkLinear, ProfileTopHat} {
		w := linkWall(p, nPar, 1e-3, 2e6, 0, 1e-17)
		// put the centre plane 0.3 d from the path at tm
		w.Wall.T0 = tm - (lkDot(nPar, mid)-0.3*2e6)/1e-3
		got := w.Link(sat, te, sta, tr)
		want := linkQuadrature(&w, sat, te, sta, tr)
		if !scalar.EqualWithinRel(got.Delay, want, 1e-9) {
			t.Errorf("%s/parallel: closed-form delay %.12e s, quadrature %.12e s", p, got.Delay, want)
		}
	}
}

// TestThinWallPeakDelay: a wall much thinner than the link, centred on the
// middle of the link, gives peak(n−1)·C_p·d/(c·|cos_incidence|) with C_p the
// profile area of physics.md §1.1 (√π Gaussian, 2 kink, 1 top-hat); for a
// moving wall cos_incidence is replaced by cos_incidence − v/c.
func TestThinWallPeakDelay(t *testing.T) {
	sat := [3]float64{-7.0e6, -21.0e6, -14.6e6}
	sta := [3]float64{-1.3e6, -4.7e6, -4.1e6}
	tr := 5000.0
	te := tr - lkDist(sat, sta)/SpeedOfLight
	tm := 0.5 * (te + tr)
	mid := [3]float64{0.5 * (sat[0] + sta[0]), 0.5 * (sat[1] + sta[1]), 0.5 * (sat[2] + sta[2])}
	n := lkUnit([3]float64{-0.2, -0.9, -0.1})
	cp := map[Profile]float64{ProfileGaussian: math.Sqrt(math.Pi), ProfileKink: 2, ProfileTopHat: 1}
	for _, p := range []Profile{ProfileGaussian, ProfileKink, ProfileTopHat} {
		for _, v := range []float64{1e-6, 3e5} {
			d := 100.0 // m, against a ~20 000 km link
			iw := linkWall(p, n, v, d, tm-lkDot(n, mid)/v, 3e-17)
			got := iw.Link(sat, te, sta, tr)
			cosEff := got.CosIncidence - v/SpeedOfLight
			want := iw.PeakIndex() * cp[p] * d / (SpeedOfLight * math.Abs(cosEff))
			if !scalar.EqualWithinRel(got.Delay, want, 1e-12) {
				t.Errorf("%s v=%g m/s: thin-wall delay %.15e s, want %.15e s", p, v, got.Delay, want)
			}
		}
	}
}

// TestLinkBendingRayTrace checks the second-order bending terms against an
// exact ray trace through a static planar Gaussian layer (Snell's law
// n(z)·sin θ(z) = p, with p solved for the fixed end points by Newton's
// method; optical path ∫n²/√(n²−p²) dz; Born & Wolf ch. 3). ε is made large
// (1e-4) so that the second-order term is far above rounding; the
// expansion's relative error is then O(ε·tan²θ).
func TestLinkBendingRayTrace(t *testing.T) {
	const eta = 1e-4
	d := 1e6
	for _, c := range []struct {
		name   string
		theta  float64 // incidence angle, rad
		ze, zr float64 // end points along the normal, m
	}{
		{"wall-between-30deg", 30 * math.Pi / 180, -5e6, 4e6},
		{"receiver-inside-50deg", 50 * math.Pi / 180, -6e6, 0.3e6},
		{"emitter-inside-60deg", 60 * math.Pi / 180, -0.5e6, 7e6},
	} {
		iw := linkWall(ProfileGaussian, [3]float64{0, 0, 1}, 1e-9, d, 0, eta)
		Z := c.zr - c.ze
		R := Z * math.Tan(c.theta)
		re := [3]float64{0, 0, c.ze}
		rr := [3]float64{R, 0, c.zr}
		got := iw.Link(re, 0, rr, 0)

		nOf := func(z float64) float64 { return 1 + eta*math.Exp(-z*z/(d*d)) }
		integ := func(g func(z float64) float64) float64 {
			s := 0.0
			const panels = 400
			for j := range panels {
				a := c.ze + Z*float64(j)/panels
				b := c.ze + Z*float64(j+1)/panels
				s += quad.Fixed(g, a, b, 20, quad.Legendre{}, 0)
			}
			return s
		}
		// Newton on p: ∫ p/√(n²−p²) dz = R.
		p := math.Sin(c.theta)
		for range 30 {
			f := integ(func(z float64) float64 { n := nOf(z); return p / math.Sqrt(n*n-p*p) }) - R
			df := integ(func(z float64) float64 { n := nOf(z); q := n*n - p*p; return n * n / (q * math.Sqrt(q)) })
			dp := f / df
			p -= dp
			if math.Abs(dp) < 1e-17 {
				break
			}
		}
		c0 := math.Cos(c.theta)
		// optical path of the ray minus that of the straight line, pointwise.
		excess := integ(func(z float64) float64 {
			n := nOf(z)
			return n*n/math.Sqrt(n*n-p*p) - n/c0
		})
		wantBend := excess / SpeedOfLight
		if !scalar.EqualWithinRel(got.Bending, wantBend, 3e-3) {
			t.Errorf("%s: bending %.6e s, ray trace %.6e s", c.name, got.Bending, wantBend)
		}
		if !(got.Bending < 0) {
			t.Errorf("%s: bending %g s should be negative (Fermat)", c.name, got.Bending)
		}
		thetaR := math.Asin(p / nOf(c.zr))
		if !scalar.EqualWithinRel(got.DirectionChange, thetaR-c.theta, 3e-3) {
			t.Errorf("%s: direction change %.6e rad, ray trace %.6e rad", c.name, got.DirectionChange, thetaR-c.theta)
		}
	}
}

// TestIndexModels: the named parametrizations of physics.md §6.
func TestIndexModels(t *testing.T) {
	for _, c := range []struct {
		name string
		user float64
		want IndexModel
		ok   bool
	}{
		{"permittivity", 0, IndexModel{IndexPermittivity, -0.5}, true}, // n − 1 ≈ −½·δα/α
		{"Lorentz", 0, IndexModel{IndexLorentz, 0}, true},              // n = 1
		{"user", 0.25, IndexModel{IndexUser, 0.25}, true},
		{"user", math.NaN(), IndexModel{}, false},
		{"permittivity", 1, IndexModel{}, false},
		{"vacuum", 0, IndexModel{}, false},
	} {
		got, err := NewIndexModel(c.name, c.user)
		if (err == nil) != c.ok || (c.ok && got != c.want) {
			t.Errorf("NewIndexModel(%q, %g) = %+v, %v; want %+v ok=%v", c.name, c.user, got, err, c.want, c.ok)
		}
	}
	// Per-constant coupling to α: δα/α = −A²/Λ_α² at the peak of a Gaussian
	// with a negative sign; permittivity-only gives n − 1 = +½·A²/Λ_α².
	w := Wall{ID: 1, T0: 0, N: [3]float64{1, 0, 0}, Speed: 3e5, Thickness: 1e7, Profile: ProfileGaussian, A2: 7.47e9,
		Coupling: Coupling{Mode: CouplingPerConstant, Alpha: ConstantCoupling{Lambda: 1e13, Negative: true},
			Convention: ConventionR}}
	m, _ := NewIndexModel("permittivity", 0)
	iw, err := NewIndexWall(w, m)
	if err != nil {
		t.Fatal(err)
	}
	if want := 0.5 * 7.47e9 / 1e26; !scalar.EqualWithinRel(iw.PeakIndex(), want, 1e-14) {
		t.Errorf("peak index %g, want %g", iw.PeakIndex(), want)
	}
	m0, _ := NewIndexModel("lorentz", 0)
	iw0, _ := NewIndexWall(w, m0)
	if d := iw0.Link([3]float64{2e7, 0, 0}, 0, [3]float64{6.4e6, 0, 0}, 0.05); d.Delay != 0 {
		t.Errorf("Lorentz-invariant coupling gave delay %g s, want 0", d.Delay)
	}
	// Only m_e coupled: no change of α, no delay.
	w.Coupling = Coupling{Mode: CouplingPerConstant, Me: ConstantCoupling{Lambda: 1e13}, Convention: ConventionR}
	if g, err := AlphaScale(&w); err != nil || g != 0 {
		t.Errorf("AlphaScale with α uncoupled = %g, %v; want 0", g, err)
	}
}

// FuzzLink: any geometry gives a finite delay bounded by max|n−1|·L/c, never a panic.
func FuzzLink(f *testing.F) {
	f.Add(1e7, 2e7, 3e6, 0.1, 4e6, 5e6, 0.0, 0.07, 1e6, 3e5, 0.2, 0)
	f.Add(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 1.0, 1.0, 1.0, 3)
	f.Fuzz(func(t *testing.T, ex, ey, ez, rx, ry, rz, te, tr, d, v, t0 float64, prof int) {
		p := Profile(1 + (prof%4+4)%4)
		iw := linkWall(p, [3]float64{0.6, 0.0, 0.8}, v, d, t0, 1e-17)
		if iw.Wall.Validate() != nil {
			return
		}
		re, rr := [3]float64{ex, ey, ez}, [3]float64{rx, ry, rz}
		for _, x := range []float64{ex, ey, ez, rx, ry, rz, te, tr} {
			if math.IsNaN(x) || math.IsInf(x, 0) || math.Abs(x) > 1e12 {
				return
			}
		}
		got := iw.Link(re, te, rr, tr)
		bound := 2e-17 * got.Length / SpeedOfLight * (1 + 1e-12)
		if math.IsNaN(got.Delay) || math.Abs(got.Delay) > bound {
			t.Fatalf("delay %g s outside [−%g, %g] s", got.Delay, bound, bound)
		}
	})
}

// ExampleIndexWall_Link: a 100 km Gaussian wall (n − 1 = 1e-17 at its
// centre) crossing a 20 000 km link at right angles gives
// √π·1e-17·1e5 m / c ≈ 5.9e-21 s.
func ExampleIndexWall_Link() {
	w := Wall{ID: 1, T0: 0, N: [3]float64{0, 0, 1}, Speed: 1e-6, Thickness: 1e5, Profile: ProfileGaussian,
		A2: 1, Coupling: Coupling{Mode: CouplingEff, LambdaEff: 1}}
	iw := IndexWall{Wall: w, Eta: 1e-17}
	d := iw.Link([3]float64{0, 0, 2e7}, 0, [3]float64{0, 0, -6.4e6}, 0.088)
	fmt.Printf("delay %.3e s, cos_incidence %.0f\n", d.Delay, d.CosIncidence)
	// Output: delay 5.912e-21 s, cos_incidence -1
}

// TestLightTimeLinearMotion checks the iteration against the closed-form
// solution for a satellite in uniform straight motion and a fixed receiver:
// |D + v·τ| = c·τ with D = r − s0 − v·tr is a quadratic in τ.
func TestLightTimeLinearMotion(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for i := range 50 {
		s0 := [3]float64{rng.NormFloat64() * 2e7, rng.NormFloat64() * 2e7, rng.NormFloat64() * 2e7}
		v := [3]float64{rng.NormFloat64() * 4e3, rng.NormFloat64() * 4e3, rng.NormFloat64() * 4e3}
		r := [3]float64{rng.NormFloat64() * 4e6, rng.NormFloat64() * 4e6, rng.NormFloat64() * 4e6}
		tr := 86400 * rng.Float64()
		sat := func(t float64) [3]float64 { return lkAdd(s0, lkScale(v, t)) }
		rcv := func(float64) [3]float64 { return r }
		got, err := LightTime(sat, rcv, tr)
		if err != nil {
			t.Fatal(err)
		}
		D := lkSub(lkSub(r, s0), lkScale(v, tr))
		a := lkDot(v, v) - SpeedOfLight*SpeedOfLight
		b := 2 * lkDot(D, v)
		cc := lkDot(D, D)
		// positive root of a τ² + b τ + c = 0 (a < 0), in the cancellation-free form
		q := -0.5 * (b - math.Sqrt(b*b-4*a*cc))
		want := cc / q
		if !scalar.EqualWithinRel(got, want, 1e-15) {
			t.Errorf("case %d: flight time %.17g s, closed form %.17g s", i, got, want)
		}
	}
}

// TestLightTimeEarthFixed: the Earth-fixed solution with the Ω̇e·τ rotation
// (gnss.md §1.1) agrees with the inertial solution, and the range change it
// makes matches the first-order Sagnac term ω·(x_s·y_r − y_s·x_r)/c
// (Ashby, "Relativity in the Global Positioning System", Living Rev.
// Relativity 6 (2003) 1, §2; from memory).
func TestLightTimeEarthFixed(t *testing.T) {
	const omega = 7.2921151467e-5 // rad/s, WGS 84 / IS-GPS-200 (gnss.md §1.1)
	const theta0 = 1.234          // Earth rotation angle at t = 0, rad
	rng := rand.New(rand.NewPCG(3, 5))
	for i := range 40 {
		a := 26.56e6
		inc, node, u0 := 0.96, rng.Float64()*2*math.Pi, rng.Float64()*2*math.Pi
		nmean := math.Sqrt(3.986005e14 / (a * a * a))
		satCel := func(t float64) [3]float64 {
			s, c := math.Sincos(u0 + nmean*t)
			so, co := math.Sincos(node)
			si, ci := math.Sincos(inc)
			return [3]float64{a * (c*co - s*ci*so), a * (c*so + s*ci*co), a * s * si}
		}
		lat, lon := (rng.Float64()-0.5)*math.Pi, rng.Float64()*2*math.Pi
		sl, cl := math.Sincos(lat)
		so, co := math.Sincos(lon)
		sta := [3]float64{6.37e6 * cl * co, 6.37e6 * cl * so, 6.37e6 * sl}
		era := func(t float64) float64 { return theta0 + omega*t }
		satECEF := func(t float64) [3]float64 { return rotateZ(satCel(t), era(t)) }
		staCel := func(t float64) [3]float64 { return rotateZ(sta, -era(t)) }
		staECEF := func(float64) [3]float64 { return sta }
		tr := 3600 + 100*float64(i)
		tauCel, err := LightTime(satCel, staCel, tr)
		if err != nil {
			t.Fatal(err)
		}
		tauFix, srot, err := LightTimeEarthFixed(satECEF, staECEF, tr, omega)
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinAbs(tauFix, tauCel, 2e-16) {
			t.Errorf("case %d: Earth-fixed flight time %.17g s, inertial %.17g s", i, tauFix, tauCel)
		}
		tauNoRot, s0, _ := LightTimeEarthFixed(satECEF, staECEF, tr, 0)
		sagnac := omega * (s0[0]*sta[1] - s0[1]*sta[0]) / SpeedOfLight
		if got := (tauFix - tauNoRot) * SpeedOfLight; !scalar.EqualWithinAbs(got, sagnac, 2e-3) {
			t.Errorf("case %d: Earth-rotation range term %.4f m, Sagnac formula %.4f m", i, got, sagnac)
		}
		_ = srot
	}
	if _, err := LightTime(nil, nil, 0); err == nil {
		t.Error("nil trajectories accepted")
	}
	bad := func(float64) [3]float64 { return [3]float64{math.NaN(), 0, 0} }
	if _, err := LightTime(bad, bad, 0); err == nil {
		t.Error("NaN trajectory accepted")
	}
}

func lkDist(a, b [3]float64) float64   { d := lkSub(a, b); return math.Sqrt(lkDot(d, d)) }
func lkSub(a, b [3]float64) [3]float64 { return [3]float64{a[0] - b[0], a[1] - b[1], a[2] - b[2]} }
func lkAdd(a, b [3]float64) [3]float64 { return [3]float64{a[0] + b[0], a[1] + b[1], a[2] + b[2]} }
func lkScale(a [3]float64, k float64) [3]float64 {
	return [3]float64{k * a[0], k * a[1], k * a[2]}
}
func lkDot(a, b [3]float64) float64  { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }
func lkUnit(a [3]float64) [3]float64 { return lkScale(a, 1/math.Sqrt(lkDot(a, a))) }
func lkCross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

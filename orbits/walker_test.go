package orbits

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestWalkerGPS(t *testing.T) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	cfg := GPSWalkerConfig(ep)
	cfg.NoJ2 = true // the speed check below is for a pure Kepler orbit
	ks, err := Walker(cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(ks) != 24 {
		t.Fatalf("got %d satellites, want 24", len(ks))
	}
	seen := map[SatID]bool{}
	for _, k := range ks {
		if seen[k.ID] {
			t.Fatalf("duplicate id %s", k.ID)
		}
		seen[k.ID] = true
	}
	// Circular orbit: |r| = a at any epoch, also a year later (unlimited fit).
	for _, dt := range []float64{0, 3600, 86400 * 365} {
		for _, k := range ks {
			p, v, err := k.PosVel(ep.Add(dt))
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinAbs(norm(p), GPSWalkerA, 1e-4) {
				t.Fatalf("%s at +%g s: |r| = %.4f m, want %.1f m", k.ID, dt, norm(p), GPSWalkerA)
			}
			// Inertial speed √(μ/a) = 3873.9 m/s for a = 26 559.7 km (vis-viva).
			vi := [3]float64{v[0] - OmegaEGPS*p[1], v[1] + OmegaEGPS*p[0], v[2]}
			if !scalar.EqualWithinAbs(norm(vi), math.Sqrt(MuGPS/GPSWalkerA), 1e-6) {
				t.Fatalf("%s: inertial speed %.6f m/s", k.ID, norm(vi))
			}
			if math.Abs(p[2]) > GPSWalkerA*math.Sin(55*math.Pi/180)+1e-3 {
				t.Fatalf("%s: |z| %.0f m exceeds a·sin i", k.ID, p[2])
			}
		}
	}
	// Orbital period for a = 26 560 km is 11.966 h (../shared/reference/gnss.md
	// §5.3 [run]); after one period the inertial position (ECEF rotated back by
	// Ω̇e·T) repeats up to the slow J2 node drift (−0.039°/day ⇒ < 10 km).
	k := ks[0]
	T := 2 * math.Pi / math.Sqrt(MuGPS/math.Pow(GPSWalkerA, 3))
	if !scalar.EqualWithinAbs(T/3600, 11.966, 0.001) {
		t.Errorf("period %.4f h, want 11.966 h", T/3600)
	}
	p0 := k.Pos(ep)
	p1 := k.Pos(ep.Add(T))
	th := OmegaEGPS * T
	s, c := math.Sincos(th)
	p1i := [3]float64{c*p1[0] - s*p1[1], s*p1[0] + c*p1[1], p1[2]}
	if d := norm([3]float64{p1i[0] - p0[0], p1i[1] - p0[1], p1i[2] - p0[2]}); d > 10e3 {
		t.Errorf("after one period the inertial position moved %.0f m", d)
	}
}

func TestWalkerGalileoPhasing(t *testing.T) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	ks := WalkerGalileo(ep)
	if len(ks) != 24 || ks[0].ID != "E01" || ks[23].ID != "E24" {
		t.Fatalf("got %d satellites %s..%s", len(ks), ks[0].ID, ks[len(ks)-1].ID)
	}
	// Neighbours in a plane are 360°/8 = 45° apart (Walker 24/3/1).
	a, b := ks[0].Pos(ep), ks[1].Pos(ep)
	ang := math.Acos((a[0]*b[0] + a[1]*b[1] + a[2]*b[2]) / (norm(a) * norm(b)))
	if !scalar.EqualWithinAbs(ang*180/math.Pi, 45, 1e-9) {
		t.Errorf("in-plane spacing %.9f°, want 45°", ang*180/math.Pi)
	}
	if _, err := Walker(WalkerConfig{Planes: 0, SlotsPerPlane: 3, SemiMajorAxis: 2e7}); err == nil {
		t.Error("0 planes accepted")
	}
	if _, err := Walker(WalkerConfig{Planes: 3, SlotsPerPlane: 3, SemiMajorAxis: 1e6}); err == nil {
		t.Error("orbit inside the Earth accepted")
	}
	if _, err := Walker(WalkerConfig{Planes: 10, SlotsPerPlane: 10, SemiMajorAxis: 2e7}); err == nil {
		t.Error("PRN > 99 accepted")
	}
}

func TestKeplerVelocityIsDerivative(t *testing.T) {
	// The analytic velocity must equal the central difference of the
	// position (identity check on a record with every correction term set,
	// including the BeiDou GEO variant).
	ep := FromCalendar(2021, 4, 28, 18, 0, 0)
	base := Kepler{ID: "G06", Toe: ep, Toc: ep, SqrtA: 5153.6, Ecc: 0.16, M0: 0.3, DeltaN: 4.5e-9,
		Omega0: -1.2, OmegaD: -8e-9, Omega: 0.7, I0: 0.96, IDot: 3e-10,
		Cuc: 2e-6, Cus: 8e-6, Crc: 250, Crs: 30, Cic: 1e-7, Cis: -6e-8}
	for _, id := range []SatID{"G06", "E11", "C03"} {
		k := base
		k.ID = id
		k.GEO = id == "C03"
		if k.GEO {
			k.SqrtA, k.I0, k.Ecc = 6493.4, 0.05, 0.0006
		}
		if err := k.Prepare(); err != nil {
			t.Fatal(err)
		}
		for _, dt := range []float64{-7000, 0, 1234.5, 7100} {
			tm := ep.Add(dt)
			_, v, err := k.PosVel(tm)
			if err != nil {
				t.Fatal(err)
			}
			// The position-only path equals PosVel's position (same steps).
			pv, _, _ := k.PosVel(tm)
			if pp := k.Pos(tm); norm([3]float64{pp[0] - pv[0], pp[1] - pv[1], pp[2] - pv[2]}) > 1e-7 {
				t.Errorf("%s: Pos %v, PosVel %v", id, pp, pv)
			}
			const h = 0.5
			p1, p2 := k.Pos(tm.Add(-h)), k.Pos(tm.Add(h))
			for i := range 3 {
				fd := (p2[i] - p1[i]) / (2 * h)
				if !scalar.EqualWithinAbs(v[i], fd, 1e-4) {
					t.Errorf("%s dt %g s: v[%d] = %.6f m/s, finite difference %.6f", id, dt, i, v[i], fd)
				}
			}
		}
	}
	// An unprepared record with an impossible orbit reports an error.
	bad := Kepler{ID: "G09", Toe: ep, SqrtA: 10}
	if _, _, err := bad.PosVel(ep); err == nil {
		t.Error("sqrt(A) = 10 m^0.5 accepted")
	}
	// Fit interval: 4 h curve fit ⇒ ±2 h (IS-GPS-200 §20.3.4.4).
	k := base
	if _, _, err := k.PosVel(ep.Add(7201)); err == nil {
		t.Error("epoch outside the fit interval accepted")
	}
}

func TestSolveKepler(t *testing.T) {
	// Residual of Kepler's equation M = E − e sin E (definition).
	for _, e := range []float64{0, 0.001, 0.02, 0.16, 0.5, 0.85} {
		for m := -7.0; m < 7; m += 0.173 {
			ea, se, ce := solveKepler(m, e)
			if r := math.Remainder(ea-e*math.Sin(ea)-m, 2*math.Pi); math.Abs(r) > 1e-13 {
				t.Fatalf("e=%g M=%g: residual %g", e, m, r)
			}
			if math.Abs(se-math.Sin(ea)) > 1e-14 || math.Abs(ce-math.Cos(ea)) > 1e-14 {
				t.Fatalf("e=%g M=%g: sin/cos drift %g %g", e, m, se-math.Sin(ea), ce-math.Cos(ea))
			}
		}
	}
}

func ExampleWalker() {
	ep, _ := ParseTime("2026-01-01T00:00:00")
	sats, _ := Walker(GalileoWalkerConfig(ep))
	p, _, _ := sats[0].PosVel(ep.Add(86400 * 365))
	fmt.Printf("%d satellites, %s radius %.1f km a year later\n", len(sats), sats[0].ID, norm(p)/1e3)
	// Output: 24 satellites, E01 radius 29599.8 km a year later
}

func TestPosGrid(t *testing.T) {
	// PosGrid (rotation recurrences) must equal Pos (direct) on every epoch.
	ep := FromCalendar(2021, 4, 28, 18, 0, 0)
	recs := []Kepler{
		{ID: "G06", Toe: ep, Toc: ep, SqrtA: 5153.6, Ecc: 0.16, M0: 0.3, DeltaN: 4.5e-9, Omega0: -1.2, OmegaD: -8e-9,
			Omega: 0.7, I0: 0.96, IDot: 3e-10, Cuc: 2e-6, Cus: 8e-6, Crc: 250, Crs: 30, Cic: 1e-7, Cis: -6e-8, FitHours: KeplerFitUnlimited},
		{ID: "C03", Toe: ep, Toc: ep, SqrtA: 6493.4, Ecc: 0.0006, M0: 2, Omega0: 1, I0: 0.05, GEO: true, FitHours: KeplerFitUnlimited},
		*WalkerGalileo(ep)[5],
	}
	for _, k := range recs {
		if err := k.Prepare(); err != nil {
			t.Fatal(err)
		}
		dst := make([][3]float64, 2880)
		start := ep.Add(-7200.25)
		if err := k.PosGrid(start, 30, dst); err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for j, p := range dst {
			q := k.Pos(start.Add(float64(j) * 30))
			worst = math.Max(worst, norm([3]float64{p[0] - q[0], p[1] - q[1], p[2] - q[2]}))
		}
		if worst > 1e-6 {
			t.Errorf("%s: PosGrid differs from Pos by %.3g m", k.ID, worst)
		}
	}
}

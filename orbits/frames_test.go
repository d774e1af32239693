package orbits

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// erfaRef holds the values stored by testdata/erfa_ref.py (python3-erfa and
// python3-pyproj; rerun the script to regenerate testdata/erfa_ref.json).
type erfaRef struct {
	Source   string
	Geodetic []struct {
		LatDeg float64 `json:"lat_deg"`
		LonDeg float64 `json:"lon_deg"`
		HM     float64 `json:"h_m"`
		Erfa   [3]float64
		Pyproj [3]float64
	}
	Rotation []struct {
		GPS    [6]float64
		DUT1   float64
		Era00  float64
		Gmst06 float64
		Pmat06 [3][3]float64
		C2t06a [3][3]float64
	}
	Galactic []struct {
		LDeg  float64 `json:"l_deg"`
		BDeg  float64 `json:"b_deg"`
		RARad float64 `json:"ra_rad"`
		DecRd float64 `json:"dec_rad"`
	}
}

func loadErfaRef(t *testing.T) *erfaRef {
	t.Helper()
	b, err := os.ReadFile("testdata/erfa_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var r erfaRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Geodetic) == 0 || len(r.Rotation) == 0 || len(r.Galactic) == 0 {
		t.Fatal("testdata/erfa_ref.json is incomplete")
	}
	return &r
}

func angDiff(a, b float64) float64 { return math.Remainder(a-b, 2*math.Pi) }

func refEpoch(g [6]float64) Time {
	return FromCalendar(int(g[0]), int(g[1]), int(g[2]), int(g[3]), int(g[4]), g[5])
}

func TestERAandGMSTAgainstErfa(t *testing.T) {
	ref := loadErfaRef(t)
	for _, r := range ref.Rotation {
		tm := refEpoch(r.GPS)
		// erfa.era00 and erfa.gmst06 (IERS Conventions 2010 eqs. 5.15, 5.32): ≤ 1e-9 rad.
		if d := angDiff(ERA(tm, r.DUT1), r.Era00); math.Abs(d) > 1e-9 {
			t.Errorf("ERA at %v dut1 %g s: off by %.3g rad", tm, r.DUT1, d)
		}
		if d := angDiff(GMST(tm, r.DUT1), r.Gmst06); math.Abs(d) > 1e-9 {
			t.Errorf("GMST at %v dut1 %g s: off by %.3g rad", tm, r.DUT1, d)
		}
		// erfa.pmat06 (IAU 2006 bias-precession matrix): elements within 1e-12.
		p := PrecessionMatrix(tm)
		for i := range 3 {
			for j := range 3 {
				if d := p[i][j] - r.Pmat06[i][j]; math.Abs(d) > 1e-12 {
					t.Errorf("precession matrix at %v [%d][%d] off by %.3g", tm, i, j, d)
				}
			}
		}
	}
}

// rotationAngle returns the angle of the rotation aᵀ·b in radians.
func rotationAngle(a, b Mat3) float64 {
	var tr float64
	for i := range 3 {
		for k := range 3 {
			tr += a[k][i] * b[k][i]
		}
	}
	c := (tr - 1) / 2
	if c > 1 {
		c = 1
	}
	return math.Acos(c)
}

func TestFrameAgainstFullModel(t *testing.T) {
	// erfa.c2t06a: the full IAU 2006/2000A celestial-to-terrestrial matrix
	// (polar motion zero). Our truncated model must agree within 0.1″
	// (4.8e-7 rad, ≈ 13 m at GPS radius).
	ref := loadErfaRef(t)
	worst := 0.0
	for _, r := range ref.Rotation {
		tm := refEpoch(r.GPS)
		m := Frame{DUT1: r.DUT1}.CelestialMatrix(tm) // r_cel = m · r_ef
		var want Mat3                                // c2t06a: r_ef = C · r_cel ⇒ m = Cᵀ
		for i := range 3 {
			for j := range 3 {
				want[i][j] = r.C2t06a[j][i]
			}
		}
		a := rotationAngle(m, want)
		worst = math.Max(worst, a)
		if a > 0.1*arcsec {
			t.Errorf("frame at %v: %.3f″ from erfa.c2t06a", tm, a/arcsec)
		}
	}
	t.Logf("worst difference from erfa.c2t06a: %.4f″", worst/arcsec)
}

func TestFrameRoundTripAndVelocity(t *testing.T) {
	tm := FromCalendar(2021, 4, 28, 18, 0, 0)
	f := Frame{DUT1: -0.18}
	r := [3]float64{-7018619.065, -20968530.929, -14611229.529}
	v := [3]float64{1234.5, -567.8, 2900.1}
	rc, vc := f.ToCelestialVel(tm, r, v)
	re, ve := f.ToEarthFixedVel(tm, rc, vc)
	for i := range 3 {
		if !scalar.EqualWithinAbs(re[i], r[i], 1e-6) || !scalar.EqualWithinAbs(ve[i], v[i], 1e-9) {
			t.Fatalf("round trip: %v %v → %v %v", r, v, re, ve)
		}
	}
	// A point fixed on the Earth moves in the celestial frame at ω×r:
	// central difference of the rotated position over ±1 s (identity check).
	st := GeodeticToECEF(0.3, 1.1, 100)
	p1 := f.ToCelestial(tm.Add(-1), st)
	p2 := f.ToCelestial(tm.Add(1), st)
	_, vs := f.ToCelestialVel(tm, st, [3]float64{})
	for i := range 3 {
		fd := (p2[i] - p1[i]) / 2
		if !scalar.EqualWithinAbs(fd, vs[i], 1e-4) {
			t.Errorf("celestial velocity[%d] = %g m/s, finite difference %g m/s", i, vs[i], fd)
		}
	}
}

func TestGalacticAgainstErfa(t *testing.T) {
	// erfa.g2icrs (Hipparcos ICRS ↔ galactic): ≤ 0.1″ (we reach ~1e-10″).
	ref := loadErfaRef(t)
	for _, g := range ref.Galactic {
		vg := UnitVector(g.LDeg*math.Pi/180, g.BDeg*math.Pi/180)
		vc := GalacticToCelestial(vg)
		want := UnitVector(g.RARad, g.DecRd)
		d := math.Sqrt(sq(vc[0]-want[0]) + sq(vc[1]-want[1]) + sq(vc[2]-want[2]))
		if d > 0.1*arcsec {
			t.Errorf("galactic (%g°, %g°): %.3g″ from erfa.g2icrs", g.LDeg, g.BDeg, d/arcsec)
		}
		back := CelestialToGalactic(vc)
		for i := range 3 {
			if !scalar.EqualWithinAbs(back[i], vg[i], 1e-14) {
				t.Errorf("galactic round trip: %v → %v", vg, back)
			}
		}
	}
}

func TestGeodeticAgainstPyprojAndErfa(t *testing.T) {
	// pyproj EPSG:4979→4978 and erfa.gd2gc(WGS84): ≤ 1 mm.
	ref := loadErfaRef(t)
	for _, g := range ref.Geodetic {
		lat, lon := g.LatDeg*math.Pi/180, g.LonDeg*math.Pi/180
		p := GeodeticToECEF(lat, lon, g.HM)
		for i := range 3 {
			if math.Abs(p[i]-g.Pyproj[i]) > 1e-3 || math.Abs(p[i]-g.Erfa[i]) > 1e-3 {
				t.Errorf("(%g°, %g°, %g m)[%d]: %.4f m, pyproj %.4f, erfa %.4f", g.LatDeg, g.LonDeg, g.HM, i, p[i], g.Pyproj[i], g.Erfa[i])
			}
		}
		// Inverse: back to the geodetic input within 1e-11 rad and 1 mm.
		la, lo, h := Geodetic(g.Pyproj)
		if math.Abs(la-lat) > 1e-11 || math.Abs(angDiff(lo, lon)) > 1e-11 || math.Abs(h-g.HM) > 1e-3 {
			t.Errorf("Geodetic(%v) = %g, %g, %g; want %g, %g, %g", g.Pyproj, la, lo, h, lat, lon, g.HM)
		}
	}
	s := StationFromGeodetic("BERN", 46.8771*math.Pi/180, 7.4651*math.Pi/180, 956)
	if err := s.Validate(); err != nil {
		t.Error(err)
	}
	s.Pos[0] += 0.01
	if err := s.Validate(); err == nil {
		t.Error("inconsistent station accepted")
	}
}

func TestFrameTabulated(t *testing.T) {
	// The tabulated frame must match the direct computation (identity up to
	// the linear interpolation of precession-nutation over 12 h).
	start := FromCalendar(2026, 3, 1, 0, 0, 0)
	f := Frame{DUT1: 0.1}
	ft := f.Tabulate(start, 40*86400)
	// Measured on vectors (max element difference of the matrices, i.e. the
	// largest displacement of a unit vector component): the trace formula of
	// rotationAngle misreads the ~1e-14 shrinkage of an interpolated matrix.
	worst := 0.0
	for k := range 4000 {
		tm := start.Add(float64(k)*40*86400/4000 + 0.37)
		a, b := ft.CelestialMatrix(tm), f.CelestialMatrix(tm)
		for i := range 3 {
			for j := range 3 {
				worst = math.Max(worst, math.Abs(a[i][j]-b[i][j]))
			}
		}
	}
	if worst > 2e-3*arcsec { // 0.002″ ≈ 0.25 m at GPS radius
		t.Errorf("tabulated frame off by %.2g″", worst/arcsec)
	}
	t.Logf("tabulated vs direct: worst %.2g″", worst/arcsec)
	// Outside the table: the direct computation.
	out := start.Add(-86400)
	if ft.CelestialMatrix(out) != f.CelestialMatrix(out) {
		t.Error("outside the table the result differs")
	}
}

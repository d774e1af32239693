package estimate

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestStandardPressure against the U.S. Standard Atmosphere 1976 table
// (pressure at geometric altitude; values from memory: 1 km 89 876 Pa,
// 2 km 79 501 Pa, 3 km 70 121 Pa, 5 km 54 048 Pa; sea level 101 325 Pa exact).
func TestStandardPressure(t *testing.T) {
	for _, c := range []struct{ h, hpa float64 }{
		{0, 1013.25},
		{1000, 898.76},
		{2000, 795.01},
		{3000, 701.21},
		{5000, 540.48},
	} {
		if got := StandardPressure(c.h); !scalar.EqualWithinAbs(got, c.hpa, 0.01) {
			t.Errorf("pressure at %g m: %.3f hPa, US Standard Atmosphere 1976 %.2f hPa", c.h, got, c.hpa)
		}
	}
}

// TestZenithHydrostatic: the Saastamoinen zenith hydrostatic delay for the
// standard sea-level pressure is ≈ 2.3 m (IERS Conventions 2010 §9.2, from
// memory); at 45° latitude the latitude term vanishes and the delay is
// exactly 0.0022768 m/hPa × 1013.25 hPa = 2.30697 m.
func TestZenithHydrostatic(t *testing.T) {
	if got := ZenithHydrostatic(1013.25, math.Pi/4, 0); !scalar.EqualWithinAbs(got, 2.30697, 1e-5) {
		t.Errorf("ZHD(1013.25 hPa, 45°, 0 m) = %.6f m, want 2.30697 m", got)
	}
	// Equator and pole differ by the ±0.00266 latitude term: 2.3 m × 0.0053 ≈ 12 mm.
	eq, pole := ZenithHydrostatic(1013.25, 0, 0), ZenithHydrostatic(1013.25, math.Pi/2, 0)
	if d := eq - pole; !scalar.EqualWithinAbs(d, 0.01227, 1e-4) {
		t.Errorf("equator − pole ZHD = %.5f m, want 0.01227 m", d)
	}
	// Mapping: 1 at zenith; ≈ 10.2 at 5° elevation (Black & Eisner 1984, as
	// quoted for RTCA DO-229; from memory).
	if got := MappingBlackEisner(math.Pi / 2); !scalar.EqualWithinAbs(got, 1, 1e-6) {
		t.Errorf("mapping at zenith %g, want 1", got)
	}
	if got := MappingBlackEisner(5 * math.Pi / 180); !scalar.EqualWithinAbs(got, 10.218, 1e-3) {
		t.Errorf("mapping at 5° %g, want 10.218", got)
	}
}

// TestGeodetic against pyproj / erfa.gd2gc (gnss.md §4, computed there):
// lon 7.4651°, lat 46.8771°, h 956.0 m ↔ (4331298.390686, 567542.458063, 4633133.880745) m.
func TestGeodetic(t *testing.T) {
	want := [3]float64{4331298.390686, 567542.458063, 4633133.880745}
	lat, lon, h := 46.8771*math.Pi/180, 7.4651*math.Pi/180, 956.0
	got := geodeticToECEF(lat, lon, h)
	for i := range got {
		if !scalar.EqualWithinAbs(got[i], want[i], 1e-5) {
			t.Errorf("forward: coordinate %d = %.6f m, pyproj %.6f m", i, got[i], want[i])
		}
	}
	la, lo, hh := Geodetic(want)
	if !scalar.EqualWithinAbs(la, lat, 1e-11) || !scalar.EqualWithinAbs(lo, lon, 1e-12) || !scalar.EqualWithinAbs(hh, h, 1e-4) {
		t.Errorf("inverse: lat %.12f° lon %.12f° h %.6f m; want 46.8771°, 7.4651°, 956 m", la*180/math.Pi, lo*180/math.Pi, hh)
	}
}

// TestIonosphereFree: GPS L1/L2 (IS-GPS-200 §3.3.1.1) give γ = (f1/f2)² =
// 1.646944 (gnss.md §1.1), α₁ − α₂ = 1 and α₁/f₁² = α₂/f₂² (the 1/f²
// ionospheric delay cancels).
func TestIonosphereFree(t *testing.T) {
	if g := (FreqL1 / FreqL2) * (FreqL1 / FreqL2); !scalar.EqualWithinAbs(g, 1.646944, 1e-6) {
		t.Errorf("γ = %.7f, want 1.646944", g)
	}
	if !scalar.EqualWithinAbs(AlphaL1-AlphaL2, 1, 1e-15) {
		t.Errorf("α₁ − α₂ = %.17g, want 1", AlphaL1-AlphaL2)
	}
	if !scalar.EqualWithinAbs(AlphaL1, 2.545728, 1e-6) || !scalar.EqualWithinAbs(AlphaL2, 1.545728, 1e-6) {
		t.Errorf("α₁ = %.7f, α₂ = %.7f; want 2.545728, 1.545728", AlphaL1, AlphaL2)
	}
	iono := 40.3 * 50e16 // 40.3·TEC (m·Hz²) for 50 TECU (physics.md §6)
	if r := AlphaL1*iono/(FreqL1*FreqL1) - AlphaL2*iono/(FreqL2*FreqL2); math.Abs(r) > 1e-12 {
		t.Errorf("ionosphere-free residual %g m", r)
	}
}

package orbits

import (
	"fmt"
	"math"
)

func ExampleGeodeticToECEF() {
	// WGS 84 (46.8771° N, 7.4651° E, 956 m); pyproj gives
	// (4331298.390686, 567542.458063, 4633133.880745) m (gnss.md §4).
	p := GeodeticToECEF(46.8771*math.Pi/180, 7.4651*math.Pi/180, 956)
	fmt.Printf("x %.3f m, y %.3f m, z %.3f m\n", p[0], p[1], p[2])
	// Output: x 4331298.391 m, y 567542.458 m, z 4633133.881 m
}

func ExampleGalacticToCelestial() {
	// The galactic centre in ICRS; erfa.g2icrs(0, 0) = (266.4049948°, −28.9361740°).
	ra, dec := Angles(GalacticToCelestial(UnitVector(0, 0)))
	fmt.Printf("RA %.6f°, Dec %.6f°\n", ra*180/math.Pi, dec*180/math.Pi)
	// Output: RA 266.404995°, Dec -28.936174°
}

func ExampleECEFToCelestial() {
	// The Greenwich meridian on the equator at 2021-04-28T18:00:00 UTC: its
	// celestial (GCRS) right ascension is close to the Earth rotation angle,
	// ERA = 126.655521° (erfa.era00; gnss.md §4), because the CIO lies near
	// the GCRS origin of right ascension; precession since J2000 tilts the
	// equator by ~0.07° at this longitude.
	t := FromUTC(2021, 4, 28, 18, 0, 0)
	ra, dec := Angles(ECEFToCelestial(t, [3]float64{WGS84A, 0, 0}))
	fmt.Printf("RA %.3f°, Dec %.3f°; ERA %.6f°\n", ra*180/math.Pi, dec*180/math.Pi, ERA(t, 0)*180/math.Pi)
	// Output: RA 126.655°, Dec 0.069°; ERA 126.655521°
}

func ExampleFromBDT() {
	// BeiDou time week 0 began at 2006-01-01T00:00:00 UTC = 00:00:14 GPST.
	fmt.Println(FromBDT(0, 0))
	// Output: 2006-01-01T00:00:14
}

func ExampleReadNav() {
	nav, err := ReadNav("testdata/rinex2_glonass.g")
	if err != nil {
		fmt.Println(err)
		return
	}
	t := FromUTC(2023, 3, 14, 0, 20, 0)
	eph, err := nav.Select("R01", t, false)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, _, _ := eph.PosVel(t)
	fmt.Printf("RINEX %.2f, %d records; R01 %s at %v GPST: |r| = %.1f km, clock %.3f µs\n",
		nav.Version, len(nav.Records), eph.Message(), t, norm(p)/1e3, eph.ClockBias(t)*1e6)
	// Output: RINEX 2.11, 2 records; R01 FDMA at 2023-03-14T00:20:18 GPST: |r| = 25516.5 km, clock 24.706 µs
}

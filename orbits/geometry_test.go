package orbits

import (
	"fmt"
	"math"
	"testing"
)

func TestGeometry(t *testing.T) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	sats := KeplerOrbits(WalkerGPS(ep))
	st := []Station{StationFromGeodetic("ALPH", 0.8, 0.1, 500), StationFromGeodetic("BETA", -0.5, 2.0, 20)}
	st[0].Reference = true
	g, err := NewGeometry(sats, st, Frame{})
	if err != nil {
		t.Fatal(err)
	}
	ids := g.Clocks()
	if len(ids) != 26 || ids[0] != "G01" || ids[25] != "BETA" || g.Index("ALPH") != 24 || !g.IsSatellite(0) || g.IsSatellite(24) {
		t.Fatalf("clock list %v", ids)
	}
	if err := g.Check(ep, 86400*30, 3600); err != nil {
		t.Fatal(err)
	}
	tm := ep.Add(12345)
	all := make([][3]float64, g.Len())
	if err := g.CelestialAll(tm, all); err != nil {
		t.Fatal(err)
	}
	for i := range ids {
		c := g.Celestial(i, tm)
		ef := g.EarthFixed(i, tm)
		// The celestial and Earth-fixed positions have the same geocentric
		// distance (rotation) and CelestialAll equals Celestial.
		if math.Abs(norm(c)-norm(ef)) > 1e-6 || c != all[i] {
			t.Errorf("clock %s: |cel| %.6f, |ef| %.6f", ids[i], norm(c), norm(ef))
		}
	}
	// Celestial velocity = finite difference of celestial positions (identity).
	for _, i := range []int{0, 24} {
		_, v, err := g.CelestialState(i, tm)
		if err != nil {
			t.Fatal(err)
		}
		p1, p2 := g.Celestial(i, tm.Add(-0.5)), g.Celestial(i, tm.Add(0.5))
		for k := range 3 {
			if math.Abs(p2[k]-p1[k]-v[k]) > 1e-3 {
				t.Errorf("clock %s: celestial v[%d] = %.6f m/s, finite difference %.6f", ids[i], k, v[k], p2[k]-p1[k])
			}
		}
	}
	// EarthFixedGrid equals EarthFixed epoch by epoch (satellite and station).
	for _, i := range []int{3, 25} {
		grid := make([][3]float64, 100)
		if err := g.EarthFixedGrid(i, tm, 30, grid); err != nil {
			t.Fatal(err)
		}
		for j, p := range grid {
			q := g.EarthFixed(i, tm.Add(float64(j)*30))
			if norm([3]float64{p[0] - q[0], p[1] - q[1], p[2] - q[2]}) > 1e-6 {
				t.Fatalf("clock %s epoch %d: grid %v, direct %v", ids[i], j, p, q)
			}
		}
	}
	gs, _ := NewGeometry(nil, st, Frame{}) // stations only
	if err := gs.EarthFixedGrid(0, tm, 30, make([][3]float64, 3)); err != nil {
		t.Error(err)
	}
	if s, ok := g.Station(24); !ok || !s.Reference {
		t.Error("station lookup")
	}
	if _, err := NewGeometry(sats, []Station{StationFromGeodetic("G01", 0, 0, 0)}, Frame{}); err == nil {
		t.Error("duplicate id accepted")
	}
	// A broadcast-like record with a 4 h fit interval fails Check beyond it.
	k := *WalkerGPS(ep)[0]
	k.FitHours = 4
	g2, _ := NewGeometry([]Orbit{&k}, nil, Frame{})
	if err := g2.Check(ep, 3*3600, 600); err == nil {
		t.Error("Check passed outside the fit interval")
	}
	if p := g2.Celestial(0, ep.Add(3*3600)); !math.IsNaN(p[0]) {
		t.Error("position outside the fit interval is not NaN")
	}
}

func ExampleGeometry() {
	ep, _ := ParseTime("2026-01-01T00:00:00")
	g, _ := NewGeometry(KeplerOrbits(WalkerGalileo(ep)),
		[]Station{StationFromGeodetic("NORD", 60*math.Pi/180, 10*math.Pi/180, 100)}, Frame{})
	r := g.Celestial(g.Index("NORD"), ep.Add(3600))
	fmt.Printf("%d clocks; NORD at %.1f km from the geocentre\n", g.Len(), norm(r)/1e3)
	// Output: 25 clocks; NORD at 6362.2 km from the geocentre
}

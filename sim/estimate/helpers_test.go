package estimate

import (
	"math"
	"math/rand/v2"
)

// Test geometry of our own: circular 55° orbits at the GPS radius in six
// planes, stations spread evenly (Fibonacci lattice) on the WGS 84
// ellipsoid, and random-walk clocks.

const (
	testGM     = 3.986005e14 // m³/s², IS-GPS-200 value (gnss.md §1.1)
	testRadius = 26.56e6     // m, GPS orbit radius (physics.md §3.5)
)

func testConstellation(n int) []Satellite {
	planes := 6
	per := (n + planes - 1) / planes
	mean := math.Sqrt(testGM / (testRadius * testRadius * testRadius))
	var sats []Satellite
	for i := range n {
		p, s := i%planes, i/planes
		node := 2 * math.Pi * float64(p) / float64(planes)
		u0 := 2*math.Pi*float64(s)/float64(per) + 0.3*float64(p)
		inc := 55 * math.Pi / 180
		so, co := math.Sincos(node)
		si, ci := math.Sincos(inc)
		sats = append(sats, Satellite{ID: satName(i), Pos: func(t float64) [3]float64 {
			su, cu := math.Sincos(u0 + mean*t)
			return [3]float64{testRadius * (cu*co - su*ci*so), testRadius * (cu*so + su*ci*co), testRadius * su * si}
		}})
	}
	return sats
}

func satName(i int) string { return string([]byte{'G', byte('0' + (i+1)/10), byte('0' + (i+1)%10)}) }

// geodeticToECEF is the WGS 84 forward transform (NIMA TR8350.2 eq. 4-14).
func geodeticToECEF(lat, lon, h float64) [3]float64 {
	e2 := wgs84F * (2 - wgs84F)
	sl, cl := math.Sincos(lat)
	so, co := math.Sincos(lon)
	n := wgs84A / math.Sqrt(1-e2*sl*sl)
	return [3]float64{(n + h) * cl * co, (n + h) * cl * so, (n*(1-e2) + h) * sl}
}

func testStations(n int) []Station {
	var st []Station
	golden := math.Pi * (3 - math.Sqrt(5))
	for i := range n {
		z := 1 - 2*(float64(i)+0.5)/float64(n)
		lat := math.Asin(z)
		lon := math.Mod(golden*float64(i), 2*math.Pi)
		st = append(st, Station{ID: "ST" + string([]byte{byte('A' + i/26), byte('A' + i%26)}), ECEF: geodeticToECEF(lat, lon, 100+10*float64(i%50))})
	}
	return st
}

func testNetwork(nsat, nsta int) *Network {
	return &Network{Satellites: testConstellation(nsat), Stations: testStations(nsta), ToCelestial: EarthRotation(0.7)}
}

// testTruth draws clock biases: satellites ±100 µs offsets, ±1e-11 drift and
// a random walk of 1e-11 s per epoch; stations ±1 µs and 1e-12 s per epoch.
func testTruth(net *Network, epochs int, interval float64, rng *rand.Rand) *Truth {
	var ids []string
	for _, s := range net.Satellites {
		ids = append(ids, s.ID)
	}
	for _, s := range net.Stations {
		ids = append(ids, s.ID)
	}
	nc := len(ids)
	tr := &Truth{Clocks: ids, Bias: make([]float64, epochs*nc)}
	for j := range nc {
		sat := j < len(net.Satellites)
		off, drift, rw := 1e-6*(2*rng.Float64()-1), 0.0, 1e-12
		if sat {
			off, drift, rw = 1e-4*(2*rng.Float64()-1), 1e-11*(2*rng.Float64()-1), 1e-11
		}
		x := off
		for k := range epochs {
			tr.Bias[k*nc+j] = x + drift*float64(k)*interval
			x += rw * rng.NormFloat64()
		}
	}
	return tr
}

// relTruth returns truth column j minus the reference column at epoch k.
func relTruth(tr *Truth, k int, id, ref string) float64 {
	nc := len(tr.Clocks)
	var a, b float64
	for j, c := range tr.Clocks {
		if c == id {
			a = tr.Bias[k*nc+j]
		}
		if c == ref {
			b = tr.Bias[k*nc+j]
		}
	}
	return a - b
}

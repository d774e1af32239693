package estimate

import (
	"math"
	"math/rand/v2"
	"testing"

	"wallcross/orbits"
)

// TestFromGeometry: the GPS Walker constellation and WGS 84 stations of the
// orbits package, through Simulate and Solve (noise-free, troposphere on),
// give back the true clocks to ≤ 1 ps.
func TestFromGeometry(t *testing.T) {
	start := orbits.FromCalendar(2021, 4, 28, 0, 0, 0)
	var sts []orbits.Station
	for i := range 10 {
		lat := (float64(i%5) - 2) * 0.6
		lon := float64(i) * 0.63
		sts = append(sts, orbits.StationFromGeodetic("S"+string(rune('A'+i))+"XX", lat, lon, 200))
	}
	g, err := orbits.NewGeometry(orbits.KeplerOrbits(orbits.WalkerGPS(start)), sts, orbits.Frame{})
	if err != nil {
		t.Fatal(err)
	}
	net, err := FromGeometry(g, start)
	if err != nil {
		t.Fatal(err)
	}
	if len(net.Satellites) < 24 || len(net.Stations) != 10 {
		t.Fatalf("%d satellites, %d stations", len(net.Satellites), len(net.Stations))
	}
	rng := rand.New(rand.NewPCG(21, 118))
	const epochs, interval = 60, 30.0
	truth := testTruth(net, epochs, interval, rng)
	obs, err := Simulate(net, truth, ObsConfig{Interval: interval, Epochs: epochs, Troposphere: true}, rng)
	if err != nil {
		t.Fatal(err)
	}
	sol, err := Solve(obs, SolveConfig{Reference: "SAXX", ElevationWeighting: true})
	if err != nil {
		t.Fatal(err)
	}
	worst, n := 0.0, 0
	for k := range epochs {
		for j, id := range sol.Clocks {
			if v := sol.At(k, j); !math.IsNaN(v) {
				n++
				worst = math.Max(worst, math.Abs(v-relTruth(truth, k, id, "SAXX")))
			}
		}
	}
	t.Logf("%d observations, %d clock epochs, worst error %.3g s", obs.Len(), n, worst)
	if worst > 1e-12 || n < epochs*len(sol.Clocks)*9/10 {
		t.Errorf("worst error %.3g s over %d clock epochs; want ≤ 1 ps over ≥ 90%%", worst, n)
	}
}

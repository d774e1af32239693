package orbits

import (
	"testing"
)

// BenchmarkKepler reports Keplerian propagation throughput in
// satellite-epochs per second on one core (issue 3 target ≥ 1e7).
func BenchmarkKepler(b *testing.B) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	ks := WalkerGPS(ep)
	for _, k := range ks {
		k.Ecc = 0.01 // exercise the Kepler solver
		k.Crs, k.Cuc, k.Cis = 30, 1e-6, 1e-7
		if err := k.Prepare(); err != nil {
			b.Fatal(err)
		}
	}
	b.Run("Pos", func(b *testing.B) {
		var sink float64
		n := 0
		cpu0 := processCPUSeconds()
		for b.Loop() {
			t := ep.Add(float64(n%86400) * 30)
			for _, k := range ks {
				p := k.Pos(t)
				sink += p[0]
			}
			n++
		}
		b.ReportMetric(float64(n*len(ks))/b.Elapsed().Seconds(), "sat-epochs/s")
		if cpu := processCPUSeconds() - cpu0; cpu > 0 {
			b.ReportMetric(float64(n*len(ks))/cpu, "sat-epochs/cpu-s")
		}
		_ = sink
	})
	b.Run("PosVel", func(b *testing.B) {
		var sink float64
		n := 0
		cpu0 := processCPUSeconds()
		for b.Loop() {
			t := ep.Add(float64(n%86400) * 30)
			for _, k := range ks {
				p, v, _ := k.PosVel(t)
				sink += p[0] + v[0]
			}
			n++
		}
		b.ReportMetric(float64(n*len(ks))/b.Elapsed().Seconds(), "sat-epochs/s")
		if cpu := processCPUSeconds() - cpu0; cpu > 0 {
			b.ReportMetric(float64(n*len(ks))/cpu, "sat-epochs/cpu-s")
		}
		_ = sink
	})
}

// BenchmarkKeplerGrid reports the grid propagator (PosGrid, 30 s steps).
func BenchmarkKeplerGrid(b *testing.B) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	ks := WalkerGPS(ep)
	for _, k := range ks {
		k.Ecc = 0.01
		k.Crs, k.Cuc, k.Cis = 30, 1e-6, 1e-7
		if err := k.Prepare(); err != nil {
			b.Fatal(err)
		}
	}
	dst := make([][3]float64, 2880)
	n := 0
	cpu0 := processCPUSeconds()
	for b.Loop() {
		for _, k := range ks {
			k.PosGrid(ep, 30, dst)
		}
		n += len(ks) * len(dst)
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "sat-epochs/s")
	if cpu := processCPUSeconds() - cpu0; cpu > 0 {
		b.ReportMetric(float64(n)/cpu, "sat-epochs/cpu-s")
	}
}

// BenchmarkGlonass reports RK4 propagation over 7.5 min (8 steps).
func BenchmarkGlonass(b *testing.B) {
	g := &Glonass{ID: "R01", Tb: FromCalendar(2020, 6, 25, 12, 0, 0),
		Pos: [3]float64{-17828665.7, -11730710.4, 13991487.7}, Vel: [3]float64{1500, -2200, 1000}}
	t := g.Tb.Add(450)
	n := 0
	for b.Loop() {
		g.PosVel(t)
		n++
	}
	b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "sat-epochs/s")
}

// BenchmarkGeometry reports the per-epoch cost of the celestial positions of
// a 24-satellite, 20-station network.
func BenchmarkGeometry(b *testing.B) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	var st []Station
	for i := range 20 {
		st = append(st, StationFromGeodetic(string(rune('A'+i))+"STA", 0.05*float64(i), 0.3*float64(i), 100))
	}
	g, err := NewGeometry(KeplerOrbits(WalkerGPS(ep)), st, Frame{})
	if err != nil {
		b.Fatal(err)
	}
	dst := make([][3]float64, g.Len())
	b.Run("CelestialAll", func(b *testing.B) {
		n := 0
		for b.Loop() {
			g.CelestialAll(ep.Add(float64(n)*30), dst)
			n++
		}
		b.ReportMetric(float64(n*g.Len())/b.Elapsed().Seconds(), "clock-epochs/s")
	})
	b.Run("Celestial", func(b *testing.B) {
		n := 0
		for b.Loop() {
			g.Celestial(n%g.Len(), ep.Add(float64(n)*30))
			n++
		}
		b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "clock-epochs/s")
	})
}

// BenchmarkCelestialMatrix compares the direct and the tabulated frame.
func BenchmarkCelestialMatrix(b *testing.B) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	for _, c := range []struct {
		name string
		f    Frame
	}{{"direct", Frame{}}, {"tabulated", Frame{}.Tabulate(ep, 86400)}} {
		b.Run(c.name, func(b *testing.B) {
			n := 0
			var sink float64
			for b.Loop() {
				m := c.f.CelestialMatrix(ep.Add(float64(n%2880) * 30))
				sink += m[0][0]
				n++
			}
			b.ReportMetric(float64(n)/b.Elapsed().Seconds(), "epochs/s")
			_ = sink
		})
	}
}

package sim

import (
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
	"testing"

	"wallcross/scenarios"
)

// benchScenario is a network of sats satellites (31 planes of sats/31) and
// stations stations on a latitude/longitude grid, 30 s data over days
// days, noise on (gps-iif-rb satellites, hmaser stations) and one wall a
// day on average from the halo model.
func benchScenario(tb testing.TB, days, sats, stations int) *scenarios.Scenario {
	tb.Helper()
	var b strings.Builder
	fmt.Fprintf(&b, "name: bench\nseed: 5\ntime: {start: 2026-01-01T00:00:00, span: %d d, step: 30 s}\n", days)
	fmt.Fprintf(&b, "constellations: [{kind: gps-like, planes: 31, slots: %d, clock: gps-iif-rb}]\nstations:\n", sats/31)
	for i := range stations {
		lat := -70 + 140*float64(i%8)/7
		lon := -180 + 360*float64(i)/float64(stations)
		ref := ""
		if i == 0 {
			ref = ", reference: true"
		}
		fmt.Fprintf(&b, "  - {id: S%03d, lat: %.2f deg, lon: %.2f deg, height: 100 m%s}\n", i, lat, lon, ref)
	}
	b.WriteString("walls:\n  population: {arrival_interval: 1 d}\n")
	s, err := scenarios.Decode("bench.yaml", []byte(b.String()))
	if err != nil {
		tb.Fatal(err)
	}
	return s
}

// BenchmarkYear is the issue-5 target: one year of 30 s data for 31
// satellites + 40 stations with one wall a day, simulated and written as
// NPY (plus the truth tables and manifest; no RINEX, CSV or SP3). Target:
// ≤ 30 s per op on 2 cores and ≤ 2 GB peak memory (peak_sys_MB reports the
// Go runtime's memory obtained from the OS, an upper bound of the peak
// heap).
//
//	go test ./sim -run '^$' -bench 'BenchmarkYear' -benchtime 1x
func BenchmarkYear(b *testing.B) {
	for _, c := range []struct {
		name                 string
		days, sats, stations int
	}{
		{"30d_71clocks", 30, 31, 40},
		{"30d_142clocks", 30, 62, 80},
		{"365d_71clocks", 365, 31, 40},
	} {
		b.Run(c.name, func(b *testing.B) {
			s := benchScenario(b, c.days, c.sats, c.stations)
			dir := b.TempDir()
			var d *Dataset
			cpu0 := cpuSeconds()
			for b.Loop() {
				var err error
				d, err = Run(Config{Scenario: s}, Options{Workers: 2, NoOrbits: true})
				if err != nil {
					b.Fatal(err)
				}
				if _, err := WriteDir(filepath.Join(dir, "ds"), d, WriteOptions{SkipRINEX: true, SkipCSV: true, SkipSP3: true}); err != nil {
					b.Fatal(err)
				}
			}
			// CPU time of the process (user + system), which on a shared
			// machine says more than the wall time: on two free cores the
			// wall time is about half of it (clocks run on 2 workers).
			b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu_s/op")
			var ms runtime.MemStats
			runtime.ReadMemStats(&ms)
			b.ReportMetric(float64(ms.Sys)/(1<<20), "peak_sys_MB")
			b.ReportMetric(float64(d.Epochs*len(d.Clocks))/b.Elapsed().Seconds()*float64(b.N), "samples/s")
			b.ReportMetric(float64(len(d.Events)), "walls")
		})
	}
}

// BenchmarkDemo times the built-in demo scenario, simulated and fully
// written (target of issue 5: wallcross demo in under a minute).
func BenchmarkDemo(b *testing.B) {
	s, err := scenarios.Resolve("demo")
	if err != nil {
		b.Fatal(err)
	}
	dir := b.TempDir()
	for b.Loop() {
		d, err := Run(Config{Scenario: s}, Options{})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := WriteDir(dir, d, WriteOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// cpuSeconds returns the user + system CPU time of this process, s.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}

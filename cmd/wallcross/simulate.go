package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"wallcross/internal/buildinfo"
	"wallcross/scenarios"
	"wallcross/sim"
)

func newSimulateCmd() *command {
	fs := newFlagSet("simulate")
	out := fs.String("out", "", "dataset directory to write (required)")
	seed := fs.Uint64("seed", 0, "run seed (default: the scenario's seed)")
	workers := fs.Int("workers", 0, "clocks simulated concurrently (default: GOMAXPROCS; the output does not depend on it)")
	noRinex := fs.Bool("no-rinex", false, "do not write clocks.clk (large for long spans)")
	noSP3 := fs.Bool("no-sp3", false, "do not write orbits.sp3")
	return &command{
		Name:  "simulate",
		Usage: "simulate SCENARIO --out DIR [--seed N] [--workers N] [--no-rinex] [--no-sp3]",
		Short: "simulate a clock-solution dataset with injected walls",
		Long: `Simulate builds the synthetic dataset described by SCENARIO (a built-in
scenario name, see "wallcross scenario list", or a YAML file) and writes it
to DIR:

  manifest.json   tool version, resolved scenario, seed, span, sample interval,
                  clock list, reference clock, SHA-256 of every other file
  clocks.clk      RINEX clock 3.04 (AS satellite, AR station records)
  clocks.csv      t_s, then one column of bias (s) per clock; empty = gap
  clocks.npy      the same matrix, float64 [epochs x clocks], NaN = gap
  orbits.sp3      SP3-d satellite positions
  stations.csv    id,x_m,y_m,z_m,lat_deg,lon_deg,h_m,clock
  events.csv      one row per injected wall
  crossings.csv   one row per (wall, clock): crossing time and own bias step
  nuisances.csv   every gap, outage, jump, outlier, batch step and reference change

Biases are clock minus reference (RINEX clock sign), on GPS time. The same
seed gives the same bytes for any --workers. Every file is written to a
temporary name and renamed, and manifest.json is written last, so a
failed run never leaves a directory that looks complete.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("simulate takes one SCENARIO (a built-in name or a YAML file), got %d arguments", len(args))
			}
			if *out == "" {
				return usageErrorf("missing --out DIR")
			}
			if *workers < 0 {
				return usageErrorf("--workers %d: want ≥ 0", *workers)
			}
			_, err := simulateTo(args[0], *out, sim.Options{Seed: *seed, Workers: *workers, Progress: stderr},
				sim.WriteOptions{SkipRINEX: *noRinex, SkipSP3: *noSP3}, stdout, stderr)
			return err
		},
	}
}

// simulateTo resolves a scenario, runs it and writes the dataset to dir,
// listing the files written on stdout.
func simulateTo(scenario, dir string, opt sim.Options, wopt sim.WriteOptions, stdout, stderr io.Writer) (*sim.Dataset, error) {
	s, err := scenarios.Resolve(scenario)
	if err != nil {
		return nil, err
	}
	cfg := sim.Config{Scenario: s}
	if st, err := os.Stat(scenario); err == nil && !st.IsDir() {
		cfg.BaseDir = filepath.Dir(scenario)
	}
	opt.ToolVersion = buildinfo.Read().Short()
	t0 := time.Now()
	d, err := sim.Run(cfg, opt)
	if err != nil {
		return nil, err
	}
	fmt.Fprintf(stderr, "simulated %s: %d clocks x %d epochs of %g s, %d walls, %d crossings, %d nuisances, seed %d (%.1f s)\n",
		s.Name, len(d.Clocks), d.Epochs, d.Interval, len(d.Events), len(d.Crossings), len(d.Nuisances), d.Seed, time.Since(t0).Seconds())
	paths, err := sim.WriteDir(dir, d, wopt)
	if err != nil {
		return nil, err
	}
	for _, p := range paths {
		size := int64(0)
		if st, err := os.Stat(p); err == nil {
			size = st.Size()
		}
		fmt.Fprintf(stdout, "%s\t%d bytes\n", p, size)
	}
	return d, nil
}

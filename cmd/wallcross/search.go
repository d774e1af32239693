package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"wallcross/sim/search"
)

func newSearchCmd() *command {
	fs := newFlagSet("search")
	out := fs.String("out", "", "candidate file `FILE.csv` to write (required)")
	threshold := fs.Float64("threshold", 6, "report clusters with stat ≥ `X` (|SNR|)")
	directions := fs.Int("directions", 0, "number of wall directions `N` (default: from the timing resolution, at most 2000)")
	speeds := fs.String("speeds", "", "speed classes `LIST` in km/s, e.g. 200,300,450 (default 150,187,233,290,361,450,561,700)")
	thickness := fs.String("thickness", "", "thickness classes `LIST` in km, 0 = thin wall, e.g. 0,2e4 (default 0)")
	couplings := fs.String("couplings", "", "coupling classes `LIST`: eff (K = 1 for every clock) or keys of the clocks' sensitivity coefficients in the manifest (default eff)")
	whiten := fs.Int("whiten", 0, "order `P` of the shared AR whitening filter (0 = white pseudo-frequencies)")
	workers := fs.Int("workers", 0, "goroutines `N` (default GOMAXPROCS; the output does not depend on it)")
	veto := fs.Float64("sweep-veto", 25, "drop candidates whose sweep χ² exceeds `X` and whose clock-by-clock amplitude is below half the reference part's (reference-clock events); 0 keeps every candidate")
	return &command{
		Name:  "search",
		Usage: "search DATASET --out candidates.csv [--threshold X] [--directions N] [--speeds LIST] [--thickness LIST] [--couplings LIST] [--whiten P] [--sweep-veto X] [--workers N]",
		Short: "run the reference matched-filter search on a dataset",
		Long: `Search runs the reference pipeline (package sim/search) on a dataset directory
(manifest.json, clocks.csv or clocks.npy, stations.csv, orbits.sp3) and
writes the candidate walls to FILE.csv.

Each clock's bias (relative to the reference clock) is first-differenced
into pseudo-frequency, restarting after gaps, given a robust (MAD) noise
scale, clipped at 8 σ, and optionally AR-whitened. The reference clock's
common noise is modelled exactly: the covariance of the series at one
epoch is diagonal plus rank one, inverted in closed form (Sherman–Morrison).
A bank of templates — wall directions on a Fibonacci sphere, speed and
thickness classes, coupling classes — is built from the real geometry
(each clock's crossing time t = t0 + n·r(t)/v) including the reference
clock's own crossing, which appears with opposite sign in every series.
The statistic at each t0 (two per sample interval) is the largest
matched-filter |SNR| over the bank; grid points above the threshold are
clustered in time (each loudest point absorbs the points within the
longest sweep 2R/v_min of it) and the loudest of each cluster is written.

Sweep veto: every series carries the reference clock's crossing, so a
step of the reference clock itself (a phase jump) puts the same step in
every series at one instant and matches the reference part of a template.
For each candidate the clock-by-clock part (each clock's own crossing) and
the reference part are fitted jointly; a wall gives both the same
amplitude. sweep_chi2 = (own − ref)²/var is χ² with one degree of freedom
for a wall; candidates above --sweep-veto whose own amplitude is below half
the reference one are dropped (their number is reported).

The candidate file has the columns
  t0_s,stat,nx,ny,nz,speed_m_s,thickness_m,amplitude,coupling,sweep_chi2
t0_s: s since the first epoch, the wall passes the geocentre; stat: |SNR|;
n: unit direction of motion, celestial frame; thickness_m empty for a thin
wall; amplitude: fitted bias step (s) of a clock with unit sensitivity,
signed; sweep_chi2: the sweep consistency above (NaN when the reference's
crossing is outside the data). The file is written to a temporary name
and renamed.

Cost: about directions × speeds × t0 points × clocks × (1 + thickness
and coupling classes × kernel length) operations; a day of 30-s data
with 70 clocks and the default bank (2,000 directions x 8 speeds, thin
walls, two t0 per sample, 6.4e9 template·clock·t0 evaluations) took
30–36 s of CPU (15–18 s on 2 cores) on this project's 2-core machine, and
7.6–10 s on 2 cores at one t0 per sample. A thick class (--thickness 0,1e4) costs
about 9 thin classes for d = 1e4 km at 300 km/s. Progress goes to stderr.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("search takes one DATASET directory, got %d arguments", len(args))
			}
			if *out == "" {
				return usageErrorf("missing --out FILE.csv")
			}
			if math.IsNaN(*threshold) || math.IsInf(*threshold, 0) {
				return usageErrorf("--threshold %g: want a finite number", *threshold)
			}
			if *directions < 0 || *workers < 0 || *whiten < 0 || *whiten > 8 {
				return usageErrorf("--directions %d, --workers %d, --whiten %d: want directions, workers ≥ 0 and whiten in 0..8", *directions, *workers, *whiten)
			}
			if math.IsNaN(*veto) || *veto < 0 {
				return usageErrorf("--sweep-veto %g: want a χ² ≥ 0 (0 keeps every candidate)", *veto)
			}
			cfg := search.Config{Threshold: *threshold, Directions: *directions, Whiten: *whiten, Workers: *workers, SweepVeto: *veto}
			if *veto == 0 {
				cfg.SweepVeto = -1 // 0 means "default" in Config
			}
			if *threshold == 0 {
				cfg.Threshold = math.SmallestNonzeroFloat64 // 0 means "default" in Config
			}
			var err error
			if cfg.Speeds, err = parseList(*speeds, "--speeds", 1e3, false); err != nil {
				return err
			}
			if cfg.Thicknesses, err = parseList(*thickness, "--thickness", 1e3, true); err != nil {
				return err
			}
			if *couplings != "" {
				for _, c := range strings.Split(*couplings, ",") {
					if c = strings.TrimSpace(c); c == "" {
						return usageErrorf("--couplings %q: empty entry", *couplings)
					}
					cfg.Couplings = append(cfg.Couplings, strings.TrimSpace(c))
				}
			}
			return runSearch(args[0], *out, cfg, stdout, stderr)
		},
	}
}

// parseList parses a comma-separated list of numbers in a display unit
// (scale converts to SI). Empty means nil (the default).
func parseList(s, flag string, scale float64, zeroOK bool) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) || v < 0 || (v == 0 && !zeroOK) {
			return nil, usageErrorf("%s %q: entry %q is not a positive number", flag, s, f)
		}
		out = append(out, v*scale)
	}
	return out, nil
}

// runSearch loads the dataset, runs the search and writes the candidates.
func runSearch(dir, out string, cfg search.Config, stdout, stderr io.Writer) error {
	t0 := time.Now()
	net, _, err := search.Load(dir)
	if err != nil {
		return err
	}
	fmt.Fprintf(stderr, "loaded %s: %d clocks x %d epochs of %g s (%.1f s)\n", dir, len(net.Clocks), net.Epochs(), net.Step, time.Since(t0).Seconds())
	last := -1
	cfg.Progress = func(done, total int) {
		if pct := 10 * done / total; pct != last {
			last = pct
			fmt.Fprintf(stderr, "search: %d/%d directions (%.0f s)\n", done, total, time.Since(t0).Seconds())
		}
	}
	res, err := search.Search(net, cfg)
	if err != nil {
		return err
	}
	if err := search.WriteCandidatesFile(out, res.Candidates); err != nil {
		return err
	}
	c := res.Config
	fmt.Fprintf(stderr, "bank: %d directions x %d speeds x %d thicknesses x %d couplings; %.3g template·clock·t0 evaluations; σ_ref %.3g\n",
		len(res.Directions), len(c.Speeds), len(c.Thicknesses), len(c.Couplings), res.Evaluations, res.Noise.SigmaRef)
	if n := len(res.Vetoed); n > 0 {
		fmt.Fprintf(stderr, "sweep veto: %d candidates dropped (loudest stat %.3g at t0 %.0f s, sweep χ² %.3g)\n", n, loudest(res.Vetoed).Stat, loudest(res.Vetoed).T0, loudest(res.Vetoed).SweepChi2)
	}
	fmt.Fprintf(stdout, "%d candidates written to %s (%.1f s)\n", len(res.Candidates), out, time.Since(t0).Seconds())
	return nil
}

// loudest returns the candidate with the largest statistic (cs not empty).
func loudest(cs []search.Candidate) search.Candidate {
	best := cs[0]
	for _, c := range cs[1:] {
		if c.Stat > best.Stat {
			best = c
		}
	}
	return best
}

package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"wallcross/sim/score"
)

func newScoreCmd() *command {
	fs := newFlagSet("score")
	window := fs.Float64("window", 0, "full matching window `S` in seconds (default 2·R_max/v_min of the dataset)")
	threshold := fs.String("threshold", "", "only candidates with stat ≥ `X` count (default: all)")
	dirTol := fs.Float64("direction-tol", 0, "largest angle `DEG` between candidate and true direction (default: no direction test)")
	out := fs.String("out", "", "write summary.json, matches.csv, efficiency.csv, roc.csv and plots to `DIR`")
	return &command{
		Name:  "score",
		Usage: "score DATASET CANDIDATES [--window S] [--threshold X] [--direction-tol DEG] [--out DIR]",
		Short: "score a candidate list against a dataset's injected walls",
		Long: `Score matches a pipeline's candidate list against the walls injected in a
dataset directory (events.csv, crossings.csv, clocks.csv, and stations.csv,
orbits.sp3 when present; without clocks.csv, the directory's one RINEX
clock file, as overlay writes it, gives the data coverage) and reports found, missed and false counts,
efficiency per grid cell (thickness, speed, Λ_eff) with Wilson and
Clopper–Pearson intervals (95 % two-sided), false alarms per day and a ROC
table.

CANDIDATES is a CSV file with a header: t0_s (seconds since the first
epoch of the dataset, the time the wall passes the geocentre) and stat
(larger = more significant) are required; nx,ny,nz (direction of motion),
speed_m_s and thickness_m are optional.

A candidate matches a wall when |t0_cand − t0| ≤ window/2 (and, with
--direction-tol, when the directions agree within DEG; candidates without
a direction then cannot match). Matching is one-to-one: candidates are
taken by decreasing stat, each takes the closest free wall. The default
window is 2·R_max/v_min: R_max is the largest geocentric radius of any
clock (stations.csv, orbits.sp3, crossing lags), v_min the slowest injected
speed.

An injection whose t0 has fewer than half of the clocks with a sample
within ±window/2 is "in a gap": counted separately and left out of every
efficiency; a candidate matched to it is not a false alarm. False alarms
per day are unmatched candidates at or above the threshold divided by the
span of clocks.csv in days.

With --out the files are written atomically; efficiency.csv has the
columns thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,
wilson_low,wilson_high,cp_low,cp_high (speed empty = pooled over more than
16 distinct injected speeds; step_s = median over the cell of each
injection's largest per-clock bias step).`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 2 {
				return usageErrorf("want DATASET and CANDIDATES, got %d arguments", len(args))
			}
			if *window < 0 || math.IsNaN(*window) || math.IsInf(*window, 0) {
				return usageErrorf("--window %g s must be positive", *window)
			}
			if *dirTol < 0 || *dirTol > 180 || math.IsNaN(*dirTol) {
				return usageErrorf("--direction-tol %g° must be in [0, 180]", *dirTol)
			}
			opt := score.Options{Window: *window, DirectionTol: *dirTol * math.Pi / 180}
			if fs.Changed("threshold") {
				v, err := strconv.ParseFloat(strings.TrimSpace(*threshold), 64)
				if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
					return usageErrorf("--threshold %q must be a finite number", *threshold)
				}
				opt.Threshold, opt.HasThreshold = v, true
			}
			tr, err := score.ReadTruth(args[0])
			if err != nil {
				return err
			}
			cands, err := score.ReadCandidatesFile(args[1])
			if err != nil {
				return err
			}
			if opt.DirectionTol > 0 {
				with := 0
				for _, c := range cands {
					if c.HasN {
						with++
					}
				}
				if with == 0 && len(cands) > 0 {
					return fmt.Errorf("--direction-tol needs candidate directions, but %s has no nx,ny,nz values", args[1])
				}
			}
			res, err := score.Score(tr, cands, opt)
			if err != nil {
				return err
			}
			if err := res.WriteSummary(stdout); err != nil {
				return err
			}
			if *out != "" {
				if err := res.WriteFiles(*out); err != nil {
					return err
				}
				fmt.Fprintf(stderr, "wrote summary.json, matches.csv, efficiency.csv, roc.csv to %s\n", *out)
			}
			return nil
		},
	}
}

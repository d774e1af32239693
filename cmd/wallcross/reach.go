package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"wallcross/scenarios"
	"wallcross/sim/score"
)

func newReachCmd() *command {
	fs := newFlagSet("reach")
	means := fs.StringSlice("mean-interval", nil, "mean time `T` between wall encounters, with unit (1yr, 30 d, ...); repeat or comma-separate for several curves")
	span := fs.String("span", "", "observation time `T_obs`, with unit (30d, 1 yr, ...)")
	injected := fs.String("injected-interval", "", "mean interval `T` the table's injections were made with (default: the single --mean-interval)")
	cl := fs.Float64("cl", 0.9, "confidence level of the exclusion")
	out := fs.String("out", "", "write reach.csv and reach.png to `DIR`")
	plotName := fs.String("plot", "reach.png", "plot `FILE` name in DIR (.png or .svg)")
	return &command{
		Name:  "reach",
		Usage: "reach EFFICIENCY.csv --mean-interval T[,T...] --span T_obs [--cl 0.9] [--injected-interval T] [--out DIR]",
		Short: "turn an efficiency table into exclusion curves Λ_eff(d)",
		Long: `Reach folds an efficiency table (as written by score or merge) into
projected exclusion curves of the effective coupling scale Λ_eff against
wall thickness d, one per mean encounter interval T.

With zero candidates observed, walls of (d, Λ_eff) are excluded at CL when
the expected number detected ε·T_obs/T ≥ −ln(1−CL) (2.303 at 90 %, 2.996 at
95 %). The efficiency used is the Clopper–Pearson lower bound (95 %
two-sided) of each cell, recomputed from its n and found, so the limits are
conservative; cells of one (d, Λ_eff) with different speeds are pooled.
Efficiency is measured per cell at fixed (d, Λ_eff); the excluded Λ_eff at d
is the largest Λ_eff whose lower bound satisfies the condition, interpolated
in log Λ_eff towards the next cell of the grid. Since the bias step scales
as T·d²/Λ_eff² (A² = ħc·ρ_DM·v·T·d), the grid is rescaled to each T by
√(T/T_inj), where T_inj is the interval the injections used
(--injected-interval; required with several --mean-interval values).

Statuses in reach.csv: limit; grid_edge (the largest Λ_eff of the grid is
already excluded: a lower bound on the limit); no_limit (no cell is
efficient enough); no_limit_possible (T > T_obs/(−ln(1−CL)): even ε = 1
cannot exclude). The plot shows log-log Λ_eff against d with the
thicknesses without any limit shaded and limit-less points of one curve
marked by crosses.

Durations take a unit: s, min, h, d, yr (Julian year), with or without a
space ("1yr", "30 d").`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("want one EFFICIENCY.csv, got %d arguments", len(args))
			}
			if len(*means) == 0 {
				return usageErrorf("missing --mean-interval T")
			}
			if *span == "" {
				return usageErrorf("missing --span T_obs")
			}
			if !(*cl > 0 && *cl < 1) {
				return usageErrorf("--cl %g must be in (0, 1)", *cl)
			}
			opt := score.ReachOptions{CL: *cl}
			for _, m := range *means {
				v, err := reachDuration(m)
				if err != nil {
					return usageErrorf("--mean-interval: %v", err)
				}
				opt.MeanIntervals = append(opt.MeanIntervals, v)
			}
			var err error
			if opt.Span, err = reachDuration(*span); err != nil {
				return usageErrorf("--span: %v", err)
			}
			if *injected != "" {
				if opt.InjectedInterval, err = reachDuration(*injected); err != nil {
					return usageErrorf("--injected-interval: %v", err)
				}
			} else if len(opt.MeanIntervals) > 1 {
				return usageErrorf("several --mean-interval values need --injected-interval (the T the table's injections used)")
			}
			rows, err := score.ReadEfficiencyFile(args[0])
			if err != nil {
				return err
			}
			pts, err := score.Reach(rows, opt)
			if err != nil {
				return err
			}
			fmt.Fprintf(stdout, "exclusion at %g %% CL, zero candidates: ε_low·T_obs/T ≥ %.4g, T_obs = %g s\n", *cl*100, score.PoissonZeroFactor(*cl), opt.Span)
			fmt.Fprintf(stdout, "efficiency = Clopper–Pearson lower bound (%g %% two-sided) per cell\n", score.EfficiencyCL*100)
			fmt.Fprintf(stdout, "%14s %10s %12s %14s %10s  %s\n", "T_s", "T_yr", "d_m", "lambda_gev", "eps_req", "status")
			for _, p := range pts {
				l := "-"
				if !math.IsNaN(p.Lambda) {
					l = fmt.Sprintf("%.4g", p.Lambda)
				}
				fmt.Fprintf(stdout, "%14.6g %10.4g %12.4g %14s %10.4g  %s\n", p.MeanInterval, p.MeanInterval/scenarios.JulianYear, p.Thickness, l, p.EpsRequired, p.Status)
			}
			if *out != "" {
				if err := os.MkdirAll(*out, 0o755); err != nil {
					return err
				}
				if err := score.WriteReach(filepath.Join(*out, "reach.csv"), pts); err != nil {
					return err
				}
				if err := score.PlotReach(filepath.Join(*out, *plotName), pts, opt.Span); err != nil {
					return err
				}
				fmt.Fprintf(stderr, "wrote reach.csv and %s to %s\n", *plotName, *out)
			}
			return nil
		},
	}
}

// reachDuration reads a duration with its unit ("1yr", "30 d") into
// seconds; it must be positive.
func reachDuration(s string) (float64, error) {
	v, err := scenarios.ParseQuantity(s, scenarios.DimTime)
	if err != nil {
		return 0, err
	}
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("duration %q must be positive", s)
	}
	return v, nil
}

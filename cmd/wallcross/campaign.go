package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"

	"wallcross/scenarios"
	"wallcross/sim/campaign"
	"wallcross/sim/search"
)

func newCampaignCmd() *command {
	fs := newFlagSet("campaign")
	out := fs.String("out", "", "output `DIR` (shards go to DIR/shard-IIII-of-NNNN)")
	shardFlag := fs.String("shard", "", "run only shard `I/N` (default: SLURM_ARRAY_TASK_ID/SLURM_ARRAY_TASK_COUNT when both are set, else everything)")
	offset := fs.Int("shard-offset", 0, "add `K` to the Slurm array task id (arrays split by MaxArraySize)")
	total := fs.Int("shard-count", 0, "total shard `N` when the Slurm array count is only part of it")
	workers := fs.Int("workers", runtime.GOMAXPROCS(0), "trials run concurrently (results do not depend on it)")
	pipeline := fs.String("pipeline", "", "external pipeline `CMD` with {dataset} and {candidates} (default: the reference search)")
	keep := fs.Bool("keep-trials", false, "keep every trial's dataset under DIR/trials (debugging; large)")
	return &command{
		Name:  "campaign",
		Usage: "campaign CAMPAIGN.yaml --out DIR [--shard I/N] [--pipeline 'CMD {dataset} {candidates}']",
		Short: "run an injection–recovery campaign (shardable, Slurm arrays)",
		Long: `Campaign runs the Monte Carlo campaign described by CAMPAIGN.yaml: a grid of
wall thickness × speed class × amplitude (bias step or Λ_eff) with N trials
per cell, each a short dataset made from the base scenario with one wall
and fresh noise, plus background trials without a wall (noise-only
realisations, time slides or whole-day slides; the report says which). Each
trial's dataset is searched by the reference pipeline, or by --pipeline,
whose candidate file is then scored.

Trial k draws only from (campaign seed, k), so any worker count and any
sharding give the same trials. Without --shard (and outside a Slurm array)
everything runs in one process and the merged tables are written to DIR:
efficiency.csv (thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,
wilson_low,wilson_high,cp_low,cp_high), summary.json (threshold, measured
false-alarm probability, sigmoid h50/h90 per thickness), background.csv and
efficiency.png. With --shard I/N only that shard runs; a finished shard is
not rerun, an interrupted one resumes. Merge the shards with
"wallcross merge DIR".

Campaign file (YAML, quantities with units):
  name: my-campaign
  scenario: demo              # base scenario: built-in name or file
  seed: 7
  window: 2 h                 # span of each trial
  trials: 50                  # per cell
  background_trials: 200
  background: noise           # noise | time-slides | day-slides
  false_alarm: 0.01           # sets the threshold from the background (or threshold: X)
  grid:
    thickness: [1e3 km, 1e4 km]
    speed: [300 km/s]
    step: [3 ps, 10 ps, 30 ps]     # or lambda_eff: [1e10 GeV, ...]
  search:                     # bank of the in-process reference search
    directions: 300           # (default: from the timing resolution, ≤ 2000)
    speeds: [200 km/s, 300 km/s, 420 km/s]
  match:
    direction_tol: 30 deg     # also require the direction (default: time only)

Examples: testdata/campaign/ci-campaign.yaml (what CI runs on Slurm) and
testdata/campaign/demo-campaign.yaml (the demo network).`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("want one CAMPAIGN.yaml, got %d arguments", len(args))
			}
			if *out == "" {
				return usageErrorf("missing --out DIR")
			}
			c, err := scenarios.LoadCampaign(args[0])
			if err != nil {
				return err
			}
			base, src, baseDir, err := loadBase(c)
			if err != nil {
				return err
			}
			plan := campaign.NewPlan(c)
			cells, err := campaign.CellInfos(plan, base)
			if err != nil {
				return err
			}
			shard, sharded := campaign.Shard{I: 0, N: 1}, false
			if *shardFlag != "" {
				if shard, err = campaign.ParseShard(*shardFlag); err != nil {
					return usageErrorf("%v", err)
				}
				sharded = true
			} else if s, ok, err := campaign.ShardFromEnv(os.Getenv, *offset, *total); err != nil {
				return err
			} else if ok {
				shard, sharded = s, true
			}
			var pipe campaign.Pipeline
			pipeName := "reference search (sim/search, in process)"
			if *pipeline != "" {
				pipe = campaign.Command(*pipeline)
				pipeName = pipe.String()
			}
			if err := os.MkdirAll(*out, 0o755); err != nil {
				return err
			}
			// The reference search reports candidates down to |SNR| 3, so
			// that the background trials measure the statistic's tail;
			// the campaign threshold is set later from that background.
			runner := &campaign.SimRunner{Plan: plan, Base: base, BaseDir: baseDir, Pipeline: pipe, Keep: *keep,
				Search: campaignSearch(c)}
			if *keep {
				runner.TempDir = filepath.Join(*out, "trials")
				if err := os.MkdirAll(runner.TempDir, 0o755); err != nil {
					return err
				}
			}
			opt := campaign.Options{Workers: *workers, Progress: stderr, Pipeline: pipeName, Hash: c.Hash(src),
				Settings: campaign.Settings{Trials: plan.Trials, PerCell: c.Trials, Background: c.Background,
					FalseAlarm: c.FalseAlarm, Threshold: c.Threshold, Cells: cells, Profile: base.Walls.Profile,
					SpanDays: c.Window.Seconds() / 86400}}
			ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
			defer stop()
			fmt.Fprintf(stderr, "campaign %s: %d cells × %d trials + %d background = %d trials; shard %s; pipeline %s\n",
				c.Name, len(plan.Cells), c.Trials, c.BackgroundTrials, plan.Trials, shard, pipeName)
			ran, err := campaign.RunShard(ctx, plan, runner, shard, *out, opt)
			if err != nil {
				return err
			}
			dir := filepath.Join(*out, campaign.ShardDir(shard))
			if !ran {
				fmt.Fprintf(stdout, "shard %s already finished in %s; nothing to do\n", shard, dir)
			} else {
				fmt.Fprintf(stdout, "shard %s finished: %s\n", shard, dir)
			}
			if sharded {
				fmt.Fprintf(stdout, "merge the shards with: wallcross merge %s\n", *out)
				return nil
			}
			return mergeInto(*out, []string{*out}, stdout)
		},
	}
}

// loadBase reads the campaign's base scenario and its source bytes.
func loadBase(c *scenarios.Campaign) (*scenarios.Scenario, []byte, string, error) {
	ref := c.ScenarioPath()
	if _, err := os.Stat(ref); err == nil {
		src, err := os.ReadFile(ref)
		if err != nil {
			return nil, nil, "", err
		}
		s, err := scenarios.Decode(ref, src)
		return s, src, filepath.Dir(ref), err
	}
	src, err := scenarios.BuiltinSource(ref)
	if err != nil {
		return nil, nil, "", fmt.Errorf("campaign %s: base scenario %q: %w", c.File(), c.Scenario, err)
	}
	s, err := scenarios.Decode("builtin:"+ref, src)
	return s, src, "", err
}

// mergeInto merges the shards found under dirs and writes the tables to out.
func mergeInto(out string, dirs []string, stdout io.Writer) error {
	sh, err := campaign.Shards(dirs)
	if err != nil {
		return err
	}
	pool, err := campaign.Load(sh)
	if err != nil {
		return err
	}
	s, err := campaign.WriteMerged(out, pool)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "merged %d shards (%d trials) of campaign %s into %s\n", len(sh), len(pool.Outcomes), pool.Campaign, out)
	fmt.Fprintf(stdout, "background: %s, %d trials; threshold %.4g (%s); false-alarm probability %.3g [%.3g, %.3g] per trial\n",
		s.Background, s.NBack, s.Threshold, s.ThresholdFrom, s.FAP, s.FAPInterval.Low, s.FAPInterval.High)
	fmt.Fprintf(stdout, "injections: %d (%d in gaps), found %d\n", s.Injections, s.InGap, s.Found)
	for _, f := range s.Fits {
		if f.Err != "" {
			fmt.Fprintf(stdout, "  d = %.3g km: no sigmoid fit (%s)\n", f.Thickness/1e3, f.Err)
			continue
		}
		fmt.Fprintf(stdout, "  d = %.3g km: step at 50%% %.3g s [%.3g, %.3g], at 90%% %.3g s\n", f.Thickness/1e3, f.H50, f.H50Int.Low, f.H50Int.High, f.H90)
	}
	if b := s.SNR10; b.N > 0 {
		fmt.Fprintf(stdout, "injections with optimal network SNR ≥ 10: found %d of %d, efficiency %.3g [%.3g, %.3g] (Clopper–Pearson 95 %%)\n", b.Found, b.N, b.Eff, b.CP.Low, b.CP.High)
	}
	for _, n := range []string{"efficiency.csv", "efficiency_snr.csv", "summary.json", "background.csv", "efficiency.png"} {
		fmt.Fprintf(stdout, "  %s\n", filepath.Join(out, n))
	}
	return nil
}

func newMergeCmd() *command {
	fs := newFlagSet("merge")
	out := fs.String("out", "", "output `DIR` for the merged tables (default: the first DIR)")
	return &command{
		Name:  "merge",
		Usage: "merge DIR... [--out DIR]",
		Short: "merge campaign shards into efficiency tables",
		Long: `Merge reads the shards of one campaign (each DIR is a shard directory or
holds shard-IIII-of-NNNN directories) and writes efficiency.csv,
summary.json, background.csv and efficiency.png. It refuses missing,
unfinished, duplicated or foreign shards and results that do not match
their manifest, and recomputes the threshold, every efficiency, interval
and fit from the pooled per-trial outcomes, so the result is identical to
a single-process run.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) == 0 {
				return usageErrorf("want at least one DIR")
			}
			o := *out
			if o == "" {
				o = args[0]
			}
			return mergeInto(o, args, stdout)
		},
	}
}

// campaignSearch is the in-process reference search of a campaign.
func campaignSearch(c *scenarios.Campaign) search.Config {
	cs := c.Search
	cfg := search.Config{Threshold: cs.Threshold, Directions: cs.Directions, Whiten: cs.Whiten, Workers: 1}
	if cfg.Threshold == 0 {
		cfg.Threshold = campaignSearchThreshold
	}
	for _, v := range cs.Speeds {
		cfg.Speeds = append(cfg.Speeds, v.MetresPerSecond())
	}
	for _, d := range cs.Thickness {
		cfg.Thicknesses = append(cfg.Thicknesses, d.Metres())
	}
	return cfg
}

// campaignSearchThreshold is the lowest |SNR| the in-process reference
// search reports in campaign trials.
const campaignSearchThreshold = 3

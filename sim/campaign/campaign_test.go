package campaign

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wallcross/scenarios"
	"wallcross/sim"
	"wallcross/sim/search"
)

const testCampaign = `name: unit
scenario: check-single-wall
trials: 12
background_trials: 40
false_alarm: 0.05
grid:
  thickness: [1e3 km, 1e4 km]
  step: [0.1 ns, 0.3 ns, 1 ns, 3 ns]
`

// fakeRunner is a stand-in pipeline: its detection statistic is the step
// in units of 0.3 ns plus unit normal noise from the trial's own stream,
// so outcomes depend on the trial id only.
func fakeRunner(p *Plan) Runner {
	return RunnerFunc(func(ctx context.Context, t Trial) (Outcome, error) {
		rng := Rand(p.Campaign.Seed, t.ID)
		o := Outcome{Stat: math.NaN(), TErr: math.NaN(), DirErr: math.NaN(), Step: math.NaN()}
		o.Loudest = rng.NormFloat64()
		if !t.Background {
			o.Step = t.Cell.Step
			o.Stat = t.Cell.Step/0.3e-9 + rng.NormFloat64()
			o.Matched = true
			o.DirErr = 5 * rng.Float64()
			o.InGap = rng.Float64() < 0.05
		}
		return o, nil
	})
}

func testPlan(t *testing.T) (*Plan, Options) {
	t.Helper()
	c, err := scenarios.DecodeCampaign("unit.yaml", []byte(testCampaign))
	if err != nil {
		t.Fatal(err)
	}
	p := NewPlan(c)
	var cells []CellInfo
	for _, c := range p.Cells {
		cells = append(cells, CellInfo{Thickness: c.Thickness, Speed: c.Speed, Step: c.Step, LambdaEff: 1})
	}
	opt := Options{Workers: 2, Hash: c.Hash(nil), Pipeline: "fake",
		Settings: Settings{Trials: p.Trials, PerCell: c.Trials, Background: c.Background, FalseAlarm: c.FalseAlarm, Cells: cells, SpanDays: 2.0 / 24}}
	return p, opt
}

func merged(t *testing.T, dirs ...string) []byte {
	t.Helper()
	sh, err := Shards(dirs)
	if err != nil {
		t.Fatal(err)
	}
	pool, err := Load(sh)
	if err != nil {
		t.Fatal(err)
	}
	out := t.TempDir()
	if _, err := WriteMerged(out, pool); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(out, "efficiency.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestShardsMatchSingleProcess: one process and 3 shards + merge give
// byte-identical efficiency tables, for any worker count.
func TestShardsMatchSingleProcess(t *testing.T) {
	p, opt := testPlan(t)
	one := t.TempDir()
	if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{0, 1}, one, opt); err != nil {
		t.Fatal(err)
	}
	want := merged(t, one)
	three := t.TempDir()
	for i := 0; i < 3; i++ {
		o := opt
		o.Workers = 1 + i
		if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{i, 3}, three, o); err != nil {
			t.Fatal(err)
		}
	}
	if got := merged(t, three); !bytes.Equal(got, want) {
		t.Errorf("3-shard efficiency.csv differs:\n%s\nwant\n%s", got, want)
	}
	if !strings.HasPrefix(string(want), "thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,wilson_low,wilson_high,cp_low,cp_high\n") {
		t.Errorf("header: %s", want)
	}
	// Rerunning a finished shard does nothing.
	ran, err := RunShard(context.Background(), p, RunnerFunc(func(context.Context, Trial) (Outcome, error) {
		return Outcome{}, errors.New("must not run")
	}), Shard{1, 3}, three, opt)
	if err != nil || ran {
		t.Errorf("rerun of a finished shard: ran %v, err %v", ran, err)
	}
}

// TestResume: a shard interrupted mid-way resumes and ends identical.
func TestResume(t *testing.T) {
	p, opt := testPlan(t)
	ref := t.TempDir()
	if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{0, 1}, ref, opt); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	n := 0
	inner := fakeRunner(p)
	opt.Workers = 1
	_, err := RunShard(ctx, p, RunnerFunc(func(ctx context.Context, tr Trial) (Outcome, error) {
		n++
		if n == 37 {
			cancel() // killed after 36 trials
			return Outcome{}, ctx.Err()
		}
		return inner.RunTrial(ctx, tr)
	}), Shard{0, 1}, dir, opt)
	if err == nil {
		t.Fatal("interrupted shard reported success")
	}
	j, _ := os.ReadFile(filepath.Join(dir, ShardDir(Shard{0, 1}), journalName))
	// Tear the last line, as a crash mid-write would.
	os.WriteFile(filepath.Join(dir, ShardDir(Shard{0, 1}), journalName), j[:len(j)-7], 0o644)
	if _, err := Shards([]string{dir}); err != nil {
		t.Fatal(err)
	}
	if _, err := Load([]string{filepath.Join(dir, ShardDir(Shard{0, 1}))}); err == nil || !strings.Contains(err.Error(), "unfinished") {
		t.Errorf("merging an unfinished shard: %v", err)
	}
	rerun := 0
	if _, err := RunShard(context.Background(), p, RunnerFunc(func(ctx context.Context, tr Trial) (Outcome, error) {
		rerun++
		return inner.RunTrial(ctx, tr)
	}), Shard{0, 1}, dir, opt); err != nil {
		t.Fatal(err)
	}
	if rerun != p.Trials-35 {
		t.Errorf("resume ran %d trials, want %d (35 kept, 1 torn)", rerun, p.Trials-35)
	}
	if !bytes.Equal(merged(t, dir), merged(t, ref)) {
		t.Error("resumed shard differs from an uninterrupted run")
	}
}

func TestMergeRefusals(t *testing.T) {
	p, opt := testPlan(t)
	dir := t.TempDir()
	for i := 0; i < 3; i++ {
		if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{i, 3}, dir, opt); err != nil {
			t.Fatal(err)
		}
	}
	sh, _ := Shards([]string{dir})
	if _, err := Load(sh[:2]); err == nil || !strings.Contains(err.Error(), "missing shards 2/3") {
		t.Errorf("missing shard: %v", err)
	}
	if _, err := Load(append(sh, sh[0])); err == nil || !strings.Contains(err.Error(), "appears twice") {
		t.Errorf("duplicate shard: %v", err)
	}
	other := t.TempDir()
	o2 := opt
	o2.Hash = "0123456789abcdef"
	if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{2, 3}, other, o2); err != nil {
		t.Fatal(err)
	}
	sh2, _ := Shards([]string{other})
	if _, err := Load(append(sh[:2], sh2...)); err == nil || !strings.Contains(err.Error(), "another campaign") {
		t.Errorf("foreign shard: %v", err)
	}
	// A tampered results file is refused.
	r := filepath.Join(sh[1], resultsName)
	b, _ := os.ReadFile(r)
	os.WriteFile(r, bytes.Replace(b, []byte("true"), []byte("false"), 1), 0o644)
	if _, err := Load(sh); err == nil || !strings.Contains(err.Error(), "checksum") {
		t.Errorf("tampered shard: %v", err)
	}
	// A shard directory of another campaign is not overwritten.
	if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{2, 3}, other, opt); err == nil {
		t.Error("running into a foreign finished shard succeeded")
	}
}

func TestThresholdAndEfficiency(t *testing.T) {
	p, opt := testPlan(t)
	dir := t.TempDir()
	if _, err := RunShard(context.Background(), p, fakeRunner(p), Shard{0, 1}, dir, opt); err != nil {
		t.Fatal(err)
	}
	sh, _ := Shards([]string{dir})
	pool, err := Load(sh)
	if err != nil {
		t.Fatal(err)
	}
	rows, s, err := pool.Tables()
	if err != nil {
		t.Fatal(err)
	}
	// Background is N(0,1): the 5 % threshold lies near 1.64 and at most
	// 2 of 40 background trials (⌊0.05·40⌋) exceed it.
	if s.Threshold < 0.8 || s.Threshold > 2.6 || s.FAP > 0.05 {
		t.Errorf("threshold %g, measured FAP %g", s.Threshold, s.FAP)
	}
	// Efficiency rises with the step; 3 ns (stat ≈ 10) is always found.
	for _, r := range rows {
		if r.Step == 3e-9 && r.Found != r.N {
			t.Errorf("3 ns: %d of %d", r.Found, r.N)
		}
		if r.Step == 0.1e-9 && r.Eff > 0.6 {
			t.Errorf("0.1 ns: eff %g", r.Eff)
		}
	}
	if len(s.Fits) != 2 || s.InGap == 0 {
		t.Errorf("fits %d, in gap %d", len(s.Fits), s.InGap)
	}
}

func TestShardParsing(t *testing.T) {
	if s, err := ParseShard("2/8"); err != nil || s != (Shard{2, 8}) {
		t.Errorf("2/8 → %v, %v", s, err)
	}
	for _, bad := range []string{"8/8", "-1/3", "x/3", "3"} {
		if _, err := ParseShard(bad); err == nil {
			t.Errorf("ParseShard(%q) accepted", bad)
		}
	}
	env := func(m map[string]string) func(string) string { return func(k string) string { return m[k] } }
	s, ok, err := ShardFromEnv(env(map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_COUNT": "3"}), 0, 0)
	if err != nil || !ok || s != (Shard{1, 3}) {
		t.Errorf("env → %v %v %v", s, ok, err)
	}
	if _, _, err := ShardFromEnv(env(map[string]string{"SLURM_ARRAY_TASK_ID": "1"}), 0, 0); err == nil {
		t.Error("only SLURM_ARRAY_TASK_ID set: accepted")
	}
	s, _, err = ShardFromEnv(env(map[string]string{"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_COUNT": "5"}), 1000, 2000)
	if err != nil || s != (Shard{1004, 2000}) {
		t.Errorf("offset → %v %v", s, err)
	}
}

// TestOptimalSNR runs real trials of the CI campaign (reference search)
// and checks the optimal-SNR column: the trial simulated without its wall
// has exactly the same noise (the signal is zero before the first
// crossing), the SNR grows in proportion to the step (the signal is linear
// in the amplitude and the noise model barely moves), and the loudest
// injection is found with a statistic close to its optimal SNR (the bank's
// grid and clipping lose a little, noise adds N(0, 1)).
func TestOptimalSNR(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "campaign")
	c, err := scenarios.LoadCampaign(filepath.Join(dir, "ci-campaign.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	src, err := os.ReadFile(c.ScenarioPath())
	if err != nil {
		t.Fatal(err)
	}
	base, err := scenarios.Decode(c.ScenarioPath(), src)
	if err != nil {
		t.Fatal(err)
	}
	p := NewPlan(c)
	// A finer bank than the campaign's, with the injected thickness class,
	// so that the statistic can be held against the optimal SNR.
	cfg := search.Config{Threshold: 3, Workers: 2, Directions: 500, Thicknesses: []float64{0, 1e7}}
	r := &SimRunner{Plan: p, Base: base, BaseDir: dir, Search: cfg, TempDir: t.TempDir()}

	// One trial (same geometry and noise draws) at every step of the grid.
	var snr, step []float64
	for ci := range p.Cells {
		if raceEnabled && ci != 0 && ci != len(p.Cells)-1 {
			continue // the smallest and largest step only
		}
		tr := p.Trial(0)
		tr.Cell = p.Cells[ci]
		o, err := r.RunTrial(context.Background(), tr)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("cell %d (step %.3g s): snr_opt %.2f, matched %v, stat %.2f", ci, tr.Cell.Step, o.SNROpt, o.Matched, o.Stat)
		if !(o.SNROpt > 0) {
			t.Fatalf("cell %d: snr_opt %g", ci, o.SNROpt)
		}
		snr, step = append(snr, o.SNROpt), append(step, tr.Cell.Step)
		if ci == len(p.Cells)-1 {
			if !o.Matched || o.Stat < 0.7*o.SNROpt || o.Stat > 1.1*o.SNROpt+3 {
				t.Errorf("loudest cell: stat %.2f (matched %v) against optimal SNR %.2f", o.Stat, o.Matched, o.SNROpt)
			}
		}
	}
	for i := 1; i < len(snr); i++ {
		if r := (snr[i] / snr[0]) / (step[i] / step[0]); r < 0.9 || r > 1.1 {
			t.Errorf("snr_opt %.3g at step %.3g s and %.3g at %.3g s: not proportional", snr[0], step[0], snr[i], step[i])
		}
	}

	// Noise identical without the wall.
	tr := p.Trial(0)
	s, _ := r.Scenario(tr)
	presets, err := r.calibrated()
	if err != nil {
		t.Fatal(err)
	}
	opt := sim.Options{Seed: c.Seed, Trial: tr.ID, Workers: 1, SP3Interval: 300, Presets: presets}
	with, err := sim.Run(sim.Config{Scenario: s, BaseDir: dir}, opt)
	if err != nil {
		t.Fatal(err)
	}
	s0 := *s
	s0.Walls.Events = nil
	without, err := sim.Run(sim.Config{Scenario: &s0, BaseDir: dir}, opt)
	if err != nil {
		t.Fatal(err)
	}
	sig, err := signalOf(with, without)
	if err != nil {
		t.Fatal(err)
	}
	first := math.Inf(1)
	for _, x := range with.Crossings {
		first = math.Min(first, x.TCross)
	}
	nz, before := 0, 0
	for j := range sig {
		for k, v := range sig[j] {
			if float64(k)*with.Interval < first-600 {
				before++
				if v != 0 && !math.IsNaN(v) {
					t.Fatalf("clock %s, epoch %d (%.0f s before the first crossing): signal %g s without a wall", with.Clocks[j].ID, k, first-float64(k)*with.Interval, v)
				}
			} else if v != 0 && !math.IsNaN(v) {
				nz++
			}
		}
	}
	if before == 0 || nz == 0 {
		t.Fatalf("%d values before the wall, %d non-zero after: nothing checked", before, nz)
	}
}

package campaign

import (
	"context"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"wallcross/scenarios"
	"wallcross/sim/search"
)

// benchRunner is the CI campaign (testdata/campaign): 32 clocks, 1 h
// trials at 30 s, the reference search with a 150-direction × 3-speed bank.
func benchRunner(b *testing.B) (*SimRunner, *Plan) {
	b.Helper()
	dir := filepath.Join("..", "..", "testdata", "campaign")
	c, err := scenarios.LoadCampaign(filepath.Join(dir, "ci-campaign.yaml"))
	if err != nil {
		b.Fatal(err)
	}
	c.Trials, c.BackgroundTrials = 10000, 0
	src, err := os.ReadFile(c.ScenarioPath())
	if err != nil {
		b.Fatal(err)
	}
	base, err := scenarios.Decode(c.ScenarioPath(), src)
	if err != nil {
		b.Fatal(err)
	}
	p := NewPlan(c)
	cfg := search.Config{Threshold: 3, Directions: c.Search.Directions, Workers: 1}
	for _, v := range c.Search.Speeds {
		cfg.Speeds = append(cfg.Speeds, v.MetresPerSecond())
	}
	return &SimRunner{Plan: p, Base: base, BaseDir: dir, Search: cfg, TempDir: b.TempDir()}, p
}

// BenchmarkTrial reports injection–recovery trials per second (one
// trial: simulate, write, search, score), two trials at a time as the
// campaign's worker pool runs them on 2 cores, and the time a 10 000-trial
// campaign would take at that rate.
func BenchmarkTrial(b *testing.B) {
	r, p := benchRunner(b)
	k := 0
	for b.Loop() {
		var wg sync.WaitGroup
		errs := make([]error, 2)
		for w := range 2 {
			wg.Add(1)
			go func() {
				defer wg.Done()
				_, errs[w] = r.RunTrial(context.Background(), p.Trial((k+w)%p.Injections()))
			}()
		}
		wg.Wait()
		for _, err := range errs {
			if err != nil {
				b.Fatal(err)
			}
		}
		k += 2
	}
	rate := float64(k) / b.Elapsed().Seconds()
	b.ReportMetric(rate, "trials/s")
	b.ReportMetric(10000/rate/60, "min/10k-trials")
}

package campaign

import (
	"bufio"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	"wallcross/internal/atomicfile"
	"wallcross/internal/buildinfo"
)

// Runner runs one trial. Implementations must draw every random number
// from Rand(seed, t.ID) (or SubSeed) and nothing else.
type Runner interface {
	RunTrial(ctx context.Context, t Trial) (Outcome, error)
}

// RunnerFunc adapts a function to Runner.
type RunnerFunc func(ctx context.Context, t Trial) (Outcome, error)

// RunTrial calls f.
func (f RunnerFunc) RunTrial(ctx context.Context, t Trial) (Outcome, error) { return f(ctx, t) }

// ShardManifest identifies a finished shard.
type ShardManifest struct {
	Campaign     string `json:"campaign"`
	CampaignHash string `json:"campaign_hash"`
	Shard        int    `json:"shard"`
	Shards       int    `json:"shards"`
	Trials       []int  `json:"trials"`
	Pipeline     string `json:"pipeline"`
	Tool         string `json:"tool"`
	Finished     string `json:"finished_utc"`
	ResultsSHA   string `json:"results_sha256"`
	// Settings are what merging needs to rebuild the campaign's tables.
	Settings Settings `json:"settings"`
}

// Settings are the campaign quantities every shard records, so that a
// merge needs nothing but the shard directories.
type Settings struct {
	Trials     int        `json:"trials"`      // total trial count
	PerCell    int        `json:"per_cell"`    // injection trials per cell
	Background string     `json:"background"`  // background kind
	FalseAlarm float64    `json:"false_alarm"` // target per-trial false-alarm probability (0: fixed threshold)
	Threshold  float64    `json:"threshold"`   // fixed threshold (0: from the background)
	Cells      []CellInfo `json:"cells"`       // the grid
	Profile    string     `json:"profile"`     // wall profile
	SpanDays   float64    `json:"window_days"` // span of one trial, d
}

// CellInfo is one grid cell with both amplitude measures filled in.
type CellInfo struct {
	Thickness float64 `json:"thickness_m"`
	Speed     float64 `json:"speed_m_s"`
	Step      float64 `json:"step_s"`         // bias step of a unit-sensitivity clock
	LambdaEff float64 `json:"lambda_eff_gev"` // Λ_eff of a unit-sensitivity clock
}

// ShardDir returns the directory name of shard s.
func ShardDir(s Shard) string { return fmt.Sprintf("shard-%04d-of-%04d", s.I, s.N) }

const (
	resultsName  = "results.csv"
	journalName  = "journal.csv"
	manifestName = "manifest.json"
)

// Options of a shard run.
type Options struct {
	Workers  int       // worker goroutines (default 1)
	Progress io.Writer // progress lines with ETA (nil: none)
	Pipeline string    // description of the pipeline, recorded in the manifest
	Hash     string    // campaign hash (scenarios.Campaign.Hash)
	Settings Settings  // recorded in the shard manifest
}

// RunShard runs the trials of shard s into out/ShardDir(s). A finished
// shard of the same campaign is left as it is (done = false, nil error);
// an interrupted one resumes after its journal's completed trials.
func RunShard(ctx context.Context, p *Plan, r Runner, s Shard, out string, opt Options) (done bool, err error) {
	dir := filepath.Join(out, ShardDir(s))
	if m, err := readShardManifest(dir); err == nil {
		if m.CampaignHash != opt.Hash {
			return false, fmt.Errorf("campaign: %s holds a finished shard of another campaign (hash %.12s…, this one %.12s…); use another --out", dir, m.CampaignHash, opt.Hash)
		}
		return false, nil
	} else if !errors.Is(err, os.ErrNotExist) {
		return false, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return false, fmt.Errorf("campaign: %w", err)
	}
	var ids []int
	for k := 0; k < p.Trials; k++ {
		if s.Owns(k) {
			ids = append(ids, k)
		}
	}
	// Resume: trials already in the journal.
	jpath := filepath.Join(dir, journalName)
	have, err := readJournal(jpath, opt.Hash)
	if err != nil {
		return false, err
	}
	var todo []int
	for _, k := range ids {
		if _, ok := have[k]; !ok {
			todo = append(todo, k)
		}
	}
	if err := appendJournal(ctx, p, r, jpath, opt, todo, have, len(ids)); err != nil {
		return false, err
	}
	// All trials are in: write results (sorted) and the manifest.
	outs := make([]Outcome, 0, len(ids))
	for _, k := range ids {
		outs = append(outs, have[k])
	}
	sum, err := writeOutcomes(filepath.Join(dir, resultsName), outs)
	if err != nil {
		return false, err
	}
	m := ShardManifest{Campaign: p.Campaign.Name, CampaignHash: opt.Hash, Shard: s.I, Shards: s.N,
		Trials: ids, Pipeline: opt.Pipeline, Tool: "wallcross " + buildinfo.Read().Short(),
		Finished: time.Now().UTC().Format(time.RFC3339), ResultsSHA: sum, Settings: opt.Settings}
	if m.Trials == nil {
		m.Trials = []int{}
	}
	if _, _, err := atomicfile.Write(filepath.Join(dir, manifestName), func(w *bufio.Writer) error {
		enc := json.NewEncoder(w)
		enc.SetIndent("", " ")
		return enc.Encode(m)
	}); err != nil {
		return false, fmt.Errorf("campaign: %w", err)
	}
	os.Remove(jpath)
	return true, nil
}

// appendJournal runs todo with a worker pool and appends each outcome to
// the journal as soon as it is known.
func appendJournal(ctx context.Context, p *Plan, r Runner, jpath string, opt Options, todo []int, have map[int]Outcome, total int) error {
	if len(todo) == 0 {
		return nil
	}
	f, err := os.OpenFile(jpath, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o644)
	if err != nil {
		return fmt.Errorf("campaign: %w", err)
	}
	defer f.Close()
	if st, _ := f.Stat(); st.Size() == 0 {
		fmt.Fprintf(f, "# campaign %s\n%s\n", opt.Hash, strings.Join(outcomeHeader, ","))
	}
	workers := opt.Workers
	if workers < 1 {
		workers = 1
	}
	if workers > len(todo) {
		workers = len(todo)
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	jobs := make(chan int)
	var mu sync.Mutex
	var firstErr error
	doneN := total - len(todo)
	start := time.Now()
	lastReport := time.Time{}
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range jobs {
				if ctx.Err() != nil {
					continue // interrupted: leave the rest for the rerun
				}
				o, err := r.RunTrial(ctx, p.Trial(k))
				mu.Lock()
				if err != nil {
					if firstErr == nil {
						firstErr = fmt.Errorf("campaign: trial %d: %w", k, err)
						cancel()
					}
					mu.Unlock()
					continue
				}
				o.ID = k
				line := strings.Join(o.strings(), ",") + "\n"
				if _, err := f.WriteString(line); err == nil {
					err = f.Sync()
					if err != nil && firstErr == nil {
						firstErr = fmt.Errorf("campaign: journal: %w", err)
						cancel()
					}
				} else if firstErr == nil {
					firstErr = fmt.Errorf("campaign: journal: %w", err)
					cancel()
				}
				have[k] = o
				doneN++
				if opt.Progress != nil && (time.Since(lastReport) > 2*time.Second || doneN == total) {
					lastReport = time.Now()
					el := time.Since(start)
					ran := doneN - (total - len(todo))
					eta := time.Duration(float64(el) / float64(ran) * float64(total-doneN))
					fmt.Fprintf(opt.Progress, "campaign: %d/%d trials (%.0f%%), elapsed %s, ETA %s\n", doneN, total, 100*float64(doneN)/float64(total), el.Round(time.Second), eta.Round(time.Second))
				}
				mu.Unlock()
			}
		}()
	}
feed:
	for _, k := range todo {
		select {
		case jobs <- k:
		case <-ctx.Done():
			break feed
		}
	}
	close(jobs)
	wg.Wait()
	if firstErr != nil {
		return firstErr
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("campaign: interrupted after %d of %d trials (rerun to resume): %w", doneN, total, err)
	}
	return nil
}

// readJournal reads the completed trials of an interrupted shard. A torn
// last line (a crash mid-write) is ignored; a journal of another campaign
// is an error.
func readJournal(path, hash string) (map[int]Outcome, error) {
	have := map[int]Outcome{}
	data, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return have, nil
	}
	if err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	lines := strings.Split(string(data), "\n")
	if len(lines) < 2 || lines[0] != "# campaign "+hash {
		return nil, fmt.Errorf("campaign: %s belongs to another campaign or is damaged (first line %q); remove it to start the shard afresh", path, firstN(lines[0], 80))
	}
	for i, l := range lines[2:] {
		if l == "" {
			continue
		}
		complete := i+3 < len(lines) // followed by a newline
		rec := strings.Split(l, ",")
		o, err := parseOutcome(rec)
		if err != nil {
			if !complete {
				break // torn final line
			}
			return nil, fmt.Errorf("campaign: %s:%d: %v", path, i+3, err)
		}
		have[o.ID] = o
	}
	return have, nil
}

func firstN(s string, n int) string {
	if len(s) > n {
		return s[:n]
	}
	return s
}

func writeOutcomes(path string, outs []Outcome) (string, error) {
	sort.Slice(outs, func(i, j int) bool { return outs[i].ID < outs[j].ID })
	sum, _, err := atomicfile.Write(path, func(w *bufio.Writer) error {
		cw := csv.NewWriter(w)
		cw.Write(outcomeHeader)
		for _, o := range outs {
			cw.Write(o.strings())
		}
		cw.Flush()
		return cw.Error()
	})
	if err != nil {
		return "", fmt.Errorf("campaign: %w", err)
	}
	return sum, nil
}

func readShardManifest(dir string) (*ShardManifest, error) {
	data, err := os.ReadFile(filepath.Join(dir, manifestName))
	if err != nil {
		return nil, err
	}
	var m ShardManifest
	if err := json.Unmarshal(data, &m); err != nil {
		return nil, fmt.Errorf("campaign: %s: %w", filepath.Join(dir, manifestName), err)
	}
	return &m, nil
}

func readOutcomes(path string) ([]Outcome, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	defer f.Close()
	r := csv.NewReader(bufio.NewReader(f))
	head, err := r.Read()
	if err != nil || strings.Join(head, ",") != strings.Join(outcomeHeader, ",") {
		return nil, fmt.Errorf("campaign: %s:1: want header %s", path, strings.Join(outcomeHeader, ","))
	}
	var outs []Outcome
	for {
		rec, err := r.Read()
		if err == io.EOF {
			return outs, nil
		}
		line, _ := r.FieldPos(0)
		if err != nil {
			return nil, fmt.Errorf("campaign: %s:%d: %w", path, line, err)
		}
		o, err := parseOutcome(rec)
		if err != nil {
			return nil, fmt.Errorf("campaign: %s:%d: %w", path, line, err)
		}
		outs = append(outs, o)
	}
}

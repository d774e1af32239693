package campaign

import (
	"context"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"

	"wallcross/inject"
	"wallcross/noise"
	"wallcross/scenarios"
	"wallcross/sim"
	"wallcross/sim/score"
	"wallcross/sim/search"
)

// Pipeline runs a search on a dataset directory and writes its candidate
// file (DESIGN.md §5 candidate format).
type Pipeline interface {
	Search(ctx context.Context, dataset, candidates string) error
	String() string
}

// Command is an external pipeline: a command line in which {dataset} and
// {candidates} are replaced by the paths, run through /bin/sh -c.
type Command string

// Search runs the command.
func (c Command) Search(ctx context.Context, dataset, candidates string) error {
	line := strings.NewReplacer("{dataset}", shellQuote(dataset), "{candidates}", shellQuote(candidates)).Replace(string(c))
	cmd := exec.CommandContext(ctx, "/bin/sh", "-c", line)
	out, err := cmd.CombinedOutput()
	if err != nil {
		return fmt.Errorf("pipeline %q: %w\n%s", line, err, lastLines(string(out), 10))
	}
	if _, err := os.Stat(candidates); err != nil {
		return fmt.Errorf("pipeline %q wrote no candidate file %s", line, candidates)
	}
	return nil
}

func (c Command) String() string { return "command: " + string(c) }

func shellQuote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

func lastLines(s string, n int) string {
	l := strings.Split(strings.TrimRight(s, "\n"), "\n")
	if len(l) > n {
		l = l[len(l)-n:]
	}
	return strings.Join(l, "\n")
}

// SimRunner makes each trial's dataset with package sim from the base
// scenario, runs the pipeline on it and scores the candidates.
type SimRunner struct {
	Plan    *Plan
	Base    *scenarios.Scenario
	BaseDir string // directory of relative paths in the base scenario
	// Pipeline is the external pipeline; nil runs the reference search
	// in process with Search as its settings.
	Pipeline Pipeline
	Search   search.Config
	TempDir  string // where trial datasets are written (default os.TempDir)
	Keep     bool   // keep trial datasets (debugging)

	presetsOnce sync.Once
	presets     map[string]noise.ClockModel
	presetsErr  error
}

// calibrated returns the noise presets of every family in the base
// scenario, calibrated once for the whole campaign.
func (r *SimRunner) calibrated() (map[string]noise.ClockModel, error) {
	r.presetsOnce.Do(func() {
		r.presets = map[string]noise.ClockModel{}
		fams := map[string]bool{}
		for _, c := range r.Base.Constellations {
			fams[c.Clock] = true
		}
		for _, st := range r.Base.Stations {
			fams[st.Clock] = true
		}
		for f := range fams {
			m, err := noise.Preset(f)
			if err != nil {
				r.presetsErr = err
				return
			}
			r.presets[f] = m
		}
	})
	return r.presets, r.presetsErr
}

// trialSpec is what one trial injects, drawn from its own stream.
type trialSpec struct {
	startOffsetDays int
	t0              float64
	n               [3]float64
	slide           int
}

// draw returns the trial's random choices. The order of draws is fixed.
func (r *SimRunner) draw(t Trial) trialSpec {
	c := r.Plan.Campaign
	rng := Rand(c.Seed, t.ID)
	var s trialSpec
	// A different day of the year for every trial varies the geometry.
	s.startOffsetDays = rng.IntN(365)
	w := c.Window.Seconds()
	step := r.Base.Time.Step.Seconds()
	s.t0 = math.Round((w/3+rng.Float64()*w/3)/step*1e3) / 1e3 * step
	switch c.Direction {
	case "isotropic":
		s.n = isotropicDir(rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64())
	default:
		h := inject.StandardHalo()
		v := h.SampleRelative(rng, s.t0)
		s.n = isotropicDir(v[0], v[1], v[2])
	}
	s.slide = 1 + rng.IntN(1<<20)
	return s
}

func isotropicDir(x, y, z float64) [3]float64 {
	l := math.Sqrt(x*x + y*y + z*z)
	if l == 0 {
		return [3]float64{0, 0, 1}
	}
	return [3]float64{x / l, y / l, z / l}
}

// Scenario returns the scenario of trial t.
func (r *SimRunner) Scenario(t Trial) (*scenarios.Scenario, trialSpec) {
	c := r.Plan.Campaign
	sp := r.draw(t)
	s := *r.Base
	s.Name = fmt.Sprintf("%s-trial-%d", c.Name, t.ID)
	s.Time.Start.Time = s.Time.Start.Time.AddDate(0, 0, sp.startOffsetDays)
	s.Time.Span = c.Window
	if c.Background == "day-slides" && t.Background {
		s.Time.Span = scenarios.Seconds(c.Window.Seconds() + daySlides*86400)
	}
	w := s.Walls
	w.Population = nil
	w.Events = nil
	if !t.Background {
		w.Thickness = scenarios.Metres(t.Cell.Thickness)
		if t.Cell.Step > 0 {
			w.Step = scenarios.Seconds(t.Cell.Step)
			w.PeakDnu = 0
		} else {
			w.Step = scenarios.Duration{}
			w.PeakDnu = 0
			w.LambdaEff = scenarios.GeVEnergy(t.Cell.LambdaEff)
		}
		w.Events = []scenarios.WallEvent{{
			T0:        scenarios.Seconds(sp.t0),
			Direction: sp.n[:],
			Speed:     scenarios.MetresPerSecond(t.Cell.Speed),
			Thickness: scenarios.Metres(t.Cell.Thickness),
		}}
	}
	s.Walls = w
	return &s, sp
}

// daySlides is the number of extra days simulated for whole-day slides.
const daySlides = 3

// RunTrial makes, searches and scores trial t.
func (r *SimRunner) RunTrial(ctx context.Context, t Trial) (Outcome, error) {
	c := r.Plan.Campaign
	s, sp := r.Scenario(t)
	presets, err := r.calibrated()
	if err != nil {
		return Outcome{}, err
	}
	ds, err := sim.Run(sim.Config{Scenario: s, BaseDir: r.BaseDir}, sim.Options{Seed: c.Seed, Trial: t.ID, Workers: 1, SP3Interval: 300, Presets: presets})
	if err != nil {
		return Outcome{}, err
	}
	if t.Background {
		switch c.Background {
		case "time-slides":
			timeSlide(ds, sp.slide)
		case "day-slides":
			daySlide(ds, c.Window.Seconds())
		}
	}
	dir, err := os.MkdirTemp(r.TempDir, fmt.Sprintf("trial-%d-", t.ID))
	if err != nil {
		return Outcome{}, err
	}
	if !r.Keep {
		defer os.RemoveAll(dir)
	}
	if _, err := sim.WriteDir(dir, ds, sim.WriteOptions{SkipRINEX: true, SkipNPY: r.Pipeline == nil}); err != nil {
		return Outcome{}, err
	}
	cands := filepath.Join(dir, "candidates.csv")
	net, err := search.FromDataset(ds)
	if err != nil {
		return Outcome{}, err
	}
	var nm search.NoiseModel
	if r.Pipeline != nil {
		if err := r.Pipeline.Search(ctx, dir, cands); err != nil {
			return Outcome{}, err
		}
		if !t.Background {
			if nm, err = search.FitNoise(net, r.Search); err != nil {
				return Outcome{}, err
			}
		}
	} else {
		res, err := search.Search(net, r.Search)
		if err != nil {
			return Outcome{}, err
		}
		if err := search.WriteCandidatesFile(cands, res.Candidates); err != nil {
			return Outcome{}, err
		}
		nm = res.Noise
	}
	o, err := scoreTrial(dir, cands, c, t)
	if err != nil || t.Background {
		return o, err
	}
	o.SNROpt, err = r.optimalSNR(s, net, ds, nm, t)
	return o, err
}

// optimalSNR returns the optimal network SNR of trial t's injection: the
// trial is simulated again without its wall (the same seed and trial
// streams, so the noise and nuisances are the same draws), the difference
// of the two products is the wall's signal as the clock solutions carry
// it, and its SNR is taken under the noise model nm fitted to the data.
func (r *SimRunner) optimalSNR(s *scenarios.Scenario, net *search.Network, ds *sim.Dataset, nm search.NoiseModel, t Trial) (float64, error) {
	c := r.Plan.Campaign
	presets, err := r.calibrated()
	if err != nil {
		return math.NaN(), err
	}
	s0 := *s
	s0.Walls.Events = nil
	d0, err := sim.Run(sim.Config{Scenario: &s0, BaseDir: r.BaseDir}, sim.Options{Seed: c.Seed, Trial: t.ID, Workers: 1, SP3Interval: 300, Presets: presets})
	if err != nil {
		return math.NaN(), err
	}
	sig, err := signalOf(ds, d0)
	if err != nil {
		return math.NaN(), err
	}
	return nm.SignalSNR(net, sig)
}

// signalOf returns with − without per clock ([clock][epoch], s); an epoch
// absent in either is NaN.
func signalOf(with, without *sim.Dataset) ([][]float64, error) {
	nc := len(with.Clocks)
	if len(without.Clocks) != nc || without.Epochs != with.Epochs {
		return nil, fmt.Errorf("campaign: trial without its wall has %d clocks × %d epochs, with it %d × %d", len(without.Clocks), without.Epochs, nc, with.Epochs)
	}
	out := make([][]float64, nc)
	for j := range out {
		if without.Clocks[j].ID != with.Clocks[j].ID {
			return nil, fmt.Errorf("campaign: clock %d is %q without the wall, %q with it", j, without.Clocks[j].ID, with.Clocks[j].ID)
		}
		v := make([]float64, with.Epochs)
		for k := range v {
			v[k] = with.Bias[k*nc+j] - without.Bias[k*nc+j]
		}
		out[j] = v
	}
	return out, nil
}

// scoreTrial matches the candidates of one trial to its injection.
func scoreTrial(dir, cands string, c *scenarios.Campaign, t Trial) (Outcome, error) {
	o := Outcome{Stat: math.NaN(), Loudest: math.NaN(), TErr: math.NaN(), DirErr: math.NaN(), Step: math.NaN(), SNROpt: math.NaN()}
	tr, err := score.ReadTruth(dir)
	if err != nil {
		return o, err
	}
	cs, err := score.ReadCandidatesFile(cands)
	if err != nil {
		return o, err
	}
	res, err := score.Score(tr, cs, score.Options{Window: c.Match.Window.Seconds(), DirectionTol: c.Match.DirectionTol.Radians()})
	if err != nil {
		return o, err
	}
	for _, m := range res.Matches {
		if m.Event == "" {
			if math.IsNaN(o.Loudest) || m.Stat > o.Loudest {
				o.Loudest = m.Stat
			}
			continue
		}
		o.Step = m.Step
		o.InGap = m.Status == score.StatusGapFound || m.Status == score.StatusGapMiss
		if !math.IsNaN(m.Stat) {
			o.Matched, o.Stat, o.TErr, o.DirErr = true, m.Stat, m.DeltaT, m.AngleDeg
		}
	}
	return o, nil
}

// timeSlide shifts clock j's series circularly by j·lag epochs, so that
// any coincidence between clocks is broken while each keeps its noise.
func timeSlide(d *sim.Dataset, seed int) {
	n, m := d.Epochs, len(d.Clocks)
	if n < 2 {
		return
	}
	lag := 1 + seed%(n-1)
	col := make([]float64, n)
	for j := 1; j < m; j++ {
		sh := (j * lag) % n
		for k := 0; k < n; k++ {
			col[(k+sh)%n] = d.Bias[k*m+j]
		}
		for k := 0; k < n; k++ {
			d.Bias[k*m+j] = col[k]
		}
	}
}

// daySlide keeps a window of each clock from a different day of a
// multi-day noise realisation (clock j from day j mod (daySlides+1)),
// preserving the time of day, then trims the dataset to the window.
func daySlide(d *sim.Dataset, window float64) {
	m := len(d.Clocks)
	nw := int(math.Round(window / d.Interval))
	per := int(math.Round(86400 / d.Interval))
	out := make([]float64, nw*m)
	for j := 0; j < m; j++ {
		off := (j % (daySlides + 1)) * per
		for k := 0; k < nw; k++ {
			out[k*m+j] = d.Bias[(k+off)*m+j]
		}
	}
	d.Bias = out
	d.Epochs = nw
	if o := d.Orbits; o != nil {
		end := d.Start.Add(window)
		k := 0
		for k < len(o.Epochs) && o.Epochs[k] <= end {
			k++
		}
		o.Epochs, o.Data, o.NumEpochs = o.Epochs[:k], o.Data[:k], k
	}
}

// CellInfos fills in both amplitude measures of every cell for a unit
// effective sensitivity, with the amplitude relation of the base
// scenario's walls (ρ_DM, T, v̄; physics.md §3.3): a step cell gets the
// Λ_eff that gives its step, a Λ_eff cell the step that Λ_eff gives.
func CellInfos(p *Plan, base *scenarios.Scenario) ([]CellInfo, error) {
	w := base.Walls
	prof, err := inject.ParseProfile(w.Profile)
	if err != nil {
		return nil, err
	}
	rho := w.RhoDM.GeVPerCm3() * inject.GeVPerCm3
	vbar := w.TypicalSpeed.MetresPerSecond()
	T := w.MeanInterval.Seconds()
	var out []CellInfo
	for _, c := range p.Cells {
		ci := CellInfo{Thickness: c.Thickness, Speed: c.Speed, Step: c.Step, LambdaEff: c.LambdaEff}
		if c.Step > 0 {
			ci.LambdaEff = inject.LambdaEffForStep(prof, c.Step, rho, vbar, T, c.Thickness, c.Speed)
		} else {
			ci.Step = math.Abs(inject.StepFromDensity(prof, 1/(c.LambdaEff*c.LambdaEff), rho, vbar, T, c.Thickness, c.Speed))
		}
		out = append(out, ci)
	}
	return out, nil
}

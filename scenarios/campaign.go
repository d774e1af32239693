package scenarios

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"

	"gopkg.in/yaml.v3"
)

// Campaign is a Monte Carlo injection–recovery campaign: a grid of wall
// parameters × Trials per cell, each trial a short dataset made from a
// base scenario with one injected wall and fresh noise, plus noise-only
// background trials.
type Campaign struct {
	// Name identifies the campaign (required).
	Name        string `yaml:"name"`
	Description string `yaml:"description,omitempty"`
	// Seed is the campaign seed (default 1); trial k draws from (Seed, k).
	Seed uint64 `yaml:"seed,omitempty"`
	// Scenario is the base scenario (required): a built-in name or a file
	// relative to the campaign file. Its network, noise, reference and
	// nuisances are used; its walls are replaced by the trial's.
	Scenario string `yaml:"scenario"`
	// Window is the span of each trial's dataset (default 2 h); the wall
	// passes the geocentre in its middle third.
	Window Duration `yaml:"window,omitempty"`
	// Trials per grid cell (default 20).
	Trials int `yaml:"trials,omitempty"`
	// BackgroundTrials is the number of background trials (default 100).
	BackgroundTrials int `yaml:"background_trials,omitempty"`
	// Background is noise (default: noise-only realisations), time-slides
	// or day-slides.
	Background string `yaml:"background,omitempty"`
	// FalseAlarm is the per-trial false-alarm probability that sets the
	// detection threshold from the background (default 0.01), unless
	// Threshold is given.
	FalseAlarm float64 `yaml:"false_alarm,omitempty"`
	// Threshold, when non-zero, is the fixed detection threshold on the
	// candidate statistic.
	Threshold float64 `yaml:"threshold,omitempty"`
	// Direction of the injected walls: halo (default: the standard halo
	// model) or isotropic (uniform direction, speed from the grid).
	Direction string `yaml:"direction,omitempty"`
	// Grid of wall parameters.
	Grid CampaignGrid `yaml:"grid"`
	// Match sets how candidates are matched to the injection.
	Match CampaignMatch `yaml:"match,omitempty"`
	// Search sets the bank of the in-process reference search (ignored
	// with an external pipeline).
	Search CampaignSearch `yaml:"search,omitempty"`

	file string // where the campaign was read from
}

// CampaignGrid lists the values of each wall parameter; the campaign's
// cells are their Cartesian product. Give Step or LambdaEff (not both).
type CampaignGrid struct {
	Thickness []Length `yaml:"thickness"`
	// Speed classes (default [300 km/s]).
	Speed []Speed `yaml:"speed,omitempty"`
	// Step: bias step of a unit-sensitivity clock.
	Step []Duration `yaml:"step,omitempty"`
	// LambdaEff: coupling scales (amplitude from ρ_DM, T, v̄ of the base scenario).
	LambdaEff []Energy `yaml:"lambda_eff,omitempty"`
}

// CampaignMatch sets the candidate–injection matching.
type CampaignMatch struct {
	// Window is the time tolerance (default: from the network size and the
	// slowest speed, see package sim/score).
	Window Duration `yaml:"window,omitempty"`
	// DirectionTol, when set, also requires the candidate's direction
	// within this angle of the truth.
	DirectionTol Angle `yaml:"direction_tol,omitempty"`
}

// CampaignSearch is the reference search's bank in campaign trials; zero
// values take the search's defaults (package sim/search).
type CampaignSearch struct {
	// Directions is the number of wall directions (default: from the
	// timing resolution, at most 2000).
	Directions int `yaml:"directions,omitempty"`
	// Speeds are the speed classes (default 150–700 km/s in 8 steps).
	Speeds []Speed `yaml:"speeds,omitempty"`
	// Thickness classes; 0 m is the thin wall (default [0 m]).
	Thickness []Length `yaml:"thickness,omitempty"`
	// Whiten is the AR whitening order (default 0).
	Whiten int `yaml:"whiten,omitempty"`
	// Threshold is the smallest |SNR| reported (default 3, so that the
	// background trials measure the statistic's tail).
	Threshold float64 `yaml:"threshold,omitempty"`
}

// File returns the path the campaign was read from ("" for a built-in).
func (c *Campaign) File() string { return c.file }

// ScenarioPath resolves the base scenario reference: a built-in name is
// returned as is; a path is taken relative to the campaign file.
func (c *Campaign) ScenarioPath() string {
	s := c.Scenario
	if strings.ContainsAny(s, `/\`) || strings.HasSuffix(s, ".yaml") || strings.HasSuffix(s, ".yml") {
		if !filepath.IsAbs(s) && c.file != "" {
			return filepath.Join(filepath.Dir(c.file), s)
		}
	}
	return s
}

// Cells returns the number of grid cells.
func (c *Campaign) Cells() int {
	a := len(c.Grid.Step) + len(c.Grid.LambdaEff)
	return len(c.Grid.Thickness) * len(c.Grid.Speed) * a
}

// Hash is the SHA-256 of the campaign's canonical YAML and of its base
// scenario's source: shards of one campaign share it.
func (c *Campaign) Hash(scenarioSource []byte) string {
	b, _ := yaml.Marshal(c)
	h := sha256.New()
	h.Write(b)
	h.Write([]byte{0})
	h.Write(scenarioSource)
	return hex.EncodeToString(h.Sum(nil))
}

// LoadCampaign reads and validates a campaign file.
func LoadCampaign(path string) (*Campaign, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("scenarios: %w", err)
	}
	c, err := DecodeCampaign(path, data)
	if c != nil {
		c.file = path
	}
	return c, err
}

// DecodeCampaign decodes a campaign strictly, fills in defaults and
// validates it, reporting every problem with its line.
func DecodeCampaign(file string, data []byte) (*Campaign, error) {
	var c Campaign
	ps, lines := decodeStrict(file, data, &c)
	if lines == nil {
		return nil, ps
	}
	c.applyDefaults()
	v := validator{file: file, lines: *lines}
	c.validate(&v)
	ps = append(ps, v.ps...)
	if len(ps) > 0 {
		sortProblems(ps)
		return &c, ps
	}
	return &c, nil
}

func (c *Campaign) applyDefaults() {
	if c.Seed == 0 {
		c.Seed = 1
	}
	if !c.Window.set {
		c.Window = Seconds(7200)
	}
	if c.Trials == 0 {
		c.Trials = 20
	}
	if c.BackgroundTrials == 0 {
		c.BackgroundTrials = 100
	}
	if c.Background == "" {
		c.Background = "noise"
	}
	if c.FalseAlarm == 0 && c.Threshold == 0 {
		c.FalseAlarm = 0.01
	}
	if c.Direction == "" {
		c.Direction = "halo"
	}
	if len(c.Grid.Speed) == 0 {
		c.Grid.Speed = []Speed{MetresPerSecond(DefaultTypicalSpeed)}
	}
}

func (c *Campaign) validate(v *validator) {
	if c.Name == "" {
		v.add("name", "missing: every campaign needs a name")
	} else if !nameRE.MatchString(c.Name) {
		v.add("name", "%q: use letters, digits, '-', '_' and '.'", c.Name)
	}
	if c.Scenario == "" {
		v.add("scenario", "missing: the base scenario (a built-in name or a file)")
	}
	v.positive("window", c.Window.quantity, DimTime)
	if c.Window.set && c.Window.si > 0 && c.Window.si < 600 {
		v.addAt("window", c.Window.line, "must be at least 10 min to hold a crossing, got %s", showQ(c.Window.quantity, DimTime))
	}
	if c.Trials < 1 || c.Trials > 1e6 {
		v.add("trials", "must be 1 to 1e6, got %d", c.Trials)
	}
	if c.BackgroundTrials < 1 || c.BackgroundTrials > 1e7 {
		v.add("background_trials", "must be 1 to 1e7, got %d", c.BackgroundTrials)
	}
	if !oneOf(c.Background, []string{"noise", "time-slides", "day-slides"}) {
		v.add("background", "%q: want noise, time-slides or day-slides", c.Background)
	}
	if c.Threshold != 0 && c.FalseAlarm != 0 {
		v.add("threshold", "give threshold or false_alarm, not both")
	}
	if v.finite("false_alarm", c.FalseAlarm) && c.FalseAlarm != 0 && (c.FalseAlarm <= 0 || c.FalseAlarm >= 1) {
		v.add("false_alarm", "must be in (0, 1), got %g", c.FalseAlarm)
	}
	if c.FalseAlarm > 0 && c.BackgroundTrials > 0 && c.FalseAlarm*float64(c.BackgroundTrials) < 1 {
		v.add("false_alarm", "%g needs at least %.0f background trials, have %d", c.FalseAlarm, math.Ceil(1/c.FalseAlarm), c.BackgroundTrials)
	}
	v.finite("threshold", c.Threshold)
	if !oneOf(c.Direction, []string{"halo", "isotropic"}) {
		v.add("direction", "%q: want halo or isotropic", c.Direction)
	}
	g := c.Grid
	if len(g.Thickness) == 0 {
		v.add("grid.thickness", "missing: at least one thickness, e.g. [1e4 km]")
	}
	for i, q := range g.Thickness {
		v.positive(fmt.Sprintf("grid.thickness[%d]", i), q.quantity, DimLength)
	}
	for i, q := range g.Speed {
		p := fmt.Sprintf("grid.speed[%d]", i)
		v.positive(p, q.quantity, DimSpeed)
		if q.si >= 299792458 {
			v.addAt(p, q.line, "must be below the speed of light")
		}
	}
	switch {
	case len(g.Step) == 0 && len(g.LambdaEff) == 0 && !v.given("grid.step") && !v.given("grid.lambda_eff"):
		v.add("grid", "missing: grid.step or grid.lambda_eff (the amplitude axis)")
	case len(g.Step) > 0 && len(g.LambdaEff) > 0:
		v.add("grid", "give grid.step or grid.lambda_eff, not both")
	}
	for i, q := range g.Step {
		v.positive(fmt.Sprintf("grid.step[%d]", i), q.quantity, DimTime)
	}
	for i, q := range g.LambdaEff {
		v.positive(fmt.Sprintf("grid.lambda_eff[%d]", i), q.quantity, DimEnergy)
	}
	if c.Search.Directions < 0 || c.Search.Directions > 100000 {
		v.add("search.directions", "must be 0 (default) to 100000, got %d", c.Search.Directions)
	}
	for i, q := range c.Search.Speeds {
		v.positive(fmt.Sprintf("search.speeds[%d]", i), q.quantity, DimSpeed)
	}
	for i, q := range c.Search.Thickness {
		v.nonNegative(fmt.Sprintf("search.thickness[%d]", i), q.quantity, DimLength)
	}
	if c.Search.Whiten < 0 || c.Search.Whiten > 8 {
		v.add("search.whiten", "must be 0 to 8, got %d", c.Search.Whiten)
	}
	if v.finite("search.threshold", c.Search.Threshold) && c.Search.Threshold < 0 {
		v.add("search.threshold", "must not be negative, got %g", c.Search.Threshold)
	}
	v.positive("match.window", c.Match.Window.quantity, DimTime)
	v.positive("match.direction_tol", c.Match.DirectionTol.quantity, DimAngle)
	if n := c.Cells(); n > 0 && c.Trials > 0 && float64(n)*float64(c.Trials) > 1e8 {
		v.add("trials", "%d cells × %d trials is more than 1e8 trials", n, c.Trials)
	}
}

// WallsFile is a file that holds only a walls section (and optionally a
// name, description and seed): what "wallcross overlay --scenario" needs
// to inject walls into real products. A full scenario file is accepted
// too; its other sections are ignored.
type WallsFile struct {
	Name        string `yaml:"name,omitempty"`
	Description string `yaml:"description,omitempty"`
	Seed        uint64 `yaml:"seed,omitempty"`
	Walls       Walls  `yaml:"walls"`
	// The other sections of a full scenario, accepted and not used.
	Time           yaml.Node `yaml:"time,omitempty"`
	Constellations yaml.Node `yaml:"constellations,omitempty"`
	Navigation     yaml.Node `yaml:"navigation,omitempty"`
	Stations       yaml.Node `yaml:"stations,omitempty"`
	Reference      yaml.Node `yaml:"reference,omitempty"`
	Noise          yaml.Node `yaml:"noise,omitempty"`
	Nuisances      yaml.Node `yaml:"nuisances,omitempty"`
	Links          yaml.Node `yaml:"links,omitempty"`
}

// LoadWalls reads and validates the walls section of a file (defaults
// filled in as for a scenario; seed default 1).
func LoadWalls(path string) (*WallsFile, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("scenarios: %w", err)
	}
	var f WallsFile
	ps, lines := decodeStrict(path, data, &f)
	if lines == nil {
		return nil, ps
	}
	s := Scenario{Seed: f.Seed, Walls: f.Walls}
	s.applyDefaults()
	f.Seed, f.Walls = s.Seed, s.Walls
	v := validator{file: path, lines: *lines}
	if _, given := lines.byPath["walls"]; !given {
		v.add("walls", "missing: the walls to inject (events and/or population)")
	} else if f.Walls.Population == nil && len(f.Walls.Events) == 0 {
		v.add("walls", "no events and no population: nothing to inject")
	}
	f.Walls.validate(&v, 0)
	ps = append(ps, v.ps...)
	if len(ps) > 0 {
		sortProblems(ps)
		return &f, ps
	}
	return &f, nil
}

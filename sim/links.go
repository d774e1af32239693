package sim

import (
	"fmt"
	"math"

	"wallcross/inject"
	"wallcross/orbits"
	"wallcross/scenarios"
	"wallcross/sim/estimate"
)

// Files of the observation level (written when the scenario has a links
// section).
const (
	LinksFile        = "links.csv"     // t_s,station,satellite,elevation_deg,cos_incidence,delay_s
	EstimatedCSVFile = "estimated.csv" // network clock estimate, layout of clocks.csv
	EstimatedRinex   = "estimated.clk" // the same as RINEX clock 3.04
)

// LinkLevel is what the observation level adds to a dataset.
type LinkLevel struct {
	// IndexModel is the refractive-index parametrization inside walls.
	IndexModel inject.IndexModel
	// PeakIndex is the peak n − 1 of every event, in Events order.
	PeakIndex []float64
	// Links are the links with a non-zero wall delay.
	Links []estimate.LinkRecord
	// Estimated is the [Epochs × Clocks] matrix of the network clock
	// estimate relative to the dataset's reference (nil when the
	// estimation is off); NaN where a clock was not estimated.
	Estimated []float64
	// Observations is the number of ionosphere-free observations used.
	Observations int
}

// linkLevel simulates the observations of every satellite→station link
// from each clock's own phase (own[k*nc+j], before referencing and before
// product nuisances), with the walls' link delay when enabled, and
// estimates the network clocks relative to the dataset's reference.
func linkLevel(d *Dataset, s *scenarios.Scenario, geo *orbits.Geometry, walls []inject.Wall, own []float64, seed uint64, trial int) (*LinkLevel, error) {
	l := s.Links
	model, err := inject.NewIndexModel(l.IndexModel, l.UserCoefficient)
	if err != nil {
		return nil, fmt.Errorf("sim: links: %w", err)
	}
	out := &LinkLevel{IndexModel: model}
	var iw []inject.IndexWall
	for i := range walls {
		w, err := inject.NewIndexWall(walls[i], model)
		if err != nil {
			return nil, fmt.Errorf("sim: links: wall %d: %w", walls[i].ID, err)
		}
		out.PeakIndex = append(out.PeakIndex, w.PeakIndex())
		iw = append(iw, w)
	}
	net, err := estimate.FromGeometry(geo, d.Start)
	if err != nil {
		return nil, fmt.Errorf("sim: links: %w", err)
	}
	ids := make([]string, len(d.Clocks))
	for j, c := range d.Clocks {
		ids[j] = c.ID
	}
	cfg := estimate.ObsConfig{
		Interval: d.Interval, Epochs: d.Epochs,
		ElevationMask: l.ElevationMask.Radians(),
		CodeNoise:     l.CodeNoise.Metres(), PhaseNoise: l.PhaseNoise.Metres(),
		Troposphere: l.Troposphere, ZenithWet: l.ZenithWet.Metres(),
		RayBending:      l.RayBending,
		SlipProbability: l.SlipProbability, OutlierProbability: l.OutlierProbability,
		// Delays below 1e-30 s (the far tails of a Gaussian wall) are not
		// listed in links.csv; they are still in the observations.
		LinkRecordMin: 1e-30,
	}
	if l.Delay {
		cfg.Walls = iw
	}
	obs, err := estimate.Simulate(net, &estimate.Truth{Clocks: ids, Bias: own}, cfg, SeedStream(seed, trial, "", "observations"))
	if err != nil {
		return nil, fmt.Errorf("sim: links: %w", err)
	}
	out.Links = obs.Links
	out.Observations = obs.Len()
	if !l.EstimateOn() {
		return out, nil
	}
	ref := d.Reference
	sc := estimate.SolveConfig{Reference: ref.Clocks[0]}
	if l.CodeNoise.Metres() > 0 {
		sc.CodeSigma = l.CodeNoise.Metres()
	}
	if l.PhaseNoise.Metres() > 0 {
		sc.PhaseSigma = l.PhaseNoise.Metres()
	}
	if l.CodeNoise.Metres() == 0 && l.PhaseNoise.Metres() == 0 {
		sc.Threshold = math.Inf(1) // noise-free: nothing to screen
	}
	sol, err := estimate.Solve(obs, sc)
	if err != nil {
		return nil, fmt.Errorf("sim: links: %w", err)
	}
	if len(ref.Clocks) > 1 {
		if sol, err = sol.Rereference(ref.Clocks, ref.Weights); err != nil {
			return nil, fmt.Errorf("sim: links: %w", err)
		}
	}
	if out.Estimated, err = sol.Matrix(ids); err != nil {
		return nil, fmt.Errorf("sim: links: %w", err)
	}
	return out, nil
}

// WriteLinksCSV writes links.csv.
func WriteLinksCSV(path string, d *Dataset) (FileSum, error) {
	s, err := estimate.WriteLinksCSV(path, d.LinkLevel.Links)
	return FileSum{Bytes: s.Bytes, SHA256: s.SHA256}, err
}

// estimatedDataset is d with the estimated clocks as its biases.
func estimatedDataset(d *Dataset) *Dataset {
	e := *d
	e.Bias = d.LinkLevel.Estimated
	return &e
}

// WriteEstimatedCSV writes estimated.csv (layout of clocks.csv).
func WriteEstimatedCSV(path string, d *Dataset) (FileSum, error) {
	return WriteClocksCSV(path, estimatedDataset(d))
}

// WriteEstimatedRinex writes estimated.clk (RINEX clock 3.04).
func WriteEstimatedRinex(path string, d *Dataset) (FileSum, error) {
	return WriteRinexClock(path, estimatedDataset(d))
}

package sim

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"gopkg.in/yaml.v3"

	"wallcross/inject"
	"wallcross/noise"
	"wallcross/orbits"
	"wallcross/scenarios"
)

// Config is what Run simulates: a decoded, defaulted and validated scenario
// (scenarios.Decode/Load/Resolve).
type Config struct {
	Scenario *scenarios.Scenario
	// BaseDir is the directory a relative navigation file is read from
	// (the scenario file's directory; "" = the working directory).
	BaseDir string
}

// Options control a run without changing what is simulated, except Seed.
type Options struct {
	// Seed, when non-zero, replaces the scenario's seed.
	Seed uint64
	// Trial is the trial index mixed into every random stream (0 for a
	// single dataset; campaigns count trials).
	Trial int
	// Workers is the number of clocks simulated concurrently (0: GOMAXPROCS).
	// The result does not depend on it.
	Workers int
	// Progress, when non-nil, receives one-line progress messages.
	Progress io.Writer
	// ToolVersion is recorded in the dataset.
	ToolVersion string
	// NoOrbits skips sampling satellite positions for orbits.sp3.
	NoOrbits bool
	// SP3Interval is the epoch interval of orbits.sp3, s (0: 300 s, rounded
	// up to a multiple of the sample interval).
	SP3Interval float64
	// Presets, when non-nil, holds already calibrated noise presets by
	// family (noise.Preset), so that many runs (campaign trials) calibrate
	// each family once; missing families are calibrated as usual.
	Presets map[string]noise.ClockModel
}

// SeedStream returns the random generator of one purpose ("noise",
// "phase_jumps", "gaps", ...) of one clock in one trial of a run: PCG seeded
// with the first 16 bytes of SHA-256(seed, trial, clock, purpose), so every
// stream is independent of the others and of the order in which clocks are
// simulated. Clock "" is used for run-wide draws (the wall population).
func SeedStream(seed uint64, trial int, clock, purpose string) *rand.Rand {
	h := sha256.New()
	var b [8]byte
	binary.LittleEndian.PutUint64(b[:], seed)
	h.Write(b[:])
	binary.LittleEndian.PutUint64(b[:], uint64(trial))
	h.Write(b[:])
	h.Write([]byte(clock))
	h.Write([]byte{0})
	h.Write([]byte(purpose))
	s := h.Sum(nil)
	return rand.New(rand.NewPCG(binary.LittleEndian.Uint64(s[0:8]), binary.LittleEndian.Uint64(s[8:16])))
}

// satFamily gives the clock family of a satellite read from a navigation
// file, which carries no clock type: the dominant clock of each system in
// recent years (common practice), "" for systems not simulated.
func satFamily(sys byte) string {
	switch sys {
	case 'G', 'J':
		return "gps-iif-rb"
	case 'E':
		return "galileo-phm"
	case 'R':
		return "glonass-cs"
	case 'C':
		return "beidou3-rb"
	}
	return ""
}

// renderHalfWidth is the half width, in units of τ, of the window in which a
// pulse-profile crossing is rendered sample by sample; outside it the bias
// perturbation is 0 before and the full step after (the tails are below
// erfc(40) ≈ 1e-697 of the step for the Gaussian, 1 − tanh 40 ≈ 4e-35 for the
// kink, exactly 0 for the top hat).
const renderHalfWidth = 40.0

type clockPlan struct {
	id     string
	kind   ClockKind
	family string
	geo    int          // index in the geometry
	orbit  orbits.Orbit // satellites only
	model  *noise.ClockModel
}

type clockResult struct {
	crossings []Crossing
	nuisances []Nuisance
	err       error
}

// Run simulates the dataset described by cfg.
func Run(cfg Config, opts Options) (*Dataset, error) {
	s := cfg.Scenario
	if s == nil {
		return nil, fmt.Errorf("sim: no scenario")
	}
	seed := s.Seed
	if opts.Seed != 0 {
		seed = opts.Seed
	}
	progress := func(format string, a ...any) {
		if opts.Progress != nil {
			fmt.Fprintf(opts.Progress, "sim: "+format+"\n", a...)
		}
	}
	step := s.Time.Step.Seconds()
	span := s.Time.Span.Seconds()
	if !(step > 0) || !(span >= step) {
		return nil, fmt.Errorf("sim: span %g s and step %g s: want span ≥ step > 0", span, step)
	}
	nep := int(math.Round(span / step))
	if math.Abs(float64(nep)*step-span) > 1e-6*step {
		return nil, fmt.Errorf("sim: span %g s is not a whole number of %g s steps", span, step)
	}
	start := gpsFromCalendar(s.Time.Start.Time)

	// Geometry.
	sats, err := buildSatellites(cfg, start, span)
	if err != nil {
		return nil, err
	}
	var stations []orbits.Station
	for _, st := range s.Stations {
		var o orbits.Station
		if st.X.IsSet() || st.Y.IsSet() || st.Z.IsSet() {
			o = orbits.StationFromECEF(st.ID, [3]float64{st.X.Metres(), st.Y.Metres(), st.Z.Metres()})
		} else {
			o = orbits.StationFromGeodetic(st.ID, st.Lat.Radians(), st.Lon.Radians(), st.Height.Metres())
		}
		o.Clock = st.Clock
		o.Reference = st.Reference
		stations = append(stations, o)
	}
	orbs := make([]orbits.Orbit, len(sats))
	for i, o := range sats {
		orbs[i] = o.orbit
	}
	geo, err := orbits.NewGeometry(orbs, stations, orbits.Frame{})
	if err != nil {
		return nil, fmt.Errorf("sim: %w", err)
	}
	plans := sats
	for i, st := range stations {
		plans = append(plans, clockPlan{id: st.ID, kind: Station, family: st.Clock, geo: len(sats) + i})
	}
	nc := len(plans)
	progress("%d satellites, %d stations, %d epochs of %g s", len(sats), len(stations), nep, step)

	// Noise models.
	if !s.Noise.Off {
		presets := map[string]noise.ClockModel{} // Preset calibrates: once per family
		for i := range plans {
			m, ok := presets[plans[i].family]
			if !ok {
				m, ok = opts.Presets[plans[i].family]
			}
			if !ok {
				var err error
				if m, err = noise.Preset(plans[i].family); err != nil {
					return nil, fmt.Errorf("sim: clock %s: %w", plans[i].id, err)
				}
				presets[plans[i].family] = m
			}
			if h, ok := s.Noise.Families[plans[i].family]; ok {
				m.H = [5]float64{}
				for k, v := range h {
					t, ok := map[string]noise.Term{"h2": noise.WhitePM, "h1": noise.FlickerPM, "h0": noise.WhiteFM, "h-1": noise.FlickerFM, "h-2": noise.RandomWalkFM}[k]
					if !ok {
						return nil, fmt.Errorf("sim: noise family %s: unknown coefficient %q (want h2, h1, h0, h-1, h-2)", plans[i].family, k)
					}
					m.H[t] = v
				}
			}
			if err := m.Validate(); err != nil {
				return nil, fmt.Errorf("sim: clock %s: %w", plans[i].id, err)
			}
			plans[i].model = &m
		}
	}

	// Walls.
	walls, err := buildWalls(s, seed, opts.Trial, start, span)
	if err != nil {
		return nil, err
	}
	progress("%d walls", len(walls))

	// Reference schedule.
	ref, changes, err := buildReference(s, plans, step, nep)
	if err != nil {
		return nil, err
	}

	d := &Dataset{
		ToolVersion:      opts.ToolVersion,
		Start:            start,
		Interval:         step,
		Epochs:           nep,
		Reference:        ref,
		ReferenceChanges: changes,
		Seed:             seed,
	}
	for _, p := range plans {
		d.Clocks = append(d.Clocks, Clock{ID: p.id, Kind: p.kind, Family: p.family, Sensitivity: sensitivity(s, p.family)})
	}
	for _, st := range stations {
		d.Stations = append(d.Stations, StationInfo{
			ID: st.ID, X: st.Pos[0], Y: st.Pos[1], Z: st.Pos[2],
			LatDeg: st.Lat * 180 / math.Pi, LonDeg: st.Lon * 180 / math.Pi, H: st.Height, Clock: st.Clock,
		})
	}
	for i := range walls {
		e, err := walls[i].Event()
		if err != nil {
			return nil, fmt.Errorf("sim: wall %d: %w", walls[i].ID, err)
		}
		d.Events = append(d.Events, Event{ID: e.ID, T0: e.T0, N: e.N, Speed: e.Speed, Thickness: e.Thickness,
			Profile: e.Profile, LambdaEffGeV: e.LambdaEffGeV, PeakDnu: e.PeakDnu})
	}
	if d.Scenario, err = scenarioJSON(s, seed); err != nil {
		return nil, err
	}

	// Phase A: each clock's own phase (noise + walls + relativity + jumps),
	// one column of the matrix per clock, clocks in parallel.
	d.Bias = make([]float64, nep*nc)
	res := make([]clockResult, nc)
	workers := opts.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, nc)
	parallel(nc, workers, func(j int) {
		res[j] = ownPhase(d, s, geo, plans[j], j, walls, seed, opts.Trial)
		if opts.Progress != nil && nep >= 100000 {
			progress("clock %s done", plans[j].id)
		}
	})
	for j := range res {
		if res[j].err != nil {
			return nil, res[j].err
		}
	}

	// The observation level starts from every clock's own phase.
	var own []float64
	if s.Links != nil {
		own = append([]float64(nil), d.Bias...)
	}

	// Phase B: the reference series, then b_j = x_j − x_ref row by row.
	refSeries := make([]float64, nep)
	schedule := append([]ReferenceChange{{Epoch: 0, Reference: ref}}, changes...)
	for si, rc := range schedule {
		end := nep
		if si+1 < len(schedule) {
			end = schedule[si+1].Epoch
		}
		cols := make([]int, len(rc.Reference.Clocks))
		for i, id := range rc.Reference.Clocks {
			cols[i] = d.ClockIndex(id)
		}
		for k := rc.Epoch; k < end; k++ {
			row := d.Bias[k*nc : (k+1)*nc]
			r := 0.0
			for i, c := range cols {
				r += rc.Reference.Weights[i] * row[c]
			}
			refSeries[k] = r
		}
	}
	for k := range nep {
		row := d.Bias[k*nc : (k+1)*nc]
		r := refSeries[k]
		for j := range row {
			row[j] -= r
		}
	}
	soleRef := -1
	if len(ref.Clocks) == 1 && len(changes) == 0 {
		soleRef = d.ClockIndex(ref.Clocks[0])
	}

	// Phase C: product-level nuisances per clock (batches, outliers, gaps,
	// outages), clocks in parallel.
	parallel(nc, workers, func(j int) {
		n, err := productNuisances(d, s, j, j == soleRef, seed, opts.Trial)
		res[j].nuisances = append(res[j].nuisances, n...)
		if err != nil {
			res[j].err = err
		}
	})
	for j := range res {
		if res[j].err != nil {
			return nil, res[j].err
		}
		d.Crossings = append(d.Crossings, res[j].crossings...)
		d.Nuisances = append(d.Nuisances, res[j].nuisances...)
	}
	for _, rc := range changes {
		d.Nuisances = append(d.Nuisances, Nuisance{Kind: "reference_change", Clock: strings.Join(rc.Reference.Clocks, "+"), T: d.EpochSeconds(rc.Epoch)})
	}
	sort.SliceStable(d.Crossings, func(a, b int) bool { return d.Crossings[a].Event < d.Crossings[b].Event })

	if s.Links != nil {
		progress("observations and network clock estimation")
		if d.LinkLevel, err = linkLevel(d, s, geo, walls, own, seed, opts.Trial); err != nil {
			return nil, err
		}
		progress("%d observations, %d links with a wall delay", d.LinkLevel.Observations, len(d.LinkLevel.Links))
	}

	if !opts.NoOrbits && len(sats) > 0 {
		if d.Orbits, err = sampleSP3(geo, sats, start, span, step, opts.SP3Interval, seed); err != nil {
			return nil, err
		}
	}
	progress("done")
	return d, nil
}

// parallel runs f(0..n-1) on the given number of workers.
func parallel(n, workers int, f func(int)) {
	jobs := make(chan int)
	var wg sync.WaitGroup
	for range max(workers, 1) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				f(j)
			}
		}()
	}
	for j := range n {
		jobs <- j
	}
	close(jobs)
	wg.Wait()
}

func buildSatellites(cfg Config, start orbits.Time, span float64) ([]clockPlan, error) {
	s := cfg.Scenario
	var plans []clockPlan
	if nav := s.Navigation; nav != nil {
		path := nav.File
		if !filepath.IsAbs(path) && cfg.BaseDir != "" {
			path = filepath.Join(cfg.BaseDir, path)
		}
		n, err := orbits.ReadNav(path)
		if err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
		for _, sat := range n.Sats() {
			sys := string(sat)[:1]
			if !strings.Contains(nav.Systems, sys) {
				continue
			}
			o := n.Orbit(sat, orbits.SelectOptions{KeepUnhealthy: nav.KeepUnhealthy})
			// Keep a satellite only if its records cover the span (checked
			// every 15 min and at the end).
			ok := true
			for t := 0.0; ok; t += 900 {
				if t > span {
					t = span
				}
				if _, _, err := o.PosVel(start.Add(t)); err != nil {
					ok = false
				}
				if t == span {
					break
				}
			}
			if !ok {
				continue
			}
			fam := satFamily(sys[0])
			if fam == "" {
				continue
			}
			plans = append(plans, clockPlan{id: string(sat), kind: Satellite, family: fam, orbit: o})
		}
		if len(plans) == 0 {
			return nil, fmt.Errorf("sim: navigation file %s: no satellite of systems %q covers %v + %g s", path, nav.Systems, start, span)
		}
	}
	for _, c := range s.Constellations {
		sys := map[string]byte{"gps-like": 'G', "galileo-like": 'E'}[c.Kind]
		if sys == 0 {
			return nil, fmt.Errorf("sim: constellation kind %q, want gps-like or galileo-like", c.Kind)
		}
		ks, err := orbits.Walker(orbits.WalkerConfig{System: sys, Planes: c.Planes, SlotsPerPlane: c.Slots, Phasing: c.Phasing,
			Altitude: c.Altitude.Metres(), Inclination: c.Inclination.Radians(), Epoch: start})
		if err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
		for _, k := range ks {
			plans = append(plans, clockPlan{id: string(k.Sat()), kind: Satellite, family: c.Clock, orbit: k})
		}
	}
	for i := range plans {
		plans[i].geo = i
	}
	return plans, nil
}

func sensitivity(s *scenarios.Scenario, family string) map[string]float64 {
	if s.Walls.Sensitivity != "family" {
		return map[string]float64{"eff": 1}
	}
	conv, err := inject.ParseConvention(s.Walls.Convention)
	if err != nil {
		return nil
	}
	k, err := inject.Sensitivity(family, conv)
	if err != nil {
		return nil
	}
	return map[string]float64{"alpha": k.KAlpha, "me": k.KMe, "mp": k.KMp, "mq": k.KMq()}
}

func buildWalls(s *scenarios.Scenario, seed uint64, trial int, start orbits.Time, span float64) ([]inject.Wall, error) {
	w := s.Walls
	if w.Population == nil && len(w.Events) == 0 {
		return nil, nil
	}
	prof, err := inject.ParseProfile(w.Profile)
	if err != nil {
		return nil, fmt.Errorf("sim: %w", err)
	}
	var cp inject.Coupling
	neg := w.Sign < 0
	if w.Sensitivity == "family" {
		conv, err := inject.ParseConvention(w.Convention)
		if err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
		cc := func(e scenarios.Energy) inject.ConstantCoupling {
			if !e.IsSet() {
				return inject.ConstantCoupling{}
			}
			return inject.ConstantCoupling{Lambda: e.GeV(), Negative: neg}
		}
		cp = inject.Coupling{Mode: inject.CouplingPerConstant, Alpha: cc(w.LambdaAlpha), Me: cc(w.LambdaMe), Mq: cc(w.LambdaMq),
			Convention: conv, ReportFamily: w.ReportFamily}
	} else {
		cp = inject.Coupling{Mode: inject.CouplingEff, LambdaEff: w.LambdaEff.GeV(), Negative: neg}
	}
	amp := inject.AmplitudeSpec{Mode: inject.AmplitudeDensity, RhoDM: w.RhoDM.GeVPerCm3() * inject.GeVPerCm3,
		VBar: w.TypicalSpeed.MetresPerSecond(), MeanInterval: w.MeanInterval.Seconds()}
	switch {
	case w.PeakDnu != 0:
		amp = inject.AmplitudeSpec{Mode: inject.AmplitudePeak, PeakDnu: math.Abs(w.PeakDnu)}
	case w.Step.IsSet():
		amp = inject.AmplitudeSpec{Mode: inject.AmplitudeStep, Step: math.Abs(w.Step.Seconds())}
	}
	var walls []inject.Wall
	for i, e := range w.Events {
		if len(e.Direction) != 3 {
			return nil, fmt.Errorf("sim: wall event %d: direction has %d components, want 3", i, len(e.Direction))
		}
		n := [3]float64{e.Direction[0], e.Direction[1], e.Direction[2]}
		norm := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
		if !(norm > 0) || math.IsInf(norm, 0) {
			return nil, fmt.Errorf("sim: wall event %d: direction %v has no length", i, e.Direction)
		}
		for k := range n {
			n[k] /= norm
		}
		wl := inject.Wall{ID: i, T0: e.T0.Seconds(), N: n, Speed: e.Speed.MetresPerSecond(), Thickness: e.Thickness.Metres(),
			Profile: prof, Coupling: cp}
		if wl.A2, err = amp.Resolve(prof, cp, wl.Thickness, wl.Speed); err != nil {
			return nil, fmt.Errorf("sim: wall event %d: %w", i, err)
		}
		if err := wl.Validate(); err != nil {
			return nil, fmt.Errorf("sim: wall event %d: %w", i, err)
		}
		walls = append(walls, wl)
	}
	if p := w.Population; p != nil {
		orient, err := inject.ParseOrientation(p.Normal)
		if err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
		halo := inject.StandardHalo()
		halo.V0, halo.VEsc, halo.EarthOrbit = p.V0.MetresPerSecond(), p.VEsc.MetresPerSecond(), p.EarthOrbit
		halo.EquinoxT = inject.EquinoxOffset(start.GoUTC().Unix())
		pop := inject.Population{MeanInterval: p.ArrivalInterval.Seconds(), Span: span, Halo: halo, Orientation: orient,
			Thickness: w.Thickness.Metres(), Profile: prof, Amplitude: amp, Coupling: cp, FirstID: len(walls)}
		drawn, err := pop.Sample(SeedStream(seed, trial, "", "population"))
		if err != nil {
			return nil, fmt.Errorf("sim: %w", err)
		}
		walls = append(walls, drawn...)
	}
	return walls, nil
}

func buildReference(s *scenarios.Scenario, plans []clockPlan, step float64, nep int) (Reference, []ReferenceChange, error) {
	has := func(id string) bool {
		for _, p := range plans {
			if p.id == id {
				return true
			}
		}
		return false
	}
	var ref Reference
	if len(s.Reference.Ensemble) > 0 {
		sum := 0.0
		for _, m := range s.Reference.Ensemble {
			sum += m.Weight
		}
		if !(sum > 0) {
			return ref, nil, fmt.Errorf("sim: reference ensemble weights sum to %g, want > 0", sum)
		}
		for _, m := range s.Reference.Ensemble {
			ref.Clocks = append(ref.Clocks, m.Clock)
			ref.Weights = append(ref.Weights, m.Weight/sum)
		}
	} else if s.Reference.Clock != "" {
		ref = Reference{Clocks: []string{s.Reference.Clock}, Weights: []float64{1}}
	} else {
		return ref, nil, fmt.Errorf("sim: scenario names no reference clock")
	}
	for _, id := range ref.Clocks {
		if !has(id) {
			return ref, nil, fmt.Errorf("sim: reference clock %q is not a clock of the network", id)
		}
	}
	var changes []ReferenceChange
	for _, c := range s.Reference.Changes {
		if !has(c.Clock) {
			return ref, nil, fmt.Errorf("sim: reference change to %q: not a clock of the network", c.Clock)
		}
		k := int(math.Ceil(c.At.Seconds()/step - 1e-9))
		if k <= 0 || k >= nep {
			return ref, nil, fmt.Errorf("sim: reference change at %g s is outside the span", c.At.Seconds())
		}
		if len(changes) > 0 && k <= changes[len(changes)-1].Epoch {
			return ref, nil, fmt.Errorf("sim: reference changes at %g s out of order", c.At.Seconds())
		}
		changes = append(changes, ReferenceChange{Epoch: k, Reference: Reference{Clocks: []string{c.Clock}, Weights: []float64{1}}})
	}
	return ref, changes, nil
}

// scenarioJSON returns the resolved scenario (defaults filled in, seed as
// used) as JSON, through its YAML form so every quantity keeps its unit.
func scenarioJSON(s *scenarios.Scenario, seed uint64) (json.RawMessage, error) {
	c := *s
	c.Seed = seed
	y, err := yaml.Marshal(&c)
	if err != nil {
		return nil, fmt.Errorf("sim: could not encode the scenario: %w", err)
	}
	var v any
	if err := yaml.Unmarshal(y, &v); err != nil {
		return nil, fmt.Errorf("sim: could not encode the scenario: %w", err)
	}
	b, err := json.Marshal(v)
	if err != nil {
		return nil, fmt.Errorf("sim: could not encode the scenario: %w", err)
	}
	return b, nil
}

// ownPhase fills column j of d.Bias with the clock's own phase: noise,
// wall signals, the optional relativistic term and phase/frequency jumps.
func ownPhase(d *Dataset, s *scenarios.Scenario, geo *orbits.Geometry, p clockPlan, j int, walls []inject.Wall, seed uint64, trial int) clockResult {
	var r clockResult
	nep, nc, step := d.Epochs, len(d.Clocks), d.Interval
	var x []float64
	if p.model != nil {
		m := *p.model
		if len(m.Periodic) > 0 {
			// Each clock gets its own phases of the periodic terms.
			rng := SeedStream(seed, trial, p.id, "periodic")
			m.Periodic = append([]noise.Periodic(nil), m.Periodic...)
			for i := range m.Periodic {
				m.Periodic[i].Phase = 2 * math.Pi * rng.Float64()
			}
		}
		x = m.Phase(SeedStream(seed, trial, p.id, "noise"), nep, step)
	} else {
		x = make([]float64, nep)
	}
	traj := func(t float64) [3]float64 { return geo.Celestial(p.geo, d.Start.Add(t)) }
	// after[k] collects the full steps that start at sample k; one running
	// sum adds them, so the cost is O(walls·window + epochs), not
	// O(walls·epochs).
	after := make([]float64, nep)
	for wi := range walls {
		c, err := walls[wi].Cross(p.id, p.family, traj)
		if err != nil {
			if q := traj(walls[wi].T0); math.IsNaN(q[0]) {
				// The ephemeris does not reach the wall's passage (a
				// navigation-file orbit near the span edge): no crossing
				// inside the clock's data, none recorded.
				continue
			}
			r.err = fmt.Errorf("sim: wall %d, clock %s: %w", walls[wi].ID, p.id, err)
			return r
		}
		if !s.Walls.RespondsToWalls() {
			// The clock itself does not respond (only the link delay
			// may carry the wall): the crossing is recorded, its step is 0.
			r.crossings = append(r.crossings, Crossing{Event: c.Event, Clock: p.id, TCross: c.TCross, Step: 0})
			continue
		}
		st := c.Step()
		r.crossings = append(r.crossings, Crossing{Event: c.Event, Clock: p.id, TCross: c.TCross, Step: st})
		if err := renderCrossing(x, after, step, c); err != nil {
			r.err = fmt.Errorf("sim: wall %d, clock %s: %w", walls[wi].ID, p.id, err)
			return r
		}
	}
	sum := 0.0
	for k, v := range after {
		sum += v
		x[k] += sum
	}
	if s.Noise.Relativity && p.orbit != nil {
		// Periodic relativistic clock term Δt_r = −2 r·v/c² (IS-GPS-200
		// §20.3.3.3.3.1); r·v is the same in the Earth-fixed and inertial
		// frames because r·(ω × r) = 0.
		const c2 = orbits.SpeedOfLight * orbits.SpeedOfLight
		for k := range nep {
			pos, vel, err := p.orbit.PosVel(d.EpochTime(k))
			if err != nil {
				x[k] = math.NaN()
				continue
			}
			x[k] += -2 * (pos[0]*vel[0] + pos[1]*vel[1] + pos[2]*vel[2]) / c2
		}
	}
	span := float64(nep) * step
	if j := s.Nuisances.PhaseJumps; j != nil {
		rng := SeedStream(seed, trial, p.id, "phase_jumps")
		for _, t := range poissonTimes(rng, j.Rate.PerSecond(), span) {
			v := j.Sigma * rng.NormFloat64()
			for k := int(math.Ceil(t / step)); k < nep; k++ {
				x[k] += v
			}
			r.nuisances = append(r.nuisances, Nuisance{Kind: "phase_jump", Clock: p.id, T: t, Value: v})
		}
	}
	if j := s.Nuisances.FrequencyJumps; j != nil {
		rng := SeedStream(seed, trial, p.id, "frequency_jumps")
		for _, t := range poissonTimes(rng, j.Rate.PerSecond(), span) {
			v := j.Sigma * rng.NormFloat64()
			for k := int(math.Ceil(t / step)); k < nep; k++ {
				x[k] += v * (float64(k)*step - t)
			}
			r.nuisances = append(r.nuisances, Nuisance{Kind: "freq_jump", Clock: p.id, T: t, Value: v})
		}
	}
	for k, v := range x {
		d.Bias[k*nc+j] = v
	}
	return r
}

// renderCrossing adds a crossing's bias perturbation X(t_k), t_k = k·step,
// to x sample by sample within renderHalfWidth·τ of the crossing, and its
// full step to after[k] at the first sample k past that window (the caller
// adds the running sum of after to x); nothing before the window. Profiles
// without a finite step (the linear kink) are rendered at every sample.
func renderCrossing(x, after []float64, step float64, c inject.Crossing) error {
	st := c.Step()
	if math.IsNaN(st) || math.IsInf(st, 0) {
		return inject.RenderPhaseGrid(x, 0, step, c)
	}
	n := len(x)
	lo := int(math.Floor((c.TCross - renderHalfWidth*c.Tau) / step))
	hi := int(math.Ceil((c.TCross+renderHalfWidth*c.Tau)/step)) + 1
	lo, hi = max(lo, 0), min(hi, n)
	if lo < hi {
		if err := inject.RenderPhaseGrid(x[lo:hi], float64(lo)*step, step, c); err != nil {
			return err
		}
	}
	if hi < n {
		after[max(hi, 0)] += st
	}
	return nil
}

// poissonTimes draws the event times of a Poisson process of the given rate
// (1/s) over [0, span).
func poissonTimes(rng *rand.Rand, rate, span float64) []float64 {
	if !(rate > 0) {
		return nil
	}
	var ts []float64
	for t := rng.ExpFloat64() / rate; t < span; t += rng.ExpFloat64() / rate {
		ts = append(ts, t)
	}
	return ts
}

// productNuisances applies the artefacts of the clock product itself to
// column j (after referencing): daily-batch offsets, outliers, gaps and
// outages.
func productNuisances(d *Dataset, s *scenarios.Scenario, j int, isRef bool, seed uint64, trial int) ([]Nuisance, error) {
	nep, nc, step := d.Epochs, len(d.Clocks), d.Interval
	id := d.Clocks[j].ID
	span := float64(nep) * step
	at := func(k int) *float64 { return &d.Bias[k*nc+j] }
	var out []Nuisance
	nz := s.Nuisances
	if b := nz.Batches; b != nil && !isRef && b.Interval.Seconds() > 0 {
		rng := SeedStream(seed, trial, id, "batches")
		iv := b.Interval.Seconds()
		prev := 0.0
		for m := 1; float64(m)*iv < span; m++ {
			off := b.Sigma * rng.NormFloat64()
			t := float64(m) * iv
			k0 := int(math.Ceil(t/step - 1e-9))
			k1 := min(int(math.Ceil(float64(m+1)*iv/step-1e-9)), nep)
			for k := k0; k < k1; k++ {
				*at(k) += off
			}
			out = append(out, Nuisance{Kind: "batch_step", Clock: id, T: t, Value: off - prev})
			prev = off
		}
	}
	if o := nz.Outliers; o != nil && !isRef && o.Probability > 0 {
		rng := SeedStream(seed, trial, id, "outliers")
		if o.Probability >= 1 {
			return nil, fmt.Errorf("sim: outlier probability %g, want < 1", o.Probability)
		}
		l := math.Log1p(-o.Probability)
		for k := -1; ; {
			k += 1 + int(math.Floor(math.Log(1-rng.Float64())/l))
			if k >= nep || k < 0 {
				break
			}
			v := o.Sigma * rng.NormFloat64()
			*at(k) += v
			out = append(out, Nuisance{Kind: "outlier", Clock: id, T: float64(k) * step, Value: v})
		}
	}
	blank := func(t0, length float64) {
		for k := max(int(math.Ceil(t0/step-1e-9)), 0); k < nep && float64(k)*step < t0+length; k++ {
			*at(k) = math.NaN()
		}
	}
	if g := nz.Gaps; g != nil {
		rng := SeedStream(seed, trial, id, "gaps")
		for _, t := range poissonTimes(rng, g.Rate.PerSecond(), span) {
			length := g.MeanLength.Seconds() * rng.ExpFloat64()
			blank(t, length)
			out = append(out, Nuisance{Kind: "gap", Clock: id, T: t, Duration: length})
		}
	}
	for _, o := range nz.Outages {
		if o.Clock == id {
			blank(o.Start.Seconds(), o.Length.Seconds())
			out = append(out, Nuisance{Kind: "outage", Clock: id, T: o.Start.Seconds(), Duration: o.Length.Seconds()})
		}
	}
	return out, nil
}

// sampleSP3 samples the satellites' Earth-fixed positions for orbits.sp3.
func sampleSP3(geo *orbits.Geometry, sats []clockPlan, start orbits.Time, span, step, interval float64, seed uint64) (*orbits.SP3, error) {
	if interval <= 0 {
		interval = 300
	}
	interval = math.Ceil(interval/step-1e-9) * step
	// Epochs 0, interval, … up to and including the end of the span, so the
	// last data epoch lies inside the SP3 (interpolation, not extrapolation).
	n := int(math.Ceil(span/interval-1e-9)) + 1
	sp := &orbits.SP3{Version: 'd', Mode: 'P', Start: start, NumEpochs: n, DataUsed: "SIMUL", CoordSys: "WGS84",
		OrbitType: "FIT", Agency: "WXS", Interval: interval, TimeSystem: "GPS", BasePos: 1.25, BaseClk: 1.025,
		Comments: []string{fmt.Sprintf("wallcross synthetic orbits, run seed %d", seed), "no clock values: see clocks.clk"}}
	sys := ""
	for _, p := range sats {
		sp.Sats = append(sp.Sats, orbits.SatID(p.id))
		sp.Accuracy = append(sp.Accuracy, 0)
		switch c := p.id[:1]; {
		case sys == "":
			sys = c
		case sys != c:
			sys = "M"
		}
	}
	sp.FileType = sys
	for e := range n {
		t := start.Add(float64(e) * interval)
		sp.Epochs = append(sp.Epochs, t)
		row := make([]orbits.SP3Entry, len(sats))
		for i, p := range sats {
			pos, err := geo.EarthFixedErr(p.geo, t)
			if err == nil {
				row[i] = orbits.SP3Entry{Pos: pos, HasPos: true}
			}
		}
		sp.Data = append(sp.Data, row)
	}
	return sp, nil
}

// Walls returns the walls a scenario's walls section describes — its
// explicit events and a population drawn over [0, span) s after start
// from the run seed — exactly as Run injects them. overlay uses it to put
// a scenario's walls into real clock products.
func Walls(w scenarios.Walls, seed uint64, trial int, start orbits.Time, span float64) ([]inject.Wall, error) {
	return buildWalls(&scenarios.Scenario{Walls: w}, seed, trial, start, span)
}

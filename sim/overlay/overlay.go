package overlay

import (
	"fmt"
	"sort"
	"strings"

	"wallcross/inject"
	"wallcross/orbits"
)

// DefaultFamily is the clock family assumed for a satellite of a system
// when the user's table does not name one: the most common clock of the
// system's current fleet (common practice; give a table for exact work).
var DefaultFamily = map[byte]string{
	'G': "gps-iif-rb",  // GPS Block IIF and III fly Rb clocks
	'E': "galileo-phm", // Galileo's primary clock is the passive H maser
	'R': "glonass-cs",  // GLONASS-M caesium
	'C': "beidou3-rb",  // BeiDou-3 MEO Rb
	'J': "rb",          // QZSS rubidium
}

// DefaultStationFamily is the clock assumed for a receiver without an
// entry in the user's table: an active hydrogen maser, as at the
// reference-quality stations analysis centres favour (common practice).
const DefaultStationFamily = "hmaser"

// Options configure an overlay.
type Options struct {
	// Families maps clock names (G05, WAB200CHE) to clock families,
	// overriding the defaults.
	Families map[string]string
	// Stations adds or overrides receiver positions (Earth-fixed, m).
	Stations map[string][3]float64
	// RefWeights gives the weight of each reference clock of the ensemble
	// (default: equal weights over the header's ANALYSIS CLK REF clocks).
	RefWeights map[string]float64
	// SkipUnknown leaves clocks without a position unchanged, with a
	// warning, instead of failing.
	SkipUnknown bool
}

// Result is what an overlay did.
type Result struct {
	Data      []byte                  // the perturbed clock file
	Origin    orbits.Time             // first clock epoch: t = 0 of events and crossings
	Events    []inject.Event          // truth of every wall
	Crossings []inject.CrossingRecord // one per (wall, clock)
	Families  map[string]string       // clock → family used
	Defaulted []string                // clocks whose family came from the defaults
	Refs      map[string]float64      // reference clock → weight
	Changed   int                     // records whose bias text changed
	Touched   int                     // records with a non-zero injected signal
	Warnings  []string
	// Delta is the injected bias change of every record, s, in file order
	// (zero for records left alone).
	Delta []float64
}

// Apply injects walls (times relative to the clock file's first epoch)
// into cf using satellite orbits from sp3.
func Apply(cf *ClockFile, sp3 *orbits.SP3, walls []inject.Wall, opt Options) (*Result, error) {
	if len(cf.Records) == 0 {
		return nil, fmt.Errorf("overlay: %s: no AS or AR clock records", cf.Name)
	}
	origin, last := cf.Records[0].Epoch, cf.Records[0].Epoch
	for _, r := range cf.Records {
		if r.Epoch < origin {
			origin = r.Epoch
		}
		if r.Epoch > last {
			last = r.Epoch
		}
	}
	res := &Result{Origin: origin, Families: map[string]string{}, Refs: map[string]float64{}}
	warn := func(format string, a ...any) { res.Warnings = append(res.Warnings, fmt.Sprintf(format, a...)) }

	// The SP3 file must cover the clock file's span.
	if len(sp3.Epochs) == 0 {
		return nil, fmt.Errorf("overlay: SP3 file has no epochs")
	}
	s0, s1 := sp3.Epochs[0], sp3.Epochs[len(sp3.Epochs)-1]
	if origin < s0 || last > s1 {
		return nil, fmt.Errorf("overlay: clock file %s spans %s to %s but the SP3 orbits span %s to %s: they must cover the clock epochs (different days?)", cf.Name, origin, last, s0, s1)
	}
	orbs := sp3.Tracks(origin, true)
	span := last.Sub(origin)

	// Clock list in first-appearance order, with trajectories.
	type clk struct {
		name   string
		family string
		traj   inject.Trajectory
	}
	var clocks []*clk
	byName := map[string]*clk{}
	var missing []string
	for _, r := range cf.Records {
		if _, ok := byName[r.Name]; ok {
			continue
		}
		c := &clk{name: r.Name}
		byName[r.Name] = c
		clocks = append(clocks, c)
		if f, ok := opt.Families[r.Name]; ok {
			c.family = f
		} else if r.Type == "AS" {
			f, ok := DefaultFamily[r.Name[0]]
			if !ok {
				warn("satellite %s: no default clock family for system %c; using rb", r.Name, r.Name[0])
				f = "rb"
			}
			c.family = f
			res.Defaulted = append(res.Defaulted, r.Name)
		} else {
			c.family = DefaultStationFamily
			res.Defaulted = append(res.Defaulted, r.Name)
		}
		res.Families[r.Name] = c.family
		switch r.Type {
		case "AS":
			o, ok := orbs[orbits.SatID(r.Name)]
			if !ok {
				missing = append(missing, r.Name+" (not in the SP3 file)")
				continue
			}
			interval := sp3.Interval
			if interval <= 0 {
				interval = 900
			}
			if err := o.CheckGaps(0, span, 2.5*interval); err != nil {
				missing = append(missing, err.Error())
				continue
			}
			c.traj = inject.Trajectory(o.At)
		case "AR":
			pos, ok := opt.Stations[r.Name]
			if !ok {
				pos, ok = cf.Stations[r.Name]
			}
			if !ok {
				missing = append(missing, r.Name+" (no SOLN STA NAME / NUM in the header and not in the station file)")
				continue
			}
			c.traj = stationTrajectory(origin, pos)
		}
	}
	if len(missing) > 0 {
		if !opt.SkipUnknown {
			return nil, fmt.Errorf("overlay: %d clocks have no position, so their crossings cannot be computed: %s (use the skip option to leave them unchanged)", len(missing), strings.Join(missing, "; "))
		}
		for _, m := range missing {
			warn("left unchanged: %s", m)
		}
	}

	// Reference ensemble.
	if len(cf.Refs) == 0 && len(opt.RefWeights) == 0 {
		return nil, fmt.Errorf("overlay: %s: the header names no ANALYSIS CLK REF clock; give the reference weights", cf.Name)
	}
	refs := opt.RefWeights
	if len(refs) == 0 {
		refs = map[string]float64{}
		for _, r := range cf.Refs {
			refs[r] = 1
		}
	}
	sumW := 0.0
	for name, w := range refs {
		c, ok := byName[name]
		if !ok || c.traj == nil {
			return nil, fmt.Errorf("overlay: reference clock %s has no records or no position in %s", name, cf.Name)
		}
		if !(w > 0) {
			return nil, fmt.Errorf("overlay: reference clock %s has weight %g: want > 0", name, w)
		}
		sumW += w
	}
	for name, w := range refs {
		res.Refs[name] = w / sumW
	}
	refNames := make([]string, 0, len(refs))
	for n := range refs {
		refNames = append(refNames, n)
	}
	sort.Strings(refNames)

	// Crossings of every clock with every wall.
	cross := map[string][]inject.Crossing{} // per clock with a position, one per wall
	for _, w := range walls {
		ev, err := w.Event()
		if err != nil {
			return nil, fmt.Errorf("overlay: %w", err)
		}
		res.Events = append(res.Events, ev)
	}
	for _, c := range clocks {
		if c.traj == nil {
			continue
		}
		var x []inject.Crossing
		for i := range walls {
			cr, err := walls[i].Cross(c.name, c.family, c.traj)
			if err != nil {
				return nil, fmt.Errorf("overlay: %w", err)
			}
			x = append(x, cr)
			res.Crossings = append(res.Crossings, cr.Record())
			if cr.TCross < -3600 || cr.TCross > span+3600 {
				warn("wall %d crosses %s at %.0f s, outside the clock file's span (0 to %.0f s)", walls[i].ID, c.name, cr.TCross, span)
			}
		}
		cross[c.name] = x
	}
	phase := func(name string, t float64) float64 {
		s := 0.0
		for _, cr := range cross[name] {
			s += cr.PhaseAt(t)
		}
		return s
	}
	// The reference's phase at each epoch, once per epoch rather than once
	// per record.
	refPhase := map[orbits.Time]float64{}

	// Rewrite bias values.
	out := make([]byte, len(cf.Data))
	copy(out, cf.Data)
	res.Delta = make([]float64, len(cf.Records))
	for k, r := range cf.Records {
		if _, ok := cross[r.Name]; !ok {
			continue
		}
		t := r.Epoch.Sub(origin)
		ref, ok := refPhase[r.Epoch]
		if !ok {
			for _, n := range refNames {
				ref += res.Refs[n] * phase(n, t)
			}
			refPhase[r.Epoch] = ref
		}
		d := phase(r.Name, t) - ref
		if d == 0 {
			continue
		}
		res.Touched++
		res.Delta[k] = d
		old := string(cf.Data[r.Start:r.End])
		nw, err := formatLike(old, r.Bias+d)
		if err != nil {
			return nil, fmt.Errorf("overlay: %s:%d: %w", cf.Name, r.Line, err)
		}
		if nw != old {
			copy(out[r.Start:r.End], nw)
			res.Changed++
		}
	}
	res.Data = out
	return res, nil
}

// stationTrajectory is a station fixed on the Earth, in the celestial frame.
func stationTrajectory(origin orbits.Time, ecef [3]float64) inject.Trajectory {
	return func(t float64) [3]float64 {
		return orbits.ECEFToCelestial(origin.Add(t), ecef)
	}
}

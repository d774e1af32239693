package scenarios

import (
	"fmt"
	"math"
	"regexp"
	"strings"
)

// Defaults, stated once. Sources: 30 s is the IGS final clock sampling
// (common practice); the halo values are those of the standard halo model
// (see package inject for their sources).
const (
	DefaultSpan         = 86400.0  // s
	DefaultStep         = 30.0     // s
	DefaultThickness    = 1e7      // m (1e4 km)
	DefaultRhoDM        = 0.4      // GeV/cm³
	DefaultTypicalSpeed = 300e3    // m/s
	DefaultLambdaEff    = 1e11     // GeV
	DefaultV0           = 220e3    // m/s
	DefaultVEsc         = 544e3    // m/s
	DefaultStationClock = "hmaser" // station active hydrogen maser
	DefaultBatchLength  = 86400.0  // s
)

// Satellite clock family defaults per synthetic constellation kind.
var kindDefaults = map[string]struct {
	planes, slots int
	altitude      float64 // m
	inclination   float64 // deg
	clock         string
}{
	// Nominal GPS: 6 planes, a = 26 560 km, i = 55° (common practice).
	"gps-like": {6, 4, 26560e3 - 6378137, 55, "gps-iif-rb"},
	// Nominal Galileo Walker 24/3/1: a = 29 600 km, i = 56° (common practice).
	"galileo-like": {3, 8, 29600e3 - 6378137, 56, "galileo-phm"},
}

// ClockFamilies are the clock family names a scenario may use. They are
// the presets of package noise.
var ClockFamilies = []string{
	"gps-iir-rb", "gps-iif-rb", "gps-iif-cs", "gps-iii-rb",
	"galileo-phm", "galileo-rafs", "beidou3-rb", "beidou3-phm",
	"glonass-cs", "hmaser", "cs", "rb", "quartz",
}

// Profiles are the wall profile names.
var Profiles = []string{"gaussian", "kink", "tophat", "linear-kink"}

func (s *Scenario) applyDefaults() {
	if s.Seed == 0 {
		s.Seed = 1
	}
	if !s.Time.Span.set {
		s.Time.Span = Seconds(DefaultSpan)
	}
	if !s.Time.Step.set {
		s.Time.Step = Seconds(DefaultStep)
	}
	for i := range s.Constellations {
		c := &s.Constellations[i]
		d, ok := kindDefaults[c.Kind]
		if !ok {
			continue
		}
		if c.Planes == 0 {
			c.Planes = d.planes
		}
		if c.Slots == 0 {
			c.Slots = d.slots
		}
		if c.Phasing == 0 {
			c.Phasing = 1
		}
		if !c.Altitude.set {
			c.Altitude = Metres(d.altitude)
		}
		if !c.Inclination.set {
			c.Inclination = Radians(d.inclination * math.Pi / 180)
		}
		if c.Clock == "" {
			c.Clock = d.clock
		}
	}
	if s.Navigation != nil && s.Navigation.Systems == "" {
		s.Navigation.Systems = "GE"
	}
	for i := range s.Stations {
		if s.Stations[i].Clock == "" {
			s.Stations[i].Clock = DefaultStationClock
		}
	}
	if s.Reference.Clock == "" && len(s.Reference.Ensemble) == 0 {
		for _, st := range s.Stations {
			if st.Reference {
				s.Reference.Clock = st.ID
				break
			}
		}
	}
	w := &s.Walls
	if w.Profile == "" {
		w.Profile = "gaussian"
	}
	if !w.Thickness.set {
		w.Thickness = Metres(DefaultThickness)
	}
	if !w.RhoDM.set {
		w.RhoDM = GeVPerCm3(DefaultRhoDM)
	}
	if !w.MeanInterval.set {
		w.MeanInterval = Seconds(JulianYear)
	}
	if !w.TypicalSpeed.set {
		w.TypicalSpeed = MetresPerSecond(DefaultTypicalSpeed)
	}
	if !w.LambdaEff.set {
		w.LambdaEff = GeVEnergy(DefaultLambdaEff)
	}
	if w.Sign == 0 {
		w.Sign = 1
	}
	if w.Sensitivity == "" {
		w.Sensitivity = "unit"
	}
	if w.Sensitivity == "family" {
		if w.Convention == "" {
			w.Convention = "R"
		}
		if w.ReportFamily == "" {
			w.ReportFamily = "rb"
		}
	}
	if p := w.Population; p != nil {
		if !p.ArrivalInterval.set {
			p.ArrivalInterval = w.MeanInterval
		}
		if !p.V0.set {
			p.V0 = MetresPerSecond(DefaultV0)
		}
		if !p.VEsc.set {
			p.VEsc = MetresPerSecond(DefaultVEsc)
		}
		if p.Normal == "" {
			p.Normal = "velocity"
		}
	}
	for i := range w.Events {
		e := &w.Events[i]
		if !e.Speed.set {
			e.Speed = w.TypicalSpeed
		}
		if !e.Thickness.set {
			e.Thickness = w.Thickness
		}
	}
	if b := s.Nuisances.Batches; b != nil && !b.Interval.set {
		b.Interval = Seconds(DefaultBatchLength)
	}
	if l := s.Links; l != nil {
		if l.IndexModel == "" {
			l.IndexModel = "permittivity"
		}
		if !l.ElevationMask.set {
			l.ElevationMask = Radians(10 * math.Pi / 180)
		}
		if !l.CodeNoise.set {
			l.CodeNoise = Metres(0.3)
		}
		if !l.PhaseNoise.set {
			l.PhaseNoise = Metres(0.003)
		}
		if l.Troposphere && !l.ZenithWet.set {
			l.ZenithWet = Metres(0.1)
		}
	}
}

var nameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9_.-]*$`)

func oneOf(x string, list []string) bool {
	for _, y := range list {
		if x == y {
			return true
		}
	}
	return false
}

func (s *Scenario) validate(v *validator) {
	if s.Name == "" {
		v.add("name", "missing: every scenario needs a name")
	} else if !nameRE.MatchString(s.Name) {
		v.add("name", "%q: use letters, digits, '-', '_' and '.'", s.Name)
	}
	s.Time.validate(v)

	ids := map[string]string{} // clock id → path of its definition
	nSat := 0
	if len(s.Constellations) > 0 && s.Navigation != nil {
		v.add("navigation", "give either constellations or navigation, not both")
	}
	for i, c := range s.Constellations {
		p := fmt.Sprintf("constellations[%d]", i)
		if _, ok := kindDefaults[c.Kind]; !ok {
			v.add(p+".kind", "%q: want gps-like or galileo-like", c.Kind)
			continue
		}
		if c.Planes < 1 || c.Planes > 36 {
			v.add(p+".planes", "must be 1 to 36, got %d", c.Planes)
		}
		if c.Slots < 1 || c.Slots > 99 {
			v.add(p+".slots", "must be 1 to 99, got %d", c.Slots)
		}
		if c.Planes >= 1 && (c.Phasing < 0 || c.Phasing >= c.Planes) {
			v.add(p+".phasing", "must be 0 to planes−1 = %d, got %d", c.Planes-1, c.Phasing)
		}
		if c.Altitude.set && (c.Altitude.si < 100e3 || c.Altitude.si > 1e9) {
			v.addAt(p+".altitude", c.Altitude.line, "must be between 100 km and 1e6 km, got %s", showQ(c.Altitude.quantity, DimLength))
		}
		if c.Inclination.set && (c.Inclination.si < 0 || c.Inclination.si > math.Pi) {
			v.addAt(p+".inclination", c.Inclination.line, "must be 0 to 180 deg, got %s", showQ(c.Inclination.quantity, DimAngle))
		}
		if !oneOf(c.Clock, ClockFamilies) {
			v.add(p+".clock", "unknown clock family %q; known: %s", c.Clock, strings.Join(ClockFamilies, ", "))
		}
		nSat += c.Planes * c.Slots
	}
	if n := s.Navigation; n != nil {
		if n.File == "" {
			v.add("navigation.file", "missing: the RINEX navigation file")
		}
		for _, r := range n.Systems {
			if !strings.ContainsRune("GERCJ", r) {
				v.add("navigation.systems", "unknown system letter %q in %q; want letters of GERCJ", r, n.Systems)
			}
		}
	}
	if len(s.Constellations) == 0 && s.Navigation == nil {
		v.add("constellations", "missing: give synthetic constellations or a navigation file")
	}
	if nSat > 99*2 {
		v.add("constellations", "%d satellites: at most %d", nSat, 99*2)
	}

	if len(s.Stations) == 0 {
		v.add("stations", "missing: at least one station (the reference clock)")
	}
	nRef := 0
	for i, st := range s.Stations {
		p := fmt.Sprintf("stations[%d]", i)
		st.validate(v, p)
		if st.ID != "" {
			if prev, dup := ids[st.ID]; dup {
				v.add(p+".id", "duplicate station id %q (also %s)", st.ID, prev)
			}
			ids[st.ID] = p
		}
		if st.Reference {
			nRef++
		}
	}
	if nRef > 1 {
		v.add("stations", "%d stations are marked reference: at most one (use reference.ensemble for several)", nRef)
	}
	s.Reference.validate(v, ids)
	s.Noise.validate(v)
	s.Walls.validate(v, s.Time.Span.si)
	s.Nuisances.validate(v)
	s.Links.validate(v)
}

func (l *Links) validate(v *validator) {
	if l == nil {
		return
	}
	switch l.IndexModel {
	case "permittivity", "lorentz":
		if l.UserCoefficient != 0 {
			v.add("links.user_coefficient", "only with index_model: user")
		}
	case "user":
		v.finite("links.user_coefficient", l.UserCoefficient)
	default:
		v.add("links.index_model", "%q: want permittivity, lorentz or user", l.IndexModel)
	}
	if m := l.ElevationMask; m.si < 0 || m.si >= math.Pi/2 {
		v.addAt("links.elevation_mask", m.line, "must be 0 to 90 deg, got %s", showQ(m.quantity, DimAngle))
	}
	v.nonNegative("links.code_noise", l.CodeNoise.quantity, DimLength)
	v.nonNegative("links.phase_noise", l.PhaseNoise.quantity, DimLength)
	v.nonNegative("links.zenith_wet", l.ZenithWet.quantity, DimLength)
	for name, p := range map[string]float64{"slip_probability": l.SlipProbability, "outlier_probability": l.OutlierProbability} {
		if v.finite("links."+name, p) && (p < 0 || p >= 1) {
			v.add("links."+name, "must be in [0, 1), got %g", p)
		}
	}
	if !l.Delay && !l.EstimateOn() {
		v.add("links", "neither delay nor estimate is on: remove the section or switch one on")
	}
}

func (t *TimeSection) validate(v *validator) {
	if !t.Start.set {
		v.add("time.start", "missing: the first epoch on GPS time, e.g. 2026-01-01T00:00:00")
	} else if y := t.Start.Time.Year(); y < 1980 || y > 2200 {
		v.add("time.start", "year %d is outside 1980–2200", y)
	}
	v.positive("time.span", t.Span.quantity, DimTime)
	v.positive("time.step", t.Step.quantity, DimTime)
	if t.Step.si > 0 && t.Span.si > 0 {
		if t.Step.si < 1e-3 {
			v.addAt("time.step", t.Step.line, "must be at least 1 ms, got %s", showQ(t.Step.quantity, DimTime))
		}
		n := t.Span.si / t.Step.si
		if n < 2 {
			v.addAt("time.span", t.Span.line, "span %s holds fewer than 2 steps of %s", showQ(t.Span.quantity, DimTime), showQ(t.Step.quantity, DimTime))
		} else if n > 1e9 {
			v.addAt("time.span", t.Span.line, "span/step = %.3g epochs, more than 1e9", n)
		} else if r := math.Abs(n - math.Round(n)); r > 1e-9*n {
			v.addAt("time.span", t.Span.line, "span %s is not a whole number of steps of %s", showQ(t.Span.quantity, DimTime), showQ(t.Step.quantity, DimTime))
		}
	}
}

var stationIDRE = regexp.MustCompile(`^[A-Za-z0-9]{1,9}$`)

func (st *Station) validate(v *validator, p string) {
	if st.ID == "" {
		v.add(p+".id", "missing station id")
	} else if !stationIDRE.MatchString(st.ID) {
		v.add(p+".id", "%q: want 1 to 9 letters or digits (RINEX clock station names)", st.ID)
	}
	geo := st.Lat.set || st.Lon.set
	ecef := st.X.set || st.Y.set || st.Z.set
	switch {
	case geo && ecef:
		v.add(p, "give lat/lon/height or x/y/z, not both")
	case geo:
		if (!st.Lat.set && !v.given(p+".lat")) || (!st.Lon.set && !v.given(p+".lon")) {
			v.add(p, "give both lat and lon")
		}
		if st.Lat.set && math.Abs(st.Lat.si) > math.Pi/2 {
			v.addAt(p+".lat", st.Lat.line, "must be within ±90 deg, got %s", showQ(st.Lat.quantity, DimAngle))
		}
		if st.Lon.set && math.Abs(st.Lon.si) > 2*math.Pi {
			v.addAt(p+".lon", st.Lon.line, "must be within ±360 deg, got %s", showQ(st.Lon.quantity, DimAngle))
		}
		if st.Height.set && (st.Height.si < -1e3 || st.Height.si > 1e5) {
			v.addAt(p+".height", st.Height.line, "must be within −1 km to 100 km, got %s", showQ(st.Height.quantity, DimLength))
		}
	case ecef:
		if !(st.X.set && st.Y.set && st.Z.set) {
			if !(v.given(p+".x") && v.given(p+".y") && v.given(p+".z")) {
				v.add(p, "give all three of x, y, z")
			}
		} else if r := math.Sqrt(st.X.si*st.X.si + st.Y.si*st.Y.si + st.Z.si*st.Z.si); r < 6.3e6 || r > 6.5e6 {
			v.add(p, "x, y, z put the station %.0f km from the geocentre: not on the Earth's surface", r/1e3)
		}
	default:
		v.add(p, "missing position: give lat, lon (and height) or x, y, z")
	}
	if !oneOf(st.Clock, ClockFamilies) {
		v.add(p+".clock", "unknown clock family %q; known: %s", st.Clock, strings.Join(ClockFamilies, ", "))
	}
}

func (r *Reference) validate(v *validator, ids map[string]string) {
	if r.Clock != "" && len(r.Ensemble) > 0 {
		v.add("reference", "give clock or ensemble, not both")
	}
	if r.Clock == "" && len(r.Ensemble) == 0 && len(ids) > 0 {
		v.add("reference", "missing: mark one station reference: true, or set reference.clock or reference.ensemble")
	}
	if r.Clock != "" {
		if _, ok := ids[r.Clock]; !ok {
			v.add("reference.clock", "%q is not a station of this scenario", r.Clock)
		}
	}
	sum := 0.0
	for i, m := range r.Ensemble {
		p := fmt.Sprintf("reference.ensemble[%d]", i)
		if _, ok := ids[m.Clock]; !ok {
			v.add(p+".clock", "%q is not a station of this scenario", m.Clock)
		}
		if v.finite(p+".weight", m.Weight) && !(m.Weight > 0) {
			v.add(p+".weight", "must be positive, got %g", m.Weight)
		}
		sum += m.Weight
	}
	for i, c := range r.Changes {
		p := fmt.Sprintf("reference.changes[%d]", i)
		v.positive(p+".at", c.At.quantity, DimTime)
		if _, ok := ids[c.Clock]; !ok {
			v.add(p+".clock", "%q is not a station of this scenario", c.Clock)
		}
		if i > 0 && c.At.si <= r.Changes[i-1].At.si {
			v.add(p+".at", "changes must be in increasing time order")
		}
	}
}

var hKeys = map[string]bool{"h2": true, "h1": true, "h0": true, "h-1": true, "h-2": true}

func (n *Noise) validate(v *validator) {
	for fam, hs := range n.Families {
		p := "noise.families." + fam
		if !oneOf(fam, ClockFamilies) {
			v.add(p, "unknown clock family %q; known: %s", fam, strings.Join(ClockFamilies, ", "))
		}
		for k, h := range hs {
			if !hKeys[k] {
				v.add(p+"."+k, "unknown key %q: want h2, h1, h0, h-1 or h-2", k)
			} else if v.finite(p+"."+k, h) && h < 0 {
				v.add(p+"."+k, "h coefficients must not be negative, got %g", h)
			}
		}
	}
}

func (w *Walls) validate(v *validator, span float64) {
	if !oneOf(w.Profile, Profiles) {
		v.add("walls.profile", "unknown profile %q; want %s", w.Profile, strings.Join(Profiles, ", "))
	}
	v.positive("walls.thickness", w.Thickness.quantity, DimLength)
	v.positive("walls.rho_dm", w.RhoDM.quantity, DimEnergyDensity)
	v.positive("walls.mean_interval", w.MeanInterval.quantity, DimTime)
	v.positive("walls.typical_speed", w.TypicalSpeed.quantity, DimSpeed)
	v.positive("walls.lambda_eff", w.LambdaEff.quantity, DimEnergy)
	if v.finite("walls.peak_dnu", w.PeakDnu) && w.PeakDnu < 0 {
		v.add("walls.peak_dnu", "must not be negative (use sign: -1), got %g", w.PeakDnu)
	}
	v.nonNegative("walls.step", w.Step.quantity, DimTime)
	if w.PeakDnu != 0 && w.Step.set {
		v.add("walls.step", "give peak_dnu or step, not both")
	}
	if w.Sign != 1 && w.Sign != -1 {
		v.add("walls.sign", "must be 1 or -1, got %d", w.Sign)
	}
	switch w.Sensitivity {
	case "unit":
		for name, q := range map[string]Energy{"lambda_alpha": w.LambdaAlpha, "lambda_me": w.LambdaMe, "lambda_mq": w.LambdaMq} {
			if q.set {
				v.add("walls."+name, "needs sensitivity: family (with sensitivity: unit only lambda_eff is used)")
			}
		}
	case "family":
		n := 0
		for _, k := range []struct {
			name string
			q    Energy
		}{{"lambda_alpha", w.LambdaAlpha}, {"lambda_me", w.LambdaMe}, {"lambda_mq", w.LambdaMq}} {
			if k.q.set {
				n++
				v.positive("walls."+k.name, k.q.quantity, DimEnergy)
			}
		}
		if n == 0 {
			v.add("walls.sensitivity", "family needs at least one of lambda_alpha, lambda_me, lambda_mq")
		}
		if c := strings.ToUpper(w.Convention); c != "R" && c != "A" {
			v.add("walls.convention", "%q: want R (atomic units) or A (absolute)", w.Convention)
		}
		if !oneOf(w.ReportFamily, ClockFamilies) {
			v.add("walls.report_family", "unknown clock family %q; known: %s", w.ReportFamily, strings.Join(ClockFamilies, ", "))
		}
	default:
		v.add("walls.sensitivity", "%q: want unit or family", w.Sensitivity)
	}
	if w.TypicalSpeed.si >= 299792458 {
		v.addAt("walls.typical_speed", w.TypicalSpeed.line, "must be below the speed of light, got %s", showQ(w.TypicalSpeed.quantity, DimSpeed))
	}
	if p := w.Population; p != nil {
		v.positive("walls.population.arrival_interval", p.ArrivalInterval.quantity, DimTime)
		v.positive("walls.population.v0", p.V0.quantity, DimSpeed)
		v.positive("walls.population.v_esc", p.VEsc.quantity, DimSpeed)
		if p.V0.si > 0 && p.VEsc.si > 0 && p.VEsc.si <= p.V0.si {
			v.add("walls.population.v_esc", "must exceed v0")
		}
		if p.Normal != "velocity" && p.Normal != "isotropic" {
			v.add("walls.population.normal", "%q: want velocity or isotropic", p.Normal)
		}
	}
	for i, e := range w.Events {
		p := fmt.Sprintf("walls.events[%d]", i)
		if !e.T0.set {
			v.add(p+".t0", "missing: when the wall passes the geocentre, after start (e.g. \"1 h\")")
		}
		if len(e.Direction) != 3 {
			v.add(p+".direction", "want three components [x, y, z], got %d", len(e.Direction))
		} else {
			ok := true
			for _, c := range e.Direction {
				ok = v.finite(p+".direction", c) && ok
			}
			if ok && math.Hypot(math.Hypot(e.Direction[0], e.Direction[1]), e.Direction[2]) == 0 {
				v.add(p+".direction", "must not be the zero vector")
			}
		}
		v.positive(p+".speed", e.Speed.quantity, DimSpeed)
		if e.Speed.si >= 299792458 {
			v.addAt(p+".speed", e.Speed.line, "must be below the speed of light, got %s", showQ(e.Speed.quantity, DimSpeed))
		}
		v.positive(p+".thickness", e.Thickness.quantity, DimLength)
	}
}

func (n *Nuisances) validate(v *validator) {
	if g := n.Gaps; g != nil {
		v.positive("nuisances.gaps.rate", g.Rate.quantity, DimRate)
		v.positive("nuisances.gaps.mean_length", g.MeanLength.quantity, DimTime)
		if !g.Rate.set {
			v.add("nuisances.gaps.rate", "missing, e.g. \"0.5 /d\"")
		}
		if !g.MeanLength.set {
			v.add("nuisances.gaps.mean_length", "missing, e.g. \"20 min\"")
		}
	}
	for i, o := range n.Outages {
		p := fmt.Sprintf("nuisances.outages[%d]", i)
		if o.Clock == "" {
			v.add(p+".clock", "missing: the clock id (satellite like G05 or a station)")
		}
		v.nonNegative(p+".start", o.Start.quantity, DimTime)
		v.positive(p+".length", o.Length.quantity, DimTime)
	}
	for name, j := range map[string]*Jumps{"phase_jumps": n.PhaseJumps, "frequency_jumps": n.FrequencyJumps} {
		if j == nil {
			continue
		}
		p := "nuisances." + name
		if !j.Rate.set {
			v.add(p+".rate", "missing, e.g. \"0.2 /d\"")
		}
		v.positive(p+".rate", j.Rate.quantity, DimRate)
		if v.finite(p+".sigma", j.Sigma) && !(j.Sigma > 0) {
			v.add(p+".sigma", "must be positive, got %g", j.Sigma)
		}
	}
	if o := n.Outliers; o != nil {
		if v.finite("nuisances.outliers.probability", o.Probability) && (o.Probability <= 0 || o.Probability >= 1) {
			v.add("nuisances.outliers.probability", "must be in (0, 1), got %g", o.Probability)
		}
		if v.finite("nuisances.outliers.sigma", o.Sigma) && !(o.Sigma > 0) {
			v.add("nuisances.outliers.sigma", "must be positive (seconds), got %g", o.Sigma)
		}
	}
	if b := n.Batches; b != nil {
		v.positive("nuisances.batches.interval", b.Interval.quantity, DimTime)
		if v.finite("nuisances.batches.sigma", b.Sigma) && !(b.Sigma > 0) {
			v.add("nuisances.batches.sigma", "must be positive (seconds), got %g", b.Sigma)
		}
	}
}

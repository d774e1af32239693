package sim

import (
	"encoding/json"
	"fmt"
	"math"
	"time"

	"wallcross/orbits"
)

// ClockKind says whether a clock rides on a satellite or sits at a ground
// station.
type ClockKind string

// Clock kinds, as written in manifest.json and mapped to RINEX clock record
// types (AS satellite, AR receiver/station).
const (
	Satellite ClockKind = "satellite"
	Station   ClockKind = "station"
)

// Clock describes one clock of the network.
type Clock struct {
	// ID names the clock: "G01" for a satellite (RINEX system letter and
	// PRN), a 4- to 9-character station name otherwise. It is the column
	// name in clocks.csv and the record name in clocks.clk.
	ID string `json:"id"`
	// Kind is Satellite or Station.
	Kind ClockKind `json:"kind"`
	// Family names the clock model (noise preset), e.g. "gps-iif-rb".
	Family string `json:"family"`
	// Sensitivity maps a coupling name (e.g. "alpha", "me") to the clock's
	// dimensionless sensitivity coefficient K (δν/ν = K δX/X).
	Sensitivity map[string]float64 `json:"sensitivity,omitempty"`
}

// Reference is the clock (or weighted ensemble of clocks) that every bias in
// the dataset is referred to: b_j = x_j − Σ_k w_k x_k.
type Reference struct {
	// Clocks lists the ids of the reference clock(s).
	Clocks []string `json:"clocks"`
	// Weights holds one dimensionless weight per entry of Clocks, summing
	// to 1. A single reference clock has weight 1.
	Weights []float64 `json:"weights"`
}

// ReferenceChange records that, from epoch index Epoch on, the biases are
// referred to a new reference.
type ReferenceChange struct {
	Epoch     int       `json:"epoch"` // first epoch index referred to the new reference
	Reference Reference `json:"reference"`
}

// StationInfo is one ground station of the network.
type StationInfo struct {
	ID      string  // clock id of the station clock
	X, Y, Z float64 // Earth-fixed (WGS 84) position, m
	LatDeg  float64 // geodetic latitude, degrees
	LonDeg  float64 // longitude, degrees east
	H       float64 // ellipsoidal height, m
	Clock   string  // clock family of the station clock
}

// Event is one injected wall.
type Event struct {
	ID           int        // event number, 0-based within the dataset
	T0           float64    // time the wall's centre plane passes the geocentre, s since the first epoch
	N            [3]float64 // unit vector of the wall velocity (celestial frame)
	Speed        float64    // speed relative to the geocentre, m/s
	Thickness    float64    // wall thickness d, m
	Profile      string     // wall profile name ("gaussian", "tanh", "box", ...)
	LambdaEffGeV float64    // effective coupling scale Λ_eff, GeV
	PeakDnu      float64    // peak fractional frequency shift δν/ν for a clock with K = 1 (dimensionless)
}

// Crossing is the passage of one event's wall over one clock.
type Crossing struct {
	Event  int     // event number
	Clock  string  // clock id
	TCross float64 // crossing time, s since the first epoch
	Step   float64 // bias step the clock itself receives, before referencing, s
}

// Nuisance is one non-signal artefact applied to the data; the truth
// catalogue lists every one.
type Nuisance struct {
	Kind     string  // "gap", "outage", "phase_jump", "freq_jump", "outlier", "batch_step", "reference_change"
	Clock    string  // clock id, or "*" when it affects every series
	T        float64 // start time, s since the first epoch
	Duration float64 // duration, s (0 for instantaneous artefacts)
	Value    float64 // size: s for phase jumps, outliers and batch steps; dimensionless for frequency jumps; 0 otherwise
}

// Dataset is one synthetic clock product with its truth catalogue.
type Dataset struct {
	// ToolVersion identifies the program that made the dataset.
	ToolVersion string
	// Start is the first epoch (GPS time, integer ns since 1980-01-06
	// 00:00:00 GPST).
	Start orbits.Time
	// Interval is the sample interval, s. It must be a whole number of ns.
	Interval float64
	// Epochs is the number of epochs.
	Epochs int
	// Clocks lists the clocks in column order.
	Clocks []Clock
	// Reference is the reference at the first epoch.
	Reference Reference
	// ReferenceChanges lists later changes of reference, by epoch index.
	ReferenceChanges []ReferenceChange
	// Bias is the row-major matrix [Epochs × len(Clocks)] of clock biases
	// relative to the reference, s; NaN marks a gap.
	Bias []float64
	// Orbits holds the satellite positions written to orbits.sp3 (may be
	// nil: no SP3 file).
	Orbits *orbits.SP3
	// Stations lists the ground stations.
	Stations []StationInfo
	// Events, Crossings and Nuisances form the truth catalogue.
	Events    []Event
	Crossings []Crossing
	Nuisances []Nuisance
	// Seed is the run seed.
	Seed uint64
	// Scenario is the resolved scenario as JSON (may be nil).
	Scenario json.RawMessage
	// LinkLevel holds the link delays and the network clock estimate when
	// the scenario has a links section (nil otherwise).
	LinkLevel *LinkLevel
}

// gpsEpoch is 1980-01-06 00:00:00 in Go's leap-second-free calendar, which
// is the right calendar for labelling GPS time.
var gpsEpoch = time.Date(1980, 1, 6, 0, 0, 0, 0, time.UTC)

// gpsCalendar returns the calendar date of t (ns since the GPS epoch) on the
// GPS time scale. The returned time.Time carries the UTC location only as a
// container: the fields are GPS-time calendar fields.
func gpsCalendar(t orbits.Time) time.Time { return gpsEpoch.Add(time.Duration(t)) }

// gpsFromCalendar is the inverse of gpsCalendar.
func gpsFromCalendar(c time.Time) orbits.Time { return orbits.Time(c.Sub(gpsEpoch)) }

// IntervalNS returns the sample interval in integer nanoseconds.
func (d *Dataset) IntervalNS() int64 { return int64(math.Round(d.Interval * 1e9)) }

// EpochTime returns epoch k on GPS time.
func (d *Dataset) EpochTime(k int) orbits.Time {
	return d.Start + orbits.Time(int64(k)*d.IntervalNS())
}

// EpochSeconds returns epoch k as seconds since the first epoch.
func (d *Dataset) EpochSeconds(k int) float64 { return float64(k) * d.Interval }

// At returns the bias of clock column j at epoch k, s (NaN = gap).
func (d *Dataset) At(k, j int) float64 { return d.Bias[k*len(d.Clocks)+j] }

// ClockIndex returns the column of the clock with the given id, or -1.
func (d *Dataset) ClockIndex(id string) int {
	for j, c := range d.Clocks {
		if c.ID == id {
			return j
		}
	}
	return -1
}

// Validate checks the dataset's internal consistency.
func (d *Dataset) Validate() error {
	if d.Epochs <= 0 {
		return fmt.Errorf("sim: dataset has %d epochs, want at least 1", d.Epochs)
	}
	if !(d.Interval > 0) || math.IsInf(d.Interval, 0) {
		return fmt.Errorf("sim: sample interval %g s must be positive", d.Interval)
	}
	if ns := d.Interval * 1e9; math.Abs(ns-math.Round(ns)) > 1e-3 {
		return fmt.Errorf("sim: sample interval %g s is not a whole number of ns", d.Interval)
	}
	if len(d.Clocks) == 0 {
		return fmt.Errorf("sim: dataset has no clocks")
	}
	if len(d.Bias) != d.Epochs*len(d.Clocks) {
		return fmt.Errorf("sim: bias matrix has %d values, want %d epochs × %d clocks = %d",
			len(d.Bias), d.Epochs, len(d.Clocks), d.Epochs*len(d.Clocks))
	}
	seen := make(map[string]bool, len(d.Clocks))
	for _, c := range d.Clocks {
		if c.ID == "" {
			return fmt.Errorf("sim: clock with empty id")
		}
		if seen[c.ID] {
			return fmt.Errorf("sim: duplicate clock id %q", c.ID)
		}
		seen[c.ID] = true
		if c.Kind != Satellite && c.Kind != Station {
			return fmt.Errorf("sim: clock %q has kind %q, want %q or %q", c.ID, c.Kind, Satellite, Station)
		}
		for _, r := range c.ID {
			if r <= ' ' || r == ',' || r == '"' || r > '~' {
				return fmt.Errorf("sim: clock id %q has a character (%q) not allowed in CSV/RINEX", c.ID, r)
			}
		}
	}
	if err := d.validateRef(d.Reference, seen); err != nil {
		return err
	}
	last := 0
	for _, rc := range d.ReferenceChanges {
		if rc.Epoch <= last || rc.Epoch >= d.Epochs {
			return fmt.Errorf("sim: reference change at epoch %d out of order or outside 1..%d", rc.Epoch, d.Epochs-1)
		}
		last = rc.Epoch
		if err := d.validateRef(rc.Reference, seen); err != nil {
			return err
		}
	}
	return nil
}

func (d *Dataset) validateRef(r Reference, seen map[string]bool) error {
	if len(r.Clocks) == 0 || len(r.Clocks) != len(r.Weights) {
		return fmt.Errorf("sim: reference needs one weight per clock, got %d clocks and %d weights", len(r.Clocks), len(r.Weights))
	}
	sum := 0.0
	for i, id := range r.Clocks {
		if !seen[id] {
			return fmt.Errorf("sim: reference clock %q is not in the clock list", id)
		}
		sum += r.Weights[i]
	}
	if math.Abs(sum-1) > 1e-9 {
		return fmt.Errorf("sim: reference weights sum to %g, want 1", sum)
	}
	return nil
}

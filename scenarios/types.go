package scenarios

import (
	"fmt"
	"time"

	"gopkg.in/yaml.v3"
)

// quantity is the common part of every dimensioned field: its SI value, the
// text it was written as, and where (for error messages).
type quantity struct {
	si   float64
	text string
	line int
	col  int
	set  bool
}

// SI returns the value in SI units (see the field's type for which).
func (q quantity) SI() float64 { return q.si }

// IsSet reports whether the field was given (in the file or by a default).
func (q quantity) IsSet() bool { return q.set }

// Line returns the 1-based line the value was read from, 0 if it was not
// read from a file.
func (q quantity) Line() int { return q.line }

func (q *quantity) decode(n *yaml.Node, d Dimension) error {
	q.line, q.col = n.Line, n.Column
	if n.Kind != yaml.ScalarNode {
		return &yaml.TypeError{Errors: []string{fmt.Sprintf("line %d column %d: want %s such as %q, got a %s", n.Line, n.Column, d, example[d], kindName(n.Kind))}}
	}
	v, err := ParseQuantity(n.Value, d)
	if err != nil {
		return &yaml.TypeError{Errors: []string{fmt.Sprintf("line %d column %d: %v", n.Line, n.Column, err)}}
	}
	q.si, q.text, q.set = v, n.Value, true
	return nil
}

func (q quantity) marshal(d Dimension) (any, error) {
	if q.text != "" {
		return q.text, nil
	}
	return FormatQuantity(q.si, d), nil
}

var example = map[Dimension]string{
	DimTime: "30 s", DimLength: "1e4 km", DimSpeed: "300 km/s", DimAngle: "55 deg",
	DimEnergyDensity: "0.4 GeV/cm^3", DimEnergy: "1e11 GeV", DimRate: "2 /d",
}

func kindName(k yaml.Kind) string {
	switch k {
	case yaml.MappingNode:
		return "mapping"
	case yaml.SequenceNode:
		return "sequence"
	case yaml.AliasNode:
		return "alias"
	}
	return "scalar"
}

// Duration is a time interval in seconds, written with a unit ("30 s", "2 h", "1 yr").
type Duration struct{ quantity }

// Seconds returns the duration in seconds.
func (q Duration) Seconds() float64 { return q.si }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Duration) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimTime) }

// MarshalYAML implements yaml.Marshaler.
func (q Duration) MarshalYAML() (any, error) { return q.marshal(DimTime) }

// Length is a length in metres, written with a unit ("1e4 km").
type Length struct{ quantity }

// Metres returns the length in metres.
func (q Length) Metres() float64 { return q.si }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Length) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimLength) }

// MarshalYAML implements yaml.Marshaler.
func (q Length) MarshalYAML() (any, error) { return q.marshal(DimLength) }

// Speed is a speed in m/s, written with a unit ("300 km/s").
type Speed struct{ quantity }

// MetresPerSecond returns the speed in m/s.
func (q Speed) MetresPerSecond() float64 { return q.si }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Speed) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimSpeed) }

// MarshalYAML implements yaml.Marshaler.
func (q Speed) MarshalYAML() (any, error) { return q.marshal(DimSpeed) }

// Angle is an angle in radians, written with a unit ("55 deg").
type Angle struct{ quantity }

// Radians returns the angle in radians.
func (q Angle) Radians() float64 { return q.si }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Angle) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimAngle) }

// MarshalYAML implements yaml.Marshaler.
func (q Angle) MarshalYAML() (any, error) { return q.marshal(DimAngle) }

// EnergyDensity is an energy density in J/m³, written with a unit ("0.4 GeV/cm^3").
type EnergyDensity struct{ quantity }

// GeVPerCm3 returns the density in GeV/cm³.
func (q EnergyDensity) GeVPerCm3() float64 { return q.si / (GeV * 1e6) }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *EnergyDensity) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimEnergyDensity) }

// MarshalYAML implements yaml.Marshaler.
func (q EnergyDensity) MarshalYAML() (any, error) { return q.marshal(DimEnergyDensity) }

// Energy is an energy in joules, written with a unit ("1e11 GeV").
type Energy struct{ quantity }

// GeV returns the energy in GeV.
func (q Energy) GeV() float64 { return q.si / GeV }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Energy) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimEnergy) }

// MarshalYAML implements yaml.Marshaler.
func (q Energy) MarshalYAML() (any, error) { return q.marshal(DimEnergy) }

// Rate is a rate in events per second, written with a unit ("2 /d", "0.1 /h").
type Rate struct{ quantity }

// PerSecond returns the rate in 1/s.
func (q Rate) PerSecond() float64 { return q.si }

// UnmarshalYAML implements yaml.Unmarshaler.
func (q *Rate) UnmarshalYAML(n *yaml.Node) error { return q.decode(n, DimRate) }

// MarshalYAML implements yaml.Marshaler.
func (q Rate) MarshalYAML() (any, error) { return q.marshal(DimRate) }

// Epoch is an instant on GPS time, written in ISO 8601 without a zone
// ("2026-01-01T00:00:00"); the calendar fields are read as GPS time, not UTC.
type Epoch struct {
	// Time holds the calendar fields; its location is UTC only as a
	// container: the fields mean GPS time.
	Time time.Time
	line int
	set  bool
}

// Layouts accepted for an Epoch.
var epochLayouts = []string{"2006-01-02T15:04:05.999999999", "2006-01-02T15:04:05", "2006-01-02 15:04:05", "2006-01-02"}

// ParseEpoch parses an ISO 8601 GPS-time epoch.
func ParseEpoch(s string) (time.Time, error) {
	for _, l := range epochLayouts {
		if t, err := time.Parse(l, s); err == nil {
			return t, nil
		}
	}
	return time.Time{}, fmt.Errorf("want a GPS-time epoch like 2026-01-01T00:00:00, got %q", s)
}

// IsSet reports whether the epoch was given.
func (e Epoch) IsSet() bool { return e.set }

// UnmarshalYAML implements yaml.Unmarshaler.
func (e *Epoch) UnmarshalYAML(n *yaml.Node) error {
	e.line = n.Line
	if n.Kind != yaml.ScalarNode {
		return &yaml.TypeError{Errors: []string{fmt.Sprintf("line %d column %d: want a GPS-time epoch like 2026-01-01T00:00:00, got a %s", n.Line, n.Column, kindName(n.Kind))}}
	}
	t, err := ParseEpoch(n.Value)
	if err != nil {
		return &yaml.TypeError{Errors: []string{fmt.Sprintf("line %d column %d: %v", n.Line, n.Column, err)}}
	}
	e.Time, e.set = t, true
	return nil
}

// MarshalYAML implements yaml.Marshaler.
func (e Epoch) MarshalYAML() (any, error) {
	return e.Time.Format("2006-01-02T15:04:05.999999999"), nil
}

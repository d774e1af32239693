package scenarios

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestParseQuantity(t *testing.T) {
	for _, tc := range []struct {
		in   string
		dim  Dimension
		want float64 // SI
	}{
		{"30 s", DimTime, 30},
		{"2 h", DimTime, 7200},
		{"2h", DimTime, 7200},
		{"1 yr", DimTime, 365.25 * 86400}, // Julian year (IAU)
		{"15 min", DimTime, 900},
		{"1e4 km", DimLength, 1e7},
		{"1e4km", DimLength, 1e7},
		{"300 km/s", DimSpeed, 3e5},
		{"-2.5e-3 m", DimLength, -2.5e-3},
		{"55 deg", DimAngle, 55 * math.Pi / 180},
		// 1 GeV = 1.602176634e-10 J exactly (SI 2019, CODATA 2018).
		{"0.4 GeV/cm^3", DimEnergyDensity, 0.4 * 1.602176634e-10 * 1e6},
		{"1e11 GeV", DimEnergy, 1e11 * 1.602176634e-10},
		{"5eV", DimEnergy, 5 * 1.602176634e-19},
		{"2 /d", DimRate, 2.0 / 86400},
	} {
		got, err := ParseQuantity(tc.in, tc.dim)
		if err != nil {
			t.Errorf("ParseQuantity(%q): %v", tc.in, err)
			continue
		}
		if !scalar.EqualWithinRel(got, tc.want, 1e-15) {
			t.Errorf("ParseQuantity(%q) = %.17g SI, want %.17g", tc.in, got, tc.want)
		}
	}
}

func TestParseQuantityErrors(t *testing.T) {
	for _, tc := range []struct {
		in, want string
		dim      Dimension
	}{
		{"30", "missing unit", DimTime},
		{"30 km", `unit "km" in "30 km" is not a duration; accepted units:`, DimTime},
		{"s", "want a duration as a number", DimTime},
		{"1e400 s", "bad number", DimTime},
		{"300 km/h/s", "accepted units", DimSpeed},
	} {
		_, err := ParseQuantity(tc.in, tc.dim)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("ParseQuantity(%q) error = %v, want it to contain %q", tc.in, err, tc.want)
		}
	}
}

const badScenario = `name: broken
time:
  start: 2026-01-01T00:00:00
  span: -2 h
  step: 30
constellations:
  - kind: gps-like
stations:
  - id: ABCD
    lat: 10 deg
    lon: 20 deg
    colour: red
    reference: true
`

// TestDecodeReportsEveryProblem checks that an unknown key, a missing unit
// and a negative duration are all reported, each with its line.
func TestDecodeReportsEveryProblem(t *testing.T) {
	_, err := Decode("bad.yaml", []byte(badScenario))
	var ps Problems
	if !errors.As(err, &ps) {
		t.Fatalf("Decode error = %v (%T), want Problems", err, err)
	}
	want := []struct {
		line int
		has  string
	}{
		{4, "time.span: must be positive"},
		{5, "missing unit"},
		{12, `unknown key "colour"`},
	}
	if len(ps) != len(want) {
		t.Fatalf("got %d problems, want %d:\n%v", len(ps), len(want), err)
	}
	for i, w := range want {
		if ps[i].Line != w.line || !strings.Contains(ps[i].String(), w.has) {
			t.Errorf("problem %d = %q (line %d), want line %d containing %q", i, ps[i], ps[i].Line, w.line, w.has)
		}
		if !strings.HasPrefix(ps[i].String(), "bad.yaml:") {
			t.Errorf("problem %q lacks the file name", ps[i])
		}
	}
}

func TestDecodeMoreProblems(t *testing.T) {
	for _, tc := range []struct {
		name, src, want string
	}{
		{"empty", "", "empty file"},
		{"syntax", "name: [unclosed\n", "YAML syntax"},
		{"no name", "time: {start: 2026-01-01T00:00:00}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n", "name: missing"},
		{"bad kind", "name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: glonass}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n", "want gps-like or galileo-like"},
		{"no reference", "name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg}]\n", "reference: missing"},
		{"bad family", "name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true, clock: sundial}]\n", "unknown clock family \"sundial\""},
		{"wrong type", "name: x\nseed: many\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n", "want an integer"},
		{"two docs", "name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n---\nname: y\n", "more than one YAML document"},
		{"uneven span", "name: x\ntime: {start: 2026-01-01, span: 100 s, step: 30 s}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n", "not a whole number of steps"},
		{"bad direction", "name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\nwalls: {events: [{t0: 1 h, direction: [0, 0]}]}\n", "want three components"},
	} {
		_, err := Decode(tc.name+".yaml", []byte(tc.src))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error = %v, want it to contain %q", tc.name, err, tc.want)
		}
	}
}

func TestDefaults(t *testing.T) {
	s, err := Decode("min.yaml", []byte("name: min\ntime: {start: 2026-01-01}\nconstellations: [{kind: galileo-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n"))
	if err != nil {
		t.Fatal(err)
	}
	if s.Seed != 1 || s.Time.Span.Seconds() != 86400 || s.Time.Step.Seconds() != 30 {
		t.Errorf("seed %d span %g step %g", s.Seed, s.Time.Span.Seconds(), s.Time.Step.Seconds())
	}
	c := s.Constellations[0]
	if c.Planes != 3 || c.Slots != 8 || c.Clock != "galileo-phm" || c.Altitude.Metres() != 29600e3-6378137 {
		t.Errorf("galileo-like defaults: %+v", c)
	}
	if s.Reference.Clock != "A" || s.Stations[0].Clock != "hmaser" || s.Walls.Profile != "gaussian" {
		t.Errorf("reference %q, station clock %q, profile %q", s.Reference.Clock, s.Stations[0].Clock, s.Walls.Profile)
	}
}

func TestDecodeCampaign(t *testing.T) {
	src := `name: c1
scenario: check-single-wall
window: 2 h
trials: 10
background_trials: 200
grid:
  thickness: [1e3 km, 1e4 km]
  step: [0.1 ns, 1 ns, 10 ns]
`
	c, err := DecodeCampaign("c.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if c.Cells() != 6 || c.Seed != 1 || c.FalseAlarm != 0.01 || c.Background != "noise" || len(c.Grid.Speed) != 1 {
		t.Errorf("campaign %+v", c)
	}
	ha, ha2, hb := c.Hash([]byte("a")), c.Hash([]byte("a")), c.Hash([]byte("b"))
	if ha == hb || ha != ha2 {
		t.Error("hash does not follow the scenario source")
	}
	bad := `name: c1
scenario: demo
window: 1 min
grid:
  thickness: [-1 km]
  step: [1 ns]
  lambda_eff: [1e11 GeV]
background: shuffled
`
	_, err = DecodeCampaign("bad.yaml", []byte(bad))
	for _, want := range []string{"bad.yaml:3: window: must be at least 10 min", "bad.yaml:5: grid.thickness[0]: must be positive", "give grid.step or grid.lambda_eff, not both", "bad.yaml:8: background: \"shuffled\""} {
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("error %v lacks %q", err, want)
		}
	}
}

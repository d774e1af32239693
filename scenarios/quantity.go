package scenarios

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// A Dimension is the physical dimension a quantity field accepts.
type Dimension int

// The dimensions used by scenario fields.
const (
	DimTime          Dimension = iota // seconds
	DimLength                         // metres
	DimSpeed                          // metres per second
	DimAngle                          // radians
	DimEnergyDensity                  // joules per cubic metre
	DimEnergy                         // joules
	DimRate                           // events per second (1/s)
)

// Physical constants used for unit conversion.
const (
	// GeV is one gigaelectronvolt in joules (exact: the elementary charge is
	// exact in the 2019 SI, CODATA 2018).
	GeV = 1.602176634e-10
	// JulianYear is the Julian year in seconds (365.25 d; IAU convention).
	JulianYear = 365.25 * 86400
)

// unitTable lists, per dimension, every accepted unit spelling and its
// factor to SI.
var unitTable = map[Dimension]map[string]float64{
	DimTime: {
		"fs": 1e-15, "ps": 1e-12, "ns": 1e-9, "us": 1e-6, "µs": 1e-6, "ms": 1e-3, "s": 1,
		"min": 60, "h": 3600, "d": 86400, "day": 86400, "days": 86400,
		"wk": 7 * 86400, "yr": JulianYear, "y": JulianYear,
	},
	DimLength: {
		"mm": 1e-3, "cm": 1e-2, "m": 1, "km": 1e3, "Mm": 1e6,
	},
	DimSpeed: {
		"m/s": 1, "km/s": 1e3, "km/h": 1e3 / 3600,
	},
	DimAngle: {
		"rad": 1, "deg": math.Pi / 180, "°": math.Pi / 180,
		"arcmin": math.Pi / (180 * 60), "arcsec": math.Pi / (180 * 3600),
	},
	DimEnergyDensity: {
		"J/m^3": 1, "J/m3": 1,
		"GeV/cm^3": GeV * 1e6, "GeV/cm3": GeV * 1e6,
		"GeV/m^3": GeV, "GeV/m3": GeV,
	},
	DimEnergy: {
		"J": 1, "eV": GeV * 1e-9, "keV": GeV * 1e-6, "MeV": GeV * 1e-3,
		"GeV": GeV, "TeV": GeV * 1e3,
	},
	DimRate: {
		"/s": 1, "1/s": 1, "Hz": 1, "/min": 1.0 / 60, "1/min": 1.0 / 60,
		"/h": 1.0 / 3600, "1/h": 1.0 / 3600, "/d": 1.0 / 86400, "1/d": 1.0 / 86400,
		"/yr": 1 / JulianYear, "1/yr": 1 / JulianYear,
	},
}

// siUnit is the unit a dimension's value is held in.
var siUnit = map[Dimension]string{
	DimTime: "s", DimLength: "m", DimSpeed: "m/s", DimAngle: "rad",
	DimEnergyDensity: "J/m^3", DimEnergy: "J", DimRate: "/s",
}

var dimName = map[Dimension]string{
	DimTime: "a duration", DimLength: "a length", DimSpeed: "a speed",
	DimAngle: "an angle", DimEnergyDensity: "an energy density",
	DimEnergy: "an energy", DimRate: "a rate",
}

// String names the dimension ("a duration", "a length", ...).
func (d Dimension) String() string {
	if s, ok := dimName[d]; ok {
		return s
	}
	return fmt.Sprintf("Dimension(%d)", int(d))
}

// Units returns the accepted unit spellings of d, sorted.
func (d Dimension) Units() []string {
	var us []string
	for u := range unitTable[d] {
		us = append(us, u)
	}
	sort.Slice(us, func(i, j int) bool {
		fi, fj := unitTable[d][us[i]], unitTable[d][us[j]]
		if fi != fj {
			return fi < fj
		}
		return us[i] < us[j]
	})
	return us
}

// ParseQuantity parses a number followed by a unit of dimension d, such as
// "30 s", "1e4 km", "300 km/s", "0.4 GeV/cm^3" or "1e11 GeV", and returns its
// value in SI units. The space between number and unit is optional. A
// missing or wrong unit is an error that lists the accepted units.
func ParseQuantity(s string, d Dimension) (float64, error) {
	table, ok := unitTable[d]
	if !ok {
		return 0, fmt.Errorf("scenarios: unknown dimension %d", int(d))
	}
	t := strings.TrimSpace(s)
	// The number is the longest prefix that looks like a float literal.
	end := numberEnd(t)
	if end == 0 {
		return 0, fmt.Errorf("want %s as a number with a unit, got %q (units: %s)", d, s, strings.Join(d.Units(), ", "))
	}
	v, err := strconv.ParseFloat(t[:end], 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fmt.Errorf("bad number %q in %q", t[:end], s)
	}
	unit := strings.TrimSpace(t[end:])
	if unit == "" {
		return 0, fmt.Errorf("missing unit in %q: want %s in one of %s", s, d, strings.Join(d.Units(), ", "))
	}
	f, ok := table[unit]
	if !ok {
		return 0, fmt.Errorf("unit %q in %q is not %s; accepted units: %s", unit, s, d, strings.Join(d.Units(), ", "))
	}
	r := v * f
	if math.IsInf(r, 0) {
		return 0, fmt.Errorf("value %q overflows", s)
	}
	return r, nil
}

// numberEnd returns the length of the float literal at the start of s
// (sign, digits, one decimal point, an exponent), or 0 if there is none.
func numberEnd(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	// An exponent only when digits follow, so that units starting with
	// 'e' stay units: "5eV" is 5 eV, "1e4km" is 1e4 km.
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

// FormatQuantity writes an SI value with its SI unit, e.g. "1800 s".
func FormatQuantity(v float64, d Dimension) string {
	return strconv.FormatFloat(v, 'g', -1, 64) + " " + siUnit[d]
}

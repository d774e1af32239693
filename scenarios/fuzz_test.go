package scenarios

import (
	"math"
	"testing"
)

// FuzzParseQuantity checks that no input makes the parser panic, and that
// a parsed value is finite.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{"30 s", "1e4 km", "300 km/s", "0.4 GeV/cm^3", "1e11 GeV", "-1.5e-3h", "", "e", "1e", ".", "+.5 deg", "5eV", "2 /d"} {
		f.Add(s, 0)
	}
	f.Fuzz(func(t *testing.T, s string, d int) {
		dim := Dimension(((d % 7) + 7) % 7)
		v, err := ParseQuantity(s, dim)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("ParseQuantity(%q) = %v without error", s, v)
		}
	})
}

// FuzzDecode checks that no YAML input makes the decoder panic.
func FuzzDecode(f *testing.F) {
	f.Add([]byte(badScenario))
	f.Add([]byte("name: x\ntime: {start: 2026-01-01}\nconstellations: [{kind: gps-like}]\nstations: [{id: A, lat: 1 deg, lon: 2 deg, reference: true}]\n"))
	if src, err := BuiltinSource("demo"); err == nil {
		f.Add(src)
	}
	f.Add([]byte("a: &x [*x]\n"))
	f.Add([]byte("walls: {events: [{t0: 1 h, direction: [1, 2, 3], speed: 1 km/s}]}\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Decode("fuzz.yaml", data)
		if err == nil && s == nil {
			t.Fatal("nil scenario without error")
		}
	})
}

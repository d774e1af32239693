package sim

import (
	"slices"
	"testing"

	"wallcross/inject"
	"wallcross/noise"
	"wallcross/scenarios"
)

// TestFamiliesAgree: a clock family a scenario accepts has a noise preset
// and sensitivity coefficients, and the other way round.
func TestFamiliesAgree(t *testing.T) {
	sc := slices.Sorted(slices.Values(scenarios.ClockFamilies))
	no := slices.Sorted(slices.Values(noise.Families()))
	in := slices.Sorted(slices.Values(inject.Families()))
	if !slices.Equal(sc, no) || !slices.Equal(sc, in) {
		t.Errorf("clock families differ:\nscenarios %v\nnoise     %v\ninject    %v", sc, no, in)
	}
}

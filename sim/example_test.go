package sim_test

import (
	"fmt"
	"math"

	"wallcross/scenarios"
	"wallcross/sim"
)

// Simulate the built-in noise-free scenario with one wall and look at the
// truth it records: each clock's own bias step, and the reference (KVSR)
// step that every series carries once the reference is crossed.
//
// Checked by hand against physics.md §1.2 and §3.3: peak δν/ν = A²/Λ² with
// A² = ħc·ρ·v̄·T·d = 1.973e-16 GeV·m × 4e5 GeV/m³ × 3e5 m/s × 3.156e7 s ×
// 1e7 m gives 7.47e-13 for Λ = 1e11 GeV, and ΔT = √π·7.47e-13·(d/v) =
// 44.1 ps for a clock at rest; G01 differs because it moves along the wall
// normal (v_rel ≠ v).
func ExampleRun() {
	s, err := scenarios.Resolve("check-single-wall")
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := sim.Run(sim.Config{Scenario: s}, sim.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d clocks × %d epochs of %g s, reference %s\n", len(d.Clocks), d.Epochs, d.Interval, d.Reference.Clocks[0])
	e := d.Events[0]
	fmt.Printf("wall: t0 = %g s, v = %g km/s, d = %g km, peak δν/ν = %.3g\n", e.T0, e.Speed/1e3, e.Thickness/1e3, e.PeakDnu)
	steps := map[string]float64{}
	for _, c := range d.Crossings {
		steps[c.Clock] = c.Step
	}
	g01, ref := d.ClockIndex("G01"), d.ClockIndex("KVSR")
	last := d.Epochs - 1
	fmt.Printf("G01 own step %.1f ps, KVSR step %.1f ps\n", steps["G01"]*1e12, steps["KVSR"]*1e12)
	fmt.Printf("G01 series at the end %.2f ps (own minus reference)\n", d.At(last, g01)*1e12)
	fmt.Printf("KVSR series at the end %g s\n", math.Abs(d.At(last, ref)))
	// Output:
	// 32 clocks × 240 epochs of 30 s, reference KVSR
	// wall: t0 = 3600 s, v = 300 km/s, d = 10000 km, peak δν/ν = 7.47e-13
	// G01 own step 44.1 ps, KVSR step 44.1 ps
	// G01 series at the end 0.00 ps (own minus reference)
	// KVSR series at the end 0 s
}

// Every random draw of a run comes from a stream named by (run seed, trial,
// clock, purpose), so a clock's noise does not depend on which worker
// simulates it or on the other clocks.
func ExampleSeedStream() {
	a := sim.SeedStream(42, 0, "G01", "noise")
	b := sim.SeedStream(42, 0, "G01", "noise")
	c := sim.SeedStream(42, 0, "G02", "noise")
	x, y, z := a.Uint64(), b.Uint64(), c.Uint64()
	fmt.Println(x == y, x == z)
	// Output:
	// true false
}

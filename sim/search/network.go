package search

import (
	"fmt"
	"math"
)

// Clock is one clock of a Network.
type Clock struct {
	ID        string // clock id, e.g. "G01" or a station name
	IsStation bool   // ground station clock (false: satellite)
	// Sensitivity maps a coupling class name to the clock's dimensionless
	// sensitivity coefficient K (δν/ν = K·δX/X). The class "eff" needs no
	// entry: it uses K = 1 for every clock. A missing key means K = 0.
	Sensitivity map[string]float64
}

// Network is the search's view of a dataset: clock biases relative to a
// reference clock on a uniform epoch grid, and every clock's position.
type Network struct {
	Start  int64   // first epoch, integer ns on GPS time
	Step   float64 // sample interval τ0, s
	Clocks []Clock
	// Ref is the index in Clocks of the reference clock every bias is
	// referred to, or −1 when the reference is not a clock of the network
	// (then its own crossing is not part of the templates). The reference's
	// own bias series (identically zero) is not used as data.
	Ref int
	// Bias[clock][epoch] is the clock bias relative to the reference, s;
	// NaN marks a gap. Every row has the same length (the epoch count).
	Bias [][]float64
	// Pos returns the celestial-frame (GCRS-like, geocentric) position of a
	// clock in m at t s since Start. It is called only at epoch times.
	Pos func(clock int, t float64) [3]float64
}

// maxBias bounds |bias| (s): far beyond any clock product (receiver clocks
// stay within ~1 ms, common practice), small enough that sums of squares
// cannot overflow.
const maxBias = 1e6

// Epochs returns the number of epochs.
func (n *Network) Epochs() int {
	if len(n.Bias) == 0 {
		return 0
	}
	return len(n.Bias[0])
}

// Validate reports a network the search cannot use.
func (n *Network) Validate() error {
	if !(n.Step > 0) || math.IsInf(n.Step, 0) {
		return fmt.Errorf("search: sample interval %g s must be positive and finite", n.Step)
	}
	if len(n.Clocks) < 2 {
		return fmt.Errorf("search: %d clocks, need at least 2", len(n.Clocks))
	}
	if len(n.Bias) != len(n.Clocks) {
		return fmt.Errorf("search: %d bias series for %d clocks", len(n.Bias), len(n.Clocks))
	}
	e := len(n.Bias[0])
	if e < 3 {
		return fmt.Errorf("search: %d epochs, need at least 3", e)
	}
	for j, b := range n.Bias {
		if len(b) != e {
			return fmt.Errorf("search: clock %q has %d epochs, want %d", n.Clocks[j].ID, len(b), e)
		}
		for k, v := range b {
			if math.IsInf(v, 0) || math.Abs(v) > maxBias {
				return fmt.Errorf("search: clock %q epoch %d: bias %g s is not finite or exceeds %g s", n.Clocks[j].ID, k, v, maxBias)
			}
		}
	}
	if n.Ref < -1 || n.Ref >= len(n.Clocks) {
		return fmt.Errorf("search: reference index %d out of range [-1, %d)", n.Ref, len(n.Clocks))
	}
	if n.Pos == nil {
		return fmt.Errorf("search: nil position function")
	}
	seen := make(map[string]bool, len(n.Clocks))
	for _, c := range n.Clocks {
		if seen[c.ID] {
			return fmt.Errorf("search: duplicate clock id %q", c.ID)
		}
		seen[c.ID] = true
	}
	return nil
}

// sensitivity returns clock j's K for a coupling class.
func (n *Network) sensitivity(j int, class string) float64 {
	if class == CouplingEff {
		return 1
	}
	return n.Clocks[j].Sensitivity[class]
}

// CouplingEff is the coupling class with K = 1 for every clock (the
// effective-coupling convention Λ_eff of the GPS limits).
const CouplingEff = "eff"

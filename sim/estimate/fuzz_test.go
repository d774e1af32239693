package estimate

import (
	"fmt"
	"math"
	"testing"
)

// FuzzSolve: arbitrary small observation tables give a solution or an
// error, never a panic, and a solution always has the reference at zero.
func FuzzSolve(f *testing.F) {
	f.Add([]byte{0xff, 0x13, 0x77, 0x00, 0x42, 0xff, 0xff, 0x01}, uint8(0))
	f.Add([]byte{0x0f, 0xf0, 0x0f, 0xf0}, uint8(4))
	f.Fuzz(func(t *testing.T, data []byte, refSel uint8) {
		if len(data) > 256 {
			return
		}
		o := &Observations{Interval: 30, Epochs: len(data)/2 + 1, Satellites: []string{"S1", "S2", "S3"}, Stations: []string{"A", "B", "C"}}
		for k := range o.Epochs {
			o.Start = append(o.Start, len(o.Sat))
			var mask, val byte
			if 2*k < len(data) {
				mask = data[2*k]
			}
			if 2*k+1 < len(data) {
				val = data[2*k+1]
			}
			for l := range 8 {
				if mask&(1<<l) == 0 {
					continue
				}
				s, r := l%3, (l/3)%3
				rho := 2e7 + float64(l)*1e3
				o.Sat = append(o.Sat, int16(s))
				o.Sta = append(o.Sta, int16(r))
				o.CodeOC = append(o.CodeOC, float64(val)*float64(l))
				o.PhaseOC = append(o.PhaseOC, float64(val)*0.01*float64(l*k))
				o.Computed = append(o.Computed, rho)
				o.Elev = append(o.Elev, 0.2+0.1*float64(l))
			}
		}
		o.Start = append(o.Start, len(o.Sat))
		ids := append(append([]string(nil), o.Satellites...), o.Stations...)
		ref := ids[int(refSel)%len(ids)]
		sol, err := Solve(o, SolveConfig{Reference: ref})
		if err != nil {
			return
		}
		j := sol.Index(ref)
		for k := range sol.Epochs {
			if v := sol.At(k, j); v != 0 && !math.IsNaN(v) {
				t.Fatalf("reference bias %g s at epoch %d", v, k)
			}
			for jj := range sol.Clocks {
				if v := sol.At(k, jj); math.IsInf(v, 0) {
					t.Fatalf("infinite bias at epoch %d clock %d", k, jj)
				}
			}
		}
	})
}

// ExampleSolve: a delay of 1 ns on the only link of a satellite goes
// entirely into that satellite's estimated clock (−1 ns).
func ExampleSolve() {
	obs := handObs(func(k, sat, sta int) float64 {
		if sat == 2 && k >= 3 {
			return 1e-9 // s, on link B–S3 from epoch 3 on
		}
		return 0
	})
	sol, err := Solve(obs, SolveConfig{Reference: "A", Threshold: math.Inf(1)})
	if err != nil {
		fmt.Println(err)
		return
	}
	for k := 2; k < 5; k++ {
		b := sol.At(k, sol.Index("B"))
		fmt.Printf("epoch %d: S3 %+.3f ns, |B| < 1e-20 s: %v\n", k, sol.At(k, sol.Index("S3"))*1e9, math.Abs(b) < 1e-20)
	}
	// Output:
	// epoch 2: S3 +0.000 ns, |B| < 1e-20 s: true
	// epoch 3: S3 -1.000 ns, |B| < 1e-20 s: true
	// epoch 4: S3 -1.000 ns, |B| < 1e-20 s: true
}

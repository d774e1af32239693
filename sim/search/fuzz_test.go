package search

import (
	"encoding/binary"
	"math"
	"testing"
)

// FuzzSearch feeds arbitrary bias values (any float64 bit pattern: NaN,
// ±Inf, huge, subnormal), epoch counts and bank settings to Search on a
// small network; it must return an error or a result, never panic.
func FuzzSearch(f *testing.F) {
	o := synthOpts{planes: 1, perPlane: 3, stations: 2, step: 30}
	pos := o.posFunc()
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) < 4 {
			return
		}
		nd := 1 + int(data[0]%6)
		nv := 1 + int(data[1]%3)
		thick := float64(data[2]%3) * 5e6
		whiten := int(data[3] % 3)
		data = data[4:]
		nclk := 5
		epochs := len(data) / 8 / nclk
		if epochs > 200 {
			epochs = 200
		}
		bias := make([][]float64, nclk)
		clocks := make([]Clock, nclk)
		for j := range nclk {
			clocks[j] = Clock{ID: satID(j), IsStation: j >= 3}
			bias[j] = make([]float64, epochs)
			for k := range epochs {
				off := (j*epochs + k) * 8
				bias[j][k] = math.Float64frombits(binary.LittleEndian.Uint64(data[off : off+8]))
			}
		}
		net := &Network{Step: 30, Clocks: clocks, Ref: 3, Bias: bias, Pos: pos}
		speeds := []float64{200e3, 300e3, 450e3}[:nv]
		res, err := Search(net, Config{Directions: nd, Speeds: speeds, Thicknesses: []float64{thick}, Whiten: whiten, Workers: 2})
		if err != nil {
			return
		}
		for m, x := range res.Stat {
			if math.IsNaN(x) || x < 0 {
				t.Fatalf("stat[%d] = %g", m, x)
			}
		}
	})
}

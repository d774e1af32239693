package inject

import (
	"encoding/csv"
	"os"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestLinkDelayPython compares Link with values computed independently in
// Python/numpy by testdata/link_delay.py (closed form with math.erf,
// math.tanh and numpy.logaddexp, itself checked there against a 2e6-point
// Simpson quadrature along the space-time path).
func TestLinkDelayPython(t *testing.T) {
	f, err := os.Open("testdata/link_delay.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 17 {
		t.Fatalf("%d rows in link_delay.csv, want 16 cases", len(rows)-1)
	}
	for _, r := range rows[1:] {
		v := make([]float64, len(r)-2)
		for i := range v {
			if v[i], err = strconv.ParseFloat(r[i+2], 64); err != nil {
				t.Fatal(err)
			}
		}
		p, err := ParseProfile(r[0])
		if err != nil {
			t.Fatal(err)
		}
		iw := IndexWall{Wall: Wall{ID: 1, T0: v[13], N: [3]float64{v[8], v[9], v[10]}, Speed: v[11], Thickness: v[12],
			Profile: p, A2: 1, Coupling: Coupling{Mode: CouplingEff, LambdaEff: 1}}, Eta: v[14]}
		got := iw.Link([3]float64{v[0], v[1], v[2]}, v[3], [3]float64{v[4], v[5], v[6]}, v[7])
		if !scalar.EqualWithinRel(got.Delay, v[15], 1e-12) {
			t.Errorf("%s/%s: delay %.15e s, Python %.15e s", r[0], r[1], got.Delay, v[15])
		}
	}
}

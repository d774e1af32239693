package orbits

import (
	"math"
	"testing"

	"wallcross/internal/extdata"
)

// TestLagrangeLeaveOneOut: interpolating each interior SP3 epoch from the
// others (the point left out) reproduces it to ≤ 5 mm RMS.
func TestLagrangeLeaveOneOut(t *testing.T) {
	// Set A of ../shared/extdata: the CODE MGEX final 5-min SP3 of 2021-04-28.
	sp3, err := ReadSP3File(extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3"))
	if err != nil {
		t.Fatal(err)
	}
	orbs := sp3.Tracks(sp3.Epochs[0], true)
	var sum float64
	var n int
	for _, o := range orbs {
		for k := LagrangePoints / 2; k < len(o.T)-LagrangePoints/2; k++ {
			loo := &Track{Sat: o.Sat, Origin: o.Origin}
			loo.T = append(append([]float64{}, o.T[:k]...), o.T[k+1:]...)
			loo.Pos = append(append([][3]float64{}, o.Pos[:k]...), o.Pos[k+1:]...)
			p := loo.At(o.T[k])
			d := math.Sqrt(sq(p[0]-o.Pos[k][0]) + sq(p[1]-o.Pos[k][1]) + sq(p[2]-o.Pos[k][2]))
			sum += d * d
			n++
		}
	}
	rms := math.Sqrt(sum / float64(n))
	t.Logf("leave-one-out RMS over %d interior satellite-epochs: %.2f mm", n, rms*1e3)
	if n < 1000 || rms > 5e-3 {
		t.Errorf("leave-one-out RMS %.2f mm over %d points, want ≤ 5 mm", rms*1e3, n)
	}
}

package score

import (
	"os"
	"path/filepath"
	"testing"

	"wallcross/internal/extdata"
	"wallcross/orbits"
	"wallcross/sim"
)

// TestClocksFromRinex: coverage runs from AS/AR records; CR records are
// ignored; a missing epoch splits a run.
func TestClocksFromRinex(t *testing.T) {
	const s = orbits.Time(1e9)
	t0 := orbits.Time(1300000000) * s
	var cf sim.ClockFile
	for k := range 10 {
		ep := t0 + orbits.Time(30*k)*s
		cf.Records = append(cf.Records, sim.ClockRecord{Type: "AS", Name: "G01", Epoch: ep, N: 1})
		if k != 4 && k != 5 {
			cf.Records = append(cf.Records, sim.ClockRecord{Type: "AR", Name: "BRUX", Epoch: ep, N: 1})
		}
		cf.Records = append(cf.Records, sim.ClockRecord{Type: "CR", Name: "X", Epoch: ep, N: 1})
	}
	var tr Truth
	if err := tr.clocksFromRinex(&cf, "t.clk"); err != nil {
		t.Fatal(err)
	}
	if len(tr.Clocks) != 2 || tr.Interval != 30 || tr.Span() != 300 {
		t.Fatalf("clocks %v, interval %g s, span %g s", tr.Clocks, tr.Interval, tr.Span())
	}
	if want := [][2]float64{{0, 90}, {180, 270}}; len(tr.runs[1]) != 2 || tr.runs[1][0] != want[0] || tr.runs[1][1] != want[1] {
		t.Errorf("BRUX runs %v, want %v", tr.runs[1], want)
	}
	// [125, 175]: G01 only → 1 of 2 clocks, not fewer than half.
	if tr.InGap(150, 25) || !tr.InGap(1000, 25) {
		t.Error("gap rule on RINEX coverage")
	}
	if err := (&Truth{}).clocksFromRinex(&sim.ClockFile{}, "e.clk"); err == nil {
		t.Error("empty clock file accepted")
	}
}

// TestReadTruthRinex reads a directory holding events.csv and a real IGS
// analysis-centre clock file (CODE MGEX final, 2021-04-28 19:30–20:30
// GPST, 30 s; ../shared/extdata) instead of clocks.csv.
func TestReadTruthRinex(t *testing.T) {
	src := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	dir := t.TempDir()
	b, err := os.ReadFile(src)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, filepath.Base(src)), b, 0o644); err != nil {
		t.Fatal(err)
	}
	ev := "event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu\n0,1800,0,0,1,300000,1e7,gaussian,1e11,\n1,9000,0,0,1,300000,1e7,gaussian,1e11,\n"
	if err := os.WriteFile(filepath.Join(dir, "events.csv"), []byte(ev), 0o644); err != nil {
		t.Fatal(err)
	}
	tr, err := ReadTruth(dir)
	if err != nil {
		t.Fatal(err)
	}
	// README.txt of extdata: 30-s satellite clocks over one hour.
	if tr.Interval != 30 || tr.Span() < 3600 || tr.Span() > 3700 || len(tr.Clocks) < 20 {
		t.Errorf("interval %g s, span %g s, %d clocks", tr.Interval, tr.Span(), len(tr.Clocks))
	}
	if tr.InGap(1800, 60) || !tr.InGap(9000, 60) {
		t.Error("t0 = 1800 s should have data, 9000 s (after the file) not")
	}
	if tr.RMaxSource != "fallback (geostationary radius)" {
		t.Errorf("R_max from %s", tr.RMaxSource)
	}
	// Two clock files: ambiguous.
	os.WriteFile(filepath.Join(dir, "other.clk"), b[:100], 0o644)
	if _, err := ReadTruth(dir); err == nil {
		t.Error("two RINEX clock files accepted")
	}
}

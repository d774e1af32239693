package score

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// The hand-made dataset testdata/ds1 (one day at 300 s, 4 clocks, 8 walls)
// and testdata/candidates1.csv; every expected number below is worked out
// by hand from those files.
func readDS1(t *testing.T) (*Truth, []Candidate) {
	t.Helper()
	tr, err := ReadTruth("testdata/ds1")
	if err != nil {
		t.Fatal(err)
	}
	c, err := ReadCandidatesFile("testdata/candidates1.csv")
	if err != nil {
		t.Fatal(err)
	}
	return tr, c
}

func TestReadTruth(t *testing.T) {
	tr, _ := readDS1(t)
	if len(tr.Events) != 8 || len(tr.Clocks) != 4 {
		t.Fatalf("%d events, %d clocks; want 8, 4", len(tr.Events), len(tr.Clocks))
	}
	// orbits.sp3: PG01 at 26 560 km is the largest radius.
	if !scalar.EqualWithinRel(tr.RMax, 26560e3, 1e-12) || tr.RMaxSource != "orbits.sp3" {
		t.Errorf("RMax = %g m, want 2.656e7 (from %s)", tr.RMax, tr.RMaxSource)
	}
	if tr.Span() != 86400 || tr.Interval != 300 {
		t.Errorf("span %g s, interval %g s; want 86400, 300", tr.Span(), tr.Interval)
	}
	if e := tr.Events[0]; e.MaxStep != 3e-10 || e.MaxLag != 88.5 {
		t.Errorf("event 0: max step %g s, max lag %g s; want 3e-10, 88.5", e.MaxStep, e.MaxLag)
	}
	if !math.IsNaN(tr.Events[2].MaxStep) {
		t.Errorf("event 2 has no crossings but max step %g", tr.Events[2].MaxStep)
	}
	w, vmin := DefaultWindow(tr)
	if !scalar.EqualWithinRel(w, 2*26560e3/200e3, 1e-12) || vmin != 200e3 {
		t.Errorf("default window %g s (v_min %g m/s), want 265.6 s", w, vmin)
	}
}

// TestEventsUnknownLambda: lambda_eff_gev and peak_dnu may be empty or NaN
// (walls given by their step); the cell then has no Λ_eff.
func TestEventsUnknownLambda(t *testing.T) {
	tr, err := truthFrom("event,t0_s,nx,ny,nz,speed_m_s,thickness_m,profile,lambda_eff_gev,peak_dnu\n0,100,0,0,1,3e5,1e6,gaussian,NaN,NaN\n1,900,0,0,1,3e5,1e6,gaussian,,\n",
		"", "t_s,A\n0,1\n300,1\n600,1\n900,1\n")
	if err != nil {
		t.Fatal(err)
	}
	r, err := Score(tr, []Candidate{{Line: 2, T0: 110, Stat: 1}}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Cells) != 1 || r.Cells[0].N != 2 || r.Cells[0].Found != 1 || !math.IsNaN(r.Cells[0].LambdaEff) {
		t.Errorf("cells %+v", r.Cells)
	}
	if _, err := truthFrom("event,t0_s,nx,ny,nz,speed_m_s,thickness_m,lambda_eff_gev\n0,1,0,0,1,3e5,1e6,-1\n", "", "t_s\n0\n"); err == nil {
		t.Error("negative Λ_eff accepted")
	}
}

func TestInGap(t *testing.T) {
	tr, _ := readDS1(t)
	for _, c := range []struct {
		t, half float64
		want    bool
	}{
		{43000, 100, true},  // only STA2 has data in 40000…46000
		{40000, 100, false}, // G01, G02, STA1 have t = 39900
		{40050, 100, true},  // [39950, 40150]: only STA2
		{46100, 100, false}, // 46200 has data for all
		{60000, 10, false},  // G02 missing at 60000: 3 of 4 have data
		{60000, 0, false},   // window of one sample
		{100000, 100, true}, // after the data: no clock
		{-500, 100, true},   // before the data
		{-500, 500, false},  // reaches t = 0
	} {
		if got := tr.InGap(c.t, c.half); got != c.want {
			t.Errorf("InGap(%g, ±%g) = %v, want %v", c.t, c.half, got, c.want)
		}
	}
}

func TestScoreDefault(t *testing.T) {
	tr, cands := readDS1(t)
	r, err := Score(tr, cands, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// Events 0,1,3,5,6,7 found; 2 is 200 s off (> 132.8 s); 4 is in the gap.
	want := map[string]int{"Usable": 7, "InGap": 1, "GapFound": 1, "Found": 6, "Missed": 1, "False": 3, "Counted": 10}
	got := map[string]int{"Usable": r.Usable, "InGap": r.InGap, "GapFound": r.GapFound, "Found": r.Found, "Missed": r.Missed, "False": r.False, "Counted": r.Counted}
	for k, v := range want {
		if got[k] != v {
			t.Errorf("%s = %d, want %d", k, got[k], v)
		}
	}
	if r.FalsePerDay != 3 {
		t.Errorf("false alarms per day = %g, want 3", r.FalsePerDay)
	}
	status := map[string]string{}
	line := map[string]int{}
	for _, m := range r.Matches {
		if m.Event != "" {
			status[m.Event], line[m.Event] = m.Status, m.Candidate
		}
	}
	// Greedy by stat: stat 9 (t 70090) takes event 7 (10 s), then stat 5
	// (t 70050) takes event 6; candidate lines count the comment and header.
	wantStatus := map[string]string{"0": "found", "1": "found", "2": "missed", "3": "found", "4": "gap_found", "5": "found", "6": "found", "7": "found"}
	wantLine := map[string]int{"6": 10, "7": 9, "2": 0}
	for k, v := range wantStatus {
		if status[k] != v {
			t.Errorf("event %s: status %q, want %q", k, status[k], v)
		}
	}
	for k, v := range wantLine {
		if line[k] != v {
			t.Errorf("event %s: candidate line %d, want %d", k, line[k], v)
		}
	}
	// Cells (thickness, speed, Λ): hand count.
	wantCells := []struct {
		d, v, l  float64
		n, f, gp int
		step     float64
	}{
		{1e6, 2e5, 1e12, 1, 0, 0, math.NaN()},
		{1e6, 3e5, 1e12, 2, 2, 0, 2.5e-10}, // median of 3e-10 and 2e-10
		{1e6, 3e5, 2e12, 1, 1, 1, math.NaN()},
		{1e7, 3e5, 1e12, 3, 3, 0, math.NaN()},
	}
	if len(r.Cells) != len(wantCells) {
		t.Fatalf("%d cells, want %d: %+v", len(r.Cells), len(wantCells), r.Cells)
	}
	for i, w := range wantCells {
		c := r.Cells[i]
		if c.Thickness != w.d || c.Speed != w.v || c.LambdaEff != w.l || c.N != w.n || c.Found != w.f || r.CellGap[i] != w.gp ||
			!(c.Step == w.step || math.IsNaN(c.Step) && math.IsNaN(w.step)) {
			t.Errorf("cell %d = %+v gap %d, want %+v", i, c, r.CellGap[i], w)
		}
	}
	// ROC: found stats {10,9,8,6,5,2}, false {4,3.5,1}.
	if len(r.ROC) != 9 {
		t.Fatalf("%d ROC rows, want 9", len(r.ROC))
	}
	for _, c := range []struct {
		th         float64
		found, fal int
	}{{10, 1, 0}, {4, 5, 1}, {3.5, 5, 2}, {1, 6, 3}} {
		for _, p := range r.ROC {
			if p.Threshold == c.th && (p.Found != c.found || p.False != c.fal || p.Efficiency != float64(c.found)/7) {
				t.Errorf("ROC at %g: %+v, want found %d false %d", c.th, p, c.found, c.fal)
			}
		}
	}
}

func TestScoreThresholdDirection(t *testing.T) {
	tr, cands := readDS1(t)
	r, err := Score(tr, cands, Options{Threshold: 3, HasThreshold: true, DirectionTol: 30 * math.Pi / 180})
	if err != nil {
		t.Fatal(err)
	}
	// Event 3's candidate points 90° away (false); event 5's has stat 2 < 3.
	if r.Found != 4 || r.Missed != 3 || r.False != 3 || r.Counted != 8 || r.GapFound != 1 {
		t.Errorf("found %d missed %d false %d counted %d gap-found %d; want 4 3 3 8 1", r.Found, r.Missed, r.False, r.Counted, r.GapFound)
	}
	var below int
	for _, m := range r.Matches {
		if m.Status == StatusBelow {
			below++
		}
		if m.Event == "5" && (m.Status != StatusMissed || m.Candidate != 8) {
			t.Errorf("event 5: %+v, want missed with candidate line 8", m)
		}
		if m.Event == "0" && !scalar.EqualWithinAbs(m.AngleDeg, 0, 1e-9) {
			t.Errorf("event 0 angle %g°", m.AngleDeg)
		}
	}
	if below != 1 {
		t.Errorf("%d candidates below threshold unmatched, want 1", below)
	}
	// A window of 500 s catches event 2's candidate (200 s off).
	r2, err := Score(tr, cands, Options{Window: 500})
	if err != nil {
		t.Fatal(err)
	}
	if r2.Found != 7 || r2.False != 2 || r2.WindowSource != "option" {
		t.Errorf("500 s window: found %d false %d (%s), want 7, 2", r2.Found, r2.False, r2.WindowSource)
	}
}

func TestScoreOptionsErrors(t *testing.T) {
	tr, cands := readDS1(t)
	for _, o := range []Options{{Window: -1}, {Window: math.Inf(1)}, {DirectionTol: -0.1}, {DirectionTol: 4}, {HasThreshold: true, Threshold: math.NaN()}} {
		if _, err := Score(tr, cands, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
}

func TestWriteFiles(t *testing.T) {
	tr, cands := readDS1(t)
	r, err := Score(tr, cands, Options{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := r.WriteFiles(dir); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"summary.json", "matches.csv", "efficiency.csv", "roc.csv", "efficiency.png", "roc.png"} {
		if fi, err := os.Stat(filepath.Join(dir, f)); err != nil || fi.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}
	var s map[string]any
	b, _ := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	if s["found"].(float64) != 6 || s["threshold"] != nil || s["injections_in_gap"].(float64) != 1 {
		t.Errorf("summary.json: found %v threshold %v in_gap %v", s["found"], s["threshold"], s["injections_in_gap"])
	}
	rows, err := ReadEfficiencyFile(filepath.Join(dir, "efficiency.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 4 || rows[3].Found != 3 || !math.IsNaN(rows[0].Step) {
		t.Errorf("efficiency.csv read back as %+v", rows)
	}
	var out bytes.Buffer
	if err := r.WriteSummary(&out); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"265.6 s", "found / missed    6 / 1", "3 false alarms = 3 per day", "1 in gaps"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
}

func ExampleScore() {
	tr, _ := ReadTruth("testdata/ds1")
	cands, _ := ReadCandidatesFile("testdata/candidates1.csv")
	r, _ := Score(tr, cands, Options{})
	fmt.Printf("window %.1f s: %d found, %d missed, %d in gaps, %.0f false alarms/day\n",
		r.Window, r.Found, r.Missed, r.InGap, r.FalsePerDay)
	fmt.Printf("efficiency %.3f, Clopper–Pearson [%.3f, %.3f]\n", r.Efficiency, r.CP.Low, r.CP.High)
	// Output:
	// window 265.6 s: 6 found, 1 missed, 1 in gaps, 3 false alarms/day
	// efficiency 0.857, Clopper–Pearson [0.421, 0.996]
}

// TestSummaryFits: the sigmoid fits per thickness appear in the printed
// summary and in summary.json.
func TestSummaryFits(t *testing.T) {
	cells := synthEff(t)
	r := &Result{Cells: cells, CellGap: make([]int, len(cells)), Threshold: math.NaN(), Efficiency: math.NaN()}
	var out bytes.Buffer
	if err := r.WriteSummary(&out); err != nil {
		t.Fatal(err)
	}
	if strings.Count(out.String(), "h50 = ") != 2 {
		t.Errorf("summary:\n%s", out.String())
	}
	b, err := json.Marshal(r.summary())
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Fits []struct {
			Thickness float64 `json:"thickness_m"`
			Mu        float64 `json:"mu_log10"`
			MuErr     float64 `json:"mu_err"`
		} `json:"sigmoid_fits"`
	}
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	// synthEff draws d = 1e6 m from μ = −10.5 and d = 1e7 m from μ = −10.
	if len(s.Fits) != 2 || s.Fits[0].Thickness != 1e6 || math.Abs(s.Fits[0].Mu+10.5) > 4*s.Fits[0].MuErr || math.Abs(s.Fits[1].Mu+10) > 4*s.Fits[1].MuErr {
		t.Errorf("fits %+v", s.Fits)
	}
}

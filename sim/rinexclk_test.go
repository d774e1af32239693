package sim

import (
	"bytes"
	"compress/gzip"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"wallcross/internal/extdata"
	"wallcross/orbits"
)

// Expected values below were read off the real CODE files in
// ../shared/extdata (README.txt there gives their provenance) with grep and
// awk; the counts are `grep -c '^AS '` and `grep -c '^AR '`.

func TestReadRinexClockSetA304(t *testing.T) {
	p := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	cf, err := ReadRinexClock(p)
	if err != nil {
		t.Fatal(err)
	}
	if cf.Version != 3.04 || cf.System != "M" || cf.TimeSystem != "GPS" || cf.LeapSeconds != 18 {
		t.Errorf("header: version %v system %q time system %q leap %d, want 3.04 M GPS 18", cf.Version, cf.System, cf.TimeSystem, cf.LeapSeconds)
	}
	if got := strings.Join(cf.DataTypes, " "); got != "AR AS" {
		t.Errorf("data types %q, want \"AR AS\"", got)
	}
	if len(cf.Refs) != 1 || len(cf.Refs[0].Clocks) != 1 || cf.Refs[0].Clocks[0] != (RefClock{Name: "WAB200CHE", DOMES: "14014M002"}) {
		t.Errorf("reference %+v, want WAB200CHE 14014M002", cf.Refs)
	}
	if len(cf.Stations) != 135 || cf.Frame != "IGb14" {
		t.Errorf("%d stations in frame %q, want 135 in IGb14", len(cf.Stations), cf.Frame)
	}
	// First SOLN STA line: WAB200CHE 14014M002 4327318171 566956021 4636425977 (mm).
	if s := cf.Stations[0]; s.Name != "WAB200CHE" || s.X != 4327318.171 || s.Y != 566956.021 || s.Z != 4636425.977 {
		t.Errorf("first station %+v", s)
	}
	if len(cf.PRNs) != 116 || cf.PRNs[0] != "C06" || cf.PRNs[115] != "R24" {
		t.Errorf("PRN list: %d entries %v…", len(cf.PRNs), cf.PRNs[:3])
	}
	var as, ar int
	for _, r := range cf.Records {
		switch r.Type {
		case "AS":
			as++
		case "AR":
			ar++
		}
	}
	if as != 14036 || ar != 1863 {
		t.Errorf("%d AS and %d AR records, want 14036 and 1863", as, ar)
	}
	t1930 := orbits.FromCalendar(2021, 4, 28, 19, 30, 0)
	r := cf.Records[0] // AR WAB200CHE 2021 04 28 19 30  0.000000  2    0.217267716775E-06  0.458032568265E-10
	if r.Type != "AR" || r.Name != "WAB200CHE" || r.Epoch != t1930 || r.N != 2 ||
		r.Values[0] != 0.217267716775e-06 || r.Values[1] != 0.458032568265e-10 {
		t.Errorf("first record %+v", r)
	}
	found := false
	for _, r := range cf.Records { // AS G01 2021 04 28 19 30 30.000000  1    0.703906610330E-03
		if r.Name == "G01" && r.Epoch == t1930+30e9 {
			found = true
			if r.N != 1 || r.Values[0] != 0.703906610330e-03 {
				t.Errorf("G01 19:30:30: %+v", r)
			}
		}
	}
	if !found {
		t.Error("no G01 record at 19:30:30")
	}
	last := cf.Records[len(cf.Records)-1] // AS R24 2021 04 28 20 30  0.000000  2    0.406289793706E-04
	if last.Name != "R24" || last.Epoch != t1930+3600e9 || last.Values[0] != 0.406289793706e-04 {
		t.Errorf("last record %+v", last)
	}
}

func TestReadRinexClockSetB200(t *testing.T) {
	p := extdata.Path(t, "set_B_2023-073_multi/COD0OPSRAP_20230730000_01D_30S_CLK.CLK")
	raw, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write(raw)
	zw.Close()
	for _, in := range []struct {
		name string
		data []byte
	}{{"plain", raw}, {"gzip", gz.Bytes()}} {
		cf, err := ParseRinexClock(bytes.NewReader(in.data), p)
		if err != nil {
			t.Fatalf("%s: %v", in.name, err)
		}
		if cf.Version != 2.00 || cf.TimeSystem != "GPS" || cf.LeapSeconds != 18 || cf.Frame != "IGS20" {
			t.Errorf("%s header: %v %q %d %q", in.name, cf.Version, cf.TimeSystem, cf.LeapSeconds, cf.Frame)
		}
		if got := cf.Reference(); len(got) != 1 || got[0] != "WAB2" {
			t.Errorf("%s reference %v, want [WAB2]", in.name, got)
		}
		// WAB2 14014M002 4327318149 566956054 4636425995 (mm)
		if len(cf.Stations) != 105 || cf.Stations[0].Name != "WAB2" || cf.Stations[0].DOMES != "14014M002" ||
			cf.Stations[0].X != 4327318.149 || cf.Stations[0].Z != 4636425.995 {
			t.Errorf("%s: %d stations, first %+v", in.name, len(cf.Stations), cf.Stations[0])
		}
		if len(cf.PRNs) != 78 || len(cf.Records) != 78+105 {
			t.Errorf("%s: %d PRNs and %d records, want 78 and 183", in.name, len(cf.PRNs), len(cf.Records))
		}
		t0 := orbits.FromCalendar(2023, 3, 14, 0, 0, 0)
		r := cf.Records[0] // AR WAB2 2023 03 14 00 00 00.000000  2    0.245905105131E-06  0.388229519012E-10
		if r.Name != "WAB2" || r.Type != "AR" || r.Epoch != t0 || r.Values[0] != 0.245905105131e-06 || r.Values[1] != 0.388229519012e-10 {
			t.Errorf("%s first record %+v", in.name, r)
		}
	}
}

func TestAppendE19(t *testing.T) {
	// Strings as printed in the CODE 3.04 file of set A (Fortran E19.12).
	for _, s := range []string{
		"  0.217267716775E-06", " -0.243088894647E-03", "  0.703906610330E-03",
		"  0.458032568265E-10", " -0.361516985998E-07", "  0.000000000000E+00",
	} {
		v, err := parseFloat(s)
		if err != nil {
			t.Fatal(err)
		}
		got, err := appendE19(nil, v)
		if err != nil || string(got) != s[1:] {
			t.Errorf("appendE19(%g) = %q, %v; want %q", v, got, err, s[1:])
		}
	}
	for _, v := range []float64{math.Inf(1), math.NaN(), 1e120} {
		if _, err := appendE19(nil, v); err == nil {
			t.Errorf("appendE19(%g) gave no error", v)
		}
	}
	// Rounding up across a decade: 9.9999999999996e-5 → 0.100000000000E-03.
	if got, _ := appendE19(nil, 9.9999999999996e-5); string(got) != " 0.100000000000E-03" {
		t.Errorf("decade carry: %q", got)
	}
}

// testDataset builds a small mixed network with gaps, an ensemble reference
// and a change of reference.
func testDataset(t testing.TB) *Dataset {
	t.Helper()
	d := &Dataset{
		ToolVersion: "test",
		Start:       orbits.FromCalendar(2021, 4, 28, 23, 58, 0),
		Interval:    30,
		Epochs:      9,
		Clocks: []Clock{
			{ID: "G01", Kind: Satellite, Family: "gps-iif-rb", Sensitivity: map[string]float64{"alpha": 2.0, "me": 0}},
			{ID: "E11", Kind: Satellite, Family: "gal-phm", Sensitivity: map[string]float64{"alpha": 1.0}},
			{ID: "ALBA00XYZ", Kind: Station, Family: "hmaser"},
			{ID: "BRIO", Kind: Station, Family: "cs"},
		},
		Reference:        Reference{Clocks: []string{"ALBA00XYZ", "BRIO"}, Weights: []float64{0.75, 0.25}},
		ReferenceChanges: []ReferenceChange{{Epoch: 5, Reference: Reference{Clocks: []string{"BRIO"}, Weights: []float64{1}}}},
		Stations: []StationInfo{
			{ID: "ALBA00XYZ", X: 4327318.171, Y: 566956.021, Z: 4636425.977, LatDeg: 46.9, LonDeg: 7.46, H: 611.2, Clock: "hmaser"},
			{ID: "BRIO", X: -2364337.725, Y: 4870285.664, Z: -3360809.359, LatDeg: -31.9, LonDeg: 115.9, H: 24, Clock: "cs"},
		},
		Events:    []Event{{ID: 0, T0: 61.5, N: [3]float64{0.6, 0, -0.8}, Speed: 3e5, Thickness: 1e7, Profile: "gaussian", LambdaEffGeV: 1e12, PeakDnu: 1.25e-13}},
		Crossings: []Crossing{{Event: 0, Clock: "G01", TCross: 40.25, Step: 1e-11}, {Event: 0, Clock: "BRIO", TCross: 70.125, Step: -3e-12}},
		Nuisances: []Nuisance{{Kind: "gap", Clock: "E11", T: 60, Duration: 60}, {Kind: "reference_change", Clock: "*", T: 150}},
		Seed:      42,
		Scenario:  []byte(`{"name":"unit"}`),
	}
	d.Bias = make([]float64, d.Epochs*len(d.Clocks))
	for i := range d.Bias {
		d.Bias[i] = 1e-4*math.Sin(float64(i)*1.7) + 1e-9/float64(i+1)
	}
	d.Bias[0] = 0
	d.Bias[1] = -3.3e-15
	d.Bias[2*4+1] = math.NaN() // E11 gap at epochs 2–3
	d.Bias[3*4+1] = math.NaN()
	d.Bias[8*4+2] = math.NaN()
	return d
}

func TestRinexClockRoundTrip(t *testing.T) {
	d := testDataset(t)
	p := filepath.Join(t.TempDir(), RinexFile)
	if _, err := WriteRinexClock(p, d); err != nil {
		t.Fatal(err)
	}
	cf, err := ReadRinexClock(p)
	if err != nil {
		t.Fatal(err)
	}
	if cf.Version != 3.04 || cf.TimeSystem != "GPS" || cf.System != "M" {
		t.Errorf("header %v %q %q", cf.Version, cf.TimeSystem, cf.System)
	}
	if len(cf.Refs) != 2 || strings.Join(cf.Reference(), " ") != "ALBA00XYZ BRIO" ||
		len(cf.Refs[1].Clocks) != 1 || cf.Refs[1].Clocks[0].Name != "BRIO" ||
		cf.Refs[1].Start != d.EpochTime(5) || cf.Refs[0].End != d.EpochTime(4) || cf.Refs[0].Start != d.Start {
		t.Errorf("reference blocks %+v", cf.Refs)
	}
	if len(cf.Stations) != 2 || cf.Stations[1].Name != "BRIO" || cf.Stations[1].X != -2364337.725 || cf.Stations[1].Z != -3360809.359 {
		t.Errorf("stations %+v", cf.Stations)
	}
	if strings.Join(cf.PRNs, " ") != "G01 E11" {
		t.Errorf("PRN list %v", cf.PRNs)
	}
	got := make(map[[2]int64]float64)
	for _, r := range cf.Records {
		j := d.ClockIndex(r.Name)
		want := "AS"
		if d.Clocks[j].Kind == Station {
			want = "AR"
		}
		if j < 0 || r.N != 1 || r.Type != want {
			t.Fatalf("record %+v", r)
		}
		got[[2]int64{int64(r.Epoch), int64(j)}] = r.Values[0]
	}
	n := 0
	for k := range d.Epochs {
		for j := range d.Clocks {
			v := d.At(k, j)
			g, ok := got[[2]int64{int64(d.EpochTime(k)), int64(j)}]
			if math.IsNaN(v) {
				if ok {
					t.Errorf("gap at epoch %d clock %d written as %g", k, j, g)
				}
				continue
			}
			n++
			// Printed precision: 12 significant digits.
			want, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'e', 11, 64), 64)
			if !ok || g != want {
				t.Errorf("epoch %d clock %s: read %g, want %g", k, d.Clocks[j].ID, g, want)
			}
			if !scalar.EqualWithinAbsOrRel(g, v, 1e-99, 5e-12) {
				t.Errorf("epoch %d clock %s: %g differs from %g by more than the printed precision", k, d.Clocks[j].ID, g, v)
			}
		}
	}
	if n != len(cf.Records) {
		t.Errorf("%d records, want %d", len(cf.Records), n)
	}
	// Column layout as measured on the CODE 3.04 file (gnss.md §2.3):
	// labels at column 66, bias in columns 46–64, epoch at 14–39.
	raw, _ := os.ReadFile(p)
	lines := strings.Split(string(raw), "\n")
	if lines[0][65:] != "RINEX VERSION / TYPE" || lines[0][21] != 'C' || lines[0][42] != 'M' || lines[0][:4] != "3.04" {
		t.Errorf("first line %q", lines[0])
	}
	for _, l := range lines {
		if strings.HasPrefix(l, "AS G01") {
			if l[13:39] != "2021  4 28 23 58  0.000000" || l[39:42] != "  1" {
				t.Errorf("record columns: %q", l)
			}
			if v, err := parseFloat(l[45:64]); err != nil || v != d.At(0, 0) {
				t.Errorf("bias columns 46–64 %q: %v", l[45:64], err)
			}
			break
		}
	}
	for _, l := range lines {
		if len(l) > 85 {
			t.Errorf("line longer than 85 columns: %q", l)
		}
	}
}

func TestParseRinexClockErrors(t *testing.T) {
	good := "3.04                 C                    G                      RINEX VERSION / TYPE\n" +
		"                                                                 END OF HEADER\n"
	rec := "AS G01       2021 04 28 19 30  0.000000  1    0.703906926273E-03\n"
	for _, c := range []struct{ name, in, want string }{
		{"empty", "", "empty file"},
		{"not rinex", "hello\n", "x.clk:1:"},
		{"no end", good[:87], "no END OF HEADER"},
		{"bad type", good + "XX G01       2021 04 28 19 30  0.000000  1    0.7E-03\n", "x.clk:3: unknown clock record type"},
		{"bad month", good + strings.Replace(rec, " 04 ", " 13 ", 1), "x.clk:3: epoch"},
		{"bad count", good + strings.Replace(rec, "  1  ", "  7  ", 1), "number of clock values"},
		{"bad value", good + strings.Replace(rec, "0.703906926273E-03", "0.70390692627XE-03", 1), "bad clock value"},
		{"missing cont", good + strings.Replace(rec, "  1    0.703906926273E-03", "  3    0.1E-03 0.2E-10", 1), "continuation"},
		{"too many", good + strings.Replace(rec, "E-03", "E-03 0.1E-10", 1), "at most 1"},
		{"long line", good + strings.Repeat("A", 5000) + "\n", "longer than"},
	} {
		_, err := ParseRinexClock(strings.NewReader(c.in), "x.clk")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	// A valid continuation line (values 3–4: rate and its sigma).
	cf, err := ParseRinexClock(strings.NewReader(good+strings.Replace(rec, "  1    0.703906926273E-03", "  4    0.1E-03  0.2E-10", 1)+"    0.3D-12  0.4E-15\n"), "x.clk")
	if err != nil || len(cf.Records) != 1 || cf.Records[0].Values != [6]float64{0.1e-3, 0.2e-10, 0.3e-12, 0.4e-15} {
		t.Errorf("continuation: %v %+v", err, cf)
	}
}

func FuzzParseRinexClock(f *testing.F) {
	f.Add([]byte("3.04                 C                    G                      RINEX VERSION / TYPE\n" +
		"                                                                 END OF HEADER\n" +
		"AS G01       2021 04 28 19 30  0.000000  1    0.703906926273E-03\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		cf, err := ParseRinexClock(bytes.NewReader(data), "fuzz.clk")
		if err != nil {
			if cf != nil {
				t.Fatal("non-nil file with an error")
			}
			return
		}
		for _, r := range cf.Records {
			if r.N < 1 || r.N > 6 || r.Name == "" {
				t.Fatalf("bad record accepted: %+v", r)
			}
			for _, v := range r.Values {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite value accepted: %+v", r)
				}
			}
		}
	})
}

func TestClockFileMatrix(t *testing.T) {
	p := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK")
	cf, err := ReadRinexClock(p)
	if err != nil {
		t.Fatal(err)
	}
	// Set A: satellite clocks every 30 s over 19:30–20:30 GPST (121 epochs,
	// 116 satellites in the PRN list); station clocks every 300 s
	// (README.txt of ../shared/extdata and the file's header comment).
	ep, names, b := cf.Matrix("AS")
	if len(ep) != 121 || len(names) != 116 || ep[0] != orbits.FromCalendar(2021, 4, 28, 19, 30, 0) || ep[120] != orbits.FromCalendar(2021, 4, 28, 20, 30, 0) {
		t.Errorf("AS matrix: %d epochs %v…, %d clocks", len(ep), ep[0], len(names))
	}
	n := 0
	for _, v := range b {
		if !math.IsNaN(v) {
			n++
		}
	}
	if n != 14036 {
		t.Errorf("%d values, want the 14036 AS records", n)
	}
	// Station clocks (counted with cut/sort/uniq on the AR records): one
	// station (WAB200CHE) at all 121 epochs, the other 134 at 13 epochs
	// 300 s apart.
	ep, names, b = cf.Matrix("AR")
	if len(ep) != 121 || len(names) != 135 || names[0] != "WAB200CHE" {
		t.Fatalf("AR matrix: %d epochs, %d clocks", len(ep), len(names))
	}
	for j := range 2 {
		n := 0
		for k := range ep {
			if !math.IsNaN(b[k*len(names)+j]) {
				n++
			}
		}
		if want := []int{121, 13}[j]; n != want {
			t.Errorf("%s: %d values, want %d", names[j], n, want)
		}
	}
}

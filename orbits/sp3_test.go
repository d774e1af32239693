package orbits

import (
	"bufio"
	"bytes"
	"math"
	"os"
	"strings"
	"testing"

	"wallcross/internal/extdata"
)

func TestReadSP3Files(t *testing.T) {
	// Satellite and epoch counts of ../shared/extdata/README.txt [data].
	for _, c := range []struct {
		rel      string
		version  byte
		sats     int
		epochs   int
		interval float64
	}{
		{"set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3", 'd', 116, 73, 300},
		{"set_A_2021-118_gps/grg21553.sp3", 'c', 51, 55, 300},
		{"set_B_2023-073_multi/COD0OPSRAP_20230730000_01D_05M_ORB.SP3", 'c', 78, 3, 300},
		{"set_C_2020-177_multi/GRG0MGXFIN_20201770000_01D_15M_ORB.SP3.gz", 'c', 75, 96, 900},
	} {
		s := readSP3T(t, c.rel)
		if s.Version != c.version || len(s.Sats) != c.sats || len(s.Epochs) != c.epochs || s.Interval != c.interval || s.TimeSystem != "GPS" {
			t.Errorf("%s: version %c, %d sats, %d epochs, interval %g s, %s", c.rel, s.Version, len(s.Sats), len(s.Epochs), s.Interval, s.TimeSystem)
		}
	}
	// First P record of set A CODE (line 30 of the file [data]):
	// PG01  13287.682546 -15491.926575  16545.690647    703.963460
	s := readSP3T(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3")
	e := s.Data[0][s.SatIndex("G01")]
	if s.Epochs[0] != FromCalendar(2021, 4, 28, 18, 0, 0) || e.Pos != [3]float64{13287.682546e3, -15491.926575e3, 16545.690647e3} ||
		math.Abs(e.Clock-703.963460e-6) > 1e-18 {
		t.Errorf("G01 first record: %v %+v", s.Epochs[0], e)
	}
	// J02 clock is 999999.999999 there: missing.
	if j := s.Data[len(s.Epochs)-1][s.SatIndex("J02")]; j.HasClock || !j.HasPos {
		t.Errorf("J02 last record: %+v", j)
	}
}

func readLines(t *testing.T, b []byte) []string {
	t.Helper()
	var out []string
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		out = append(out, strings.TrimRight(sc.Text(), " "))
	}
	return out
}

func TestWriteSP3LayoutMatchesCODE(t *testing.T) {
	// Rewriting the CODE SP3-d file (as written by AIUB [data]) must give
	// back the same lines (apart from trailing blanks): header columns,
	// + / ++ lines, epoch lines, P records in km/µs F14.6, 999999.999999
	// for missing clocks, EOF.
	path := extdata.Path(t, "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3")
	orig, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	s, err := ReadSP3(bytes.NewReader(orig), path)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteSP3(&buf, s); err != nil {
		t.Fatal(err)
	}
	want, got := readLines(t, orig), readLines(t, buf.Bytes())
	if len(want) != len(got) {
		t.Fatalf("rewritten file has %d lines, original %d", len(got), len(want))
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("line %d:\n got %q\nwant %q", i+1, got[i], want[i])
			break
		}
	}
	// Read back identically and write again byte for byte.
	s2, err := ReadSP3(bytes.NewReader(buf.Bytes()), "rewritten")
	if err != nil {
		t.Fatal(err)
	}
	var buf2 bytes.Buffer
	if err := WriteSP3(&buf2, s2); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), buf2.Bytes()) {
		t.Error("second write differs from the first")
	}
}

func TestSP3RoundTripGenerated(t *testing.T) {
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	ks := WalkerGalileo(ep)
	orbs := KeplerOrbits(ks)
	clock := func(sat SatID, t Time) (float64, bool) {
		if sat == "E03" {
			return 0, false
		}
		return 1e-6*float64(sat.PRN()) - 3.25e-4, true
	}
	s, err := BuildSP3(orbs, clock, SP3Options{Start: ep, Span: 3600, Step: 900})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteSP3(&buf, s); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(buf.String(), "\n")
	// SP3-d layout (Hilla 2016; gnss.md §2.2 table): #dP header, 5 epochs,
	// "+   24" count at columns 4-6, P lines of 60 characters, EOF.
	if !strings.HasPrefix(lines[0], "#dP2026  1  1  0  0  0.00000000       5 BCT   WGS84 BCT WALL") {
		t.Errorf("line 1 %q", lines[0])
	}
	if lines[2][3:6] != " 24" || lines[2][9:12] != "E01" {
		t.Errorf("+ line %q", lines[2])
	}
	var nP int
	for _, l := range lines {
		if strings.HasPrefix(l, "P") {
			nP++
			if len(l) != 60 {
				t.Errorf("P line length %d: %q", len(l), l)
			}
			if strings.HasPrefix(l, "PE03") && l[46:60] != " 999999.999999" {
				t.Errorf("missing clock written as %q", l[46:60])
			}
		}
	}
	if nP != 5*24 || lines[len(lines)-2] != "EOF" {
		t.Errorf("%d P lines, last line %q", nP, lines[len(lines)-2])
	}
	back, err := ReadSP3(bytes.NewReader(buf.Bytes()), "gen")
	if err != nil {
		t.Fatal(err)
	}
	for e := range s.Epochs {
		if back.Epochs[e] != s.Epochs[e] {
			t.Fatalf("epoch %d: %v vs %v", e, back.Epochs[e], s.Epochs[e])
		}
		for i := range s.Sats {
			a, b := s.Data[e][i], back.Data[e][i]
			for k := range 3 {
				if math.Abs(a.Pos[k]-b.Pos[k]) > 0.5e-3 {
					t.Fatalf("%s: position %v vs %v (F14.6 km = 1 mm)", s.Sats[i], a.Pos, b.Pos)
				}
			}
			if a.HasClock != b.HasClock || math.Abs(a.Clock-b.Clock) > 0.5e-12 {
				t.Fatalf("%s: clock %v vs %v", s.Sats[i], a, b)
			}
		}
	}
	dir := t.TempDir()
	if err := WriteSP3File(dir+"/x.sp3", s); err != nil {
		t.Fatal(err)
	}
	onDisk, _ := os.ReadFile(dir + "/x.sp3")
	if !bytes.Equal(onDisk, buf.Bytes()) {
		t.Error("WriteSP3File differs from WriteSP3")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("temporary files left: %v", ents)
	}
}

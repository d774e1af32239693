package orbits

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestMalformedFiles(t *testing.T) {
	// Each defect gives one clear error naming file:line and what was
	// expected (corpus described in testdata/malformed/README.txt).
	for _, c := range []struct {
		file string
		want []string
	}{
		{"nav_truncated.rnx", []string{"nav_truncated.rnx:27:", "G01 record has 5 broadcast orbit lines, want 7"}},
		{"nav_badnumber.rnx", []string{"nav_badnumber.rnx:29:", `bad number "-4.2971x2359276e-06" in field 1 of broadcast orbit line 2`}},
		{"nav_linecount.rnx", []string{"nav_linecount.rnx:35:", "R01 record has 2 broadcast orbit lines, want 3"}},
		{"nav_version.rnx", []string{"nav_version.rnx:1:", "unknown RINEX navigation version 5"}},
		{"sp3_truncated.sp3", []string{"sp3_truncated.sp3:60:", "no EOF"}},
		{"sp3_badnumber.sp3", []string{"sp3_badnumber.sp3:25:", `bad number`, "want F14.6"}},
		{"sp3_linecount.sp3", []string{"sp3_linecount.sp3:", "announces 79 satellites but the + lines list 78"}},
		{"sp3_version.sp3", []string{"sp3_version.sp3:1:", `unknown SP3 version "#e"`}},
	} {
		path := filepath.Join("testdata", "malformed", c.file)
		var err error
		if strings.HasSuffix(c.file, ".sp3") {
			_, err = ReadSP3File(path)
		} else {
			_, err = ReadNav(path)
		}
		if err == nil {
			t.Errorf("%s: no error", c.file)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", c.file, err, w)
			}
		}
		if strings.Count(err.Error(), "orbits:") != 1 {
			t.Errorf("%s: error %q is not a single message", c.file, err)
		}
	}
}

func addSeeds(f *testing.F, glob string) {
	paths, _ := filepath.Glob(glob)
	for _, p := range paths {
		if b, err := os.ReadFile(p); err == nil && len(b) < 8<<10 {
			f.Add(b)
		}
	}
}

// FuzzReadNav: the nav reader never panics, and whatever it accepts can be
// propagated without panicking.
func FuzzReadNav(f *testing.F) {
	addSeeds(f, "testdata/malformed/nav_*.rnx")
	if b, err := os.ReadFile("testdata/malformed/nav_badnumber.rnx"); err == nil {
		f.Add(bytes.Replace(b, []byte("x"), []byte("3"), 1)) // the repaired, valid file
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		n, err := ReadNavFrom(bytes.NewReader(data), "fuzz")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "orbits: ") {
				t.Fatalf("error without package prefix: %v", err)
			}
			return
		}
		for _, r := range n.Records {
			for _, dt := range []float64{-600, 0, 600} {
				r.PosVel(r.Ref().Add(dt))
				r.ClockBias(r.Ref().Add(dt))
				r.Relativistic(r.Ref().Add(dt))
			}
		}
	})
}

// FuzzReadSP3: the SP3 reader never panics, and an accepted file can be
// written and read back.
func FuzzReadSP3(f *testing.F) {
	addSeeds(f, "testdata/malformed/sp3_*.sp3") // the small ones; the big ones are in TestMalformedFiles
	// A small valid SP3-d file (3 satellites, 2 epochs, one missing clock).
	ep := FromCalendar(2026, 1, 1, 0, 0, 0)
	ks := WalkerGPS(ep)[:3]
	s, err := BuildSP3(KeplerOrbits(ks), func(sat SatID, t Time) (float64, bool) { return 1e-5, sat != "G02" },
		SP3Options{Start: ep, Span: 900, Step: 900})
	if err != nil {
		f.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteSP3(&buf, s); err != nil {
		f.Fatal(err)
	}
	f.Add(buf.Bytes())
	f.Add(bytes.Replace(buf.Bytes(), []byte("#dP"), []byte("#cV"), 1))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadSP3(bytes.NewReader(data), "fuzz")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "orbits: ") {
				t.Fatalf("error without package prefix: %v", err)
			}
			return
		}
		var buf bytes.Buffer
		if err := WriteSP3(&buf, s); err != nil {
			return // e.g. a value that does not fit F14.6
		}
		if _, err := ReadSP3(&buf, "rewritten"); err != nil {
			t.Fatalf("rewritten file does not read back: %v", err)
		}
	})
}

func TestMalformedInline(t *testing.T) {
	hdr4 := "     4.00           N: GNSS NAV DATA    M: MIXED            RINEX VERSION / TYPE\n" +
		"                                                            END OF HEADER\n"
	hdr3 := "     3.04           NAVIGATION DATA     M                   RINEX VERSION / TYPE\n" +
		"                                                            END OF HEADER\n"
	hdr2 := "     2              NAVIGATION DATA                         RINEX VERSION / TYPE\n" +
		"                                                            END OF HEADER\n"
	g02 := "G02 2022 06 08 10 00 00-6.528543308377E-04 3.410605131648E-13 0.000000000000E+00\n"
	orbit := "     9.600000000000E+01 3.384375000000E+01 4.106242470052E-09-2.157708626665E+00\n"
	for _, c := range []struct {
		name, data string
		want       []string
	}{
		{"v4 truncated", hdr4 + "> EPH G02 LNAV\n", []string{"x:3:", "truncated: no SV / EPOCH line"}},
		{"v4 short record", hdr4 + "> EPH G02 LNAV\n" + g02 + orbit + orbit, []string{"x:4:", "G02 record has 2 broadcast orbit lines, want 7"}},
		{"v4 wrong satellite", hdr4 + "> EPH G03 LNAV\n" + g02, []string{"x:4:", `names "G02", the record header "G03"`}},
		{"v4 no >", hdr4 + g02, []string{"x:3:", "starting with '>'"}},
		{"v3 unknown system", hdr3 + "X01 2022 06 08 10 00 00\n", []string{"x:3:", "satellite id"}},
		{"v3 bad epoch", hdr3 + "G02 2022 13 08 10 00 00-6.528543308377E-04 3.410605131648E-13 0.000000000000E+00\n" +
			strings.Repeat(orbit, 7), []string{"x:3:", "out of range"}},
		{"v2 bad prn", hdr2 + "xx 21  4 28 17 59 44.0\n", []string{"x:3:", "bad satellite number"}},
		{"no end of header", "     3.04           NAVIGATION DATA     M                   RINEX VERSION / TYPE\n", []string{"x:1:", "END OF HEADER"}},
		{"not rinex", "hello\n", []string{"x:1:", "RINEX VERSION / TYPE"}},
		{"empty", "", []string{"x:1:", "empty file"}},
	} {
		_, err := ReadNavFrom(strings.NewReader(c.data), "x")
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", c.name, err, w)
			}
		}
	}
	sp3hdr := "#dP2021  4 28  0  0  0.00000000       1 ORBIT IGb14 FIT AIUB\n## 2155 259200.00000000   300.00000000 59332 0.0000000000000\n" +
		"+    1   G01  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0\n"
	for _, c := range []struct {
		name, data string
		want       []string
	}{
		{"P before epoch", sp3hdr + "PG01  13287.682546 -15491.926575  16545.690647    703.963460\nEOF\n", []string{"y:4:", "unexpected header line", "want %c, %f, %i, /* or an epoch line"}},
		{"unknown satellite", sp3hdr + "*  2021  4 28 18  0  0.00000000\nPG02  13287.682546 -15491.926575  16545.690647    703.963460\nEOF\n", []string{"y:5:", `"G02" is not in the header`}},
		{"epochs not increasing", sp3hdr + "*  2021  4 28 18  0  0.00000000\n*  2021  4 28 17  0  0.00000000\nEOF\n", []string{"y:5:", "not after the previous epoch"}},
		{"bad epoch", sp3hdr + "*  2021 14 28 18  0  0.00000000\nEOF\n", []string{"y:4:", "out of range"}},
		{"short P line", sp3hdr + "*  2021  4 28 18  0  0.00000000\nPG01  13287.682546\nEOF\n", []string{"y:5:", "bad number"}},
	} {
		_, err := ReadSP3(strings.NewReader(c.data), "y")
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", c.name, err, w)
			}
		}
	}
}

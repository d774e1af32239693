package orbits

import (
	"fmt"
	"testing"
	"time"
)

func TestWeekSOWFromSP3Headers(t *testing.T) {
	// The "##" header lines of the extdata SP3 files state GPS week, seconds
	// of week and MJD of their start epoch [data]:
	for _, c := range []struct {
		y, m, d  int
		week     int
		sow      float64
		mjd      int
		fileNote string
	}{
		{2021, 4, 28, 2155, 259200, 59332, "set A COD0MGXFIN_20211180000_01D_05M_ORB.SP3 line 2"},
		{2020, 6, 25, 2111, 345600, 59025, "set C GRG0MGXFIN_20201770000_01D_15M_ORB.SP3 line 2"},
		{2023, 3, 14, 2253, 172800, 60017, "set B COD0OPSRAP_20230730000_01D_05M_ORB.SP3 line 2"},
	} {
		tm := FromCalendar(c.y, c.m, c.d, 0, 0, 0)
		w, s := tm.WeekSOW()
		mjd, frac := tm.MJD()
		if w != c.week || s != c.sow || mjd != c.mjd || frac != 0 {
			t.Errorf("%s: got week %d sow %g s mjd %d+%g, want %d %g s %d", c.fileNote, w, s, mjd, frac, c.week, c.sow, c.mjd)
		}
		if got := FromWeekSOW(c.week, c.sow); got != tm {
			t.Errorf("%s: FromWeekSOW = %v, want %v", c.fileNote, got, tm)
		}
	}
}

func TestLeapSeconds(t *testing.T) {
	// GPST − UTC = 18 s: "LEAP SECONDS 18" in the header of brdc1180.21n
	// (2021) and of the set C 3.05 nav file [data]; 0 at the GPS epoch and
	// 13 s in 2000 (IERS Bulletin C history, from memory).
	for _, c := range []struct {
		tm   Time
		want int
	}{
		{FromCalendar(2021, 4, 28, 18, 0, 0), 18},
		{FromCalendar(2020, 6, 25, 0, 0, 0), 18},
		{FromCalendar(1980, 1, 6, 0, 0, 0), 0},
		{FromCalendar(2000, 1, 1, 0, 0, 0), 13},
	} {
		if got := LeapSeconds(c.tm); got != c.want {
			t.Errorf("LeapSeconds(%v) = %d, want %d", c.tm, got, c.want)
		}
	}
	// The leap second at the end of 2016 (IERS Bulletin C 52, from memory):
	// 23:59:59 UTC to 00:00:00 UTC lasts 2 s of GPS time.
	if d := FromUTC(2017, 1, 1, 0, 0, 0).Sub(FromUTC(2016, 12, 31, 23, 59, 59)); d != 2 {
		t.Errorf("2016-12-31 leap second: elapsed %g s, want 2 s", d)
	}
	if d := FromUTC(2016, 12, 31, 23, 59, 59).Sub(FromUTC(2016, 12, 31, 23, 59, 58)); d != 1 {
		t.Errorf("ordinary second: elapsed %g s, want 1 s", d)
	}
}

func TestTimeScales(t *testing.T) {
	// BDT week 0 began 2006-01-01T00:00:00 UTC, i.e. GPS week 1356 + 14 s
	// (BDS-SIS-ICD-B1I §5.1.2, from memory; ../shared/reference/gnss.md §1.2).
	if got, want := FromBDT(0, 0), FromUTC(2006, 1, 1, 0, 0, 0); got != want {
		t.Errorf("BDT week 0 = %v, want %v", got, want)
	}
	if w, s := FromCalendar(2006, 1, 1, 0, 0, 0).WeekSOW(); w != 1356 || s != 0 {
		t.Errorf("2006-01-01 GPS = week %d sow %g, want 1356 0", w, s)
	}
	bw, bs := FromCalendar(2021, 4, 28, 18, 0, 0).BDTWeekSOW()
	if bw != 2155-1356 || bs != 259200+18*3600-14 {
		t.Errorf("BDT week/sow = %d %g", bw, bs)
	}
	// GST week 0 starts 1999-08-22 (GPS week 1024; Galileo OS SIS ICD §5.1.2, from memory).
	if got := FromGST(0, 0); got != FromCalendar(1999, 8, 22, 0, 0, 0) {
		t.Errorf("GST week 0 = %v", got)
	}
	// GLONASS time is UTC(SU) + 3 h: 03:00 Moscow on 2021-04-29 is midnight UTC.
	if got, want := FromGLONASS(2021, 4, 29, 3, 0, 0), FromUTC(2021, 4, 29, 0, 0, 0); got != want {
		t.Errorf("GLONASS: %v, want %v", got, want)
	}
	y, mo, d, h, mi, s := FromUTC(2021, 4, 29, 0, 0, 0).GLONASS()
	if y != 2021 || mo != 4 || d != 29 || h != 3 || mi != 0 || s != 0 {
		t.Errorf("GLONASS calendar: %d-%d-%d %d:%d:%g", y, mo, d, h, mi, s)
	}
	// Go's time package (Unix time, which has no leap seconds) as an outside check of the calendar.
	g := time.Date(2024, 2, 29, 13, 14, 15, 123456789, time.UTC)
	if back := FromGoTime(g).GoUTC(); !back.Equal(g) {
		t.Errorf("Go time round trip: %v → %v", g, back)
	}
	if got := FromGoTime(g).Sub(FromUTC(2024, 2, 29, 13, 14, 15)); got != 0.123456789 {
		t.Errorf("sub-second: %g", got)
	}
}

func TestCalendarRoundTrip(t *testing.T) {
	// Days-from-civil checked against Go's time package over 1900–2150.
	for day := int64(-29000); day < 62000; day += 37 {
		tm := Time(day*nsPerDay + 3723*nsPerSecond)
		y, mo, d, h, mi, s := tm.Calendar()
		ref := time.Date(1980, 1, 6+int(day), 1, 2, 3, 0, time.UTC)
		if y != ref.Year() || mo != int(ref.Month()) || d != ref.Day() || h != 1 || mi != 2 || s != 3 {
			t.Fatalf("day %d: got %04d-%02d-%02d, Go says %v", day, y, mo, d, ref)
		}
		if back := FromCalendar(y, mo, d, h, mi, s); back != tm {
			t.Fatalf("round trip %v → %v", tm, back)
		}
	}
}

func TestParseTime(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Time
	}{
		{"2021-04-28T18:00:00", FromCalendar(2021, 4, 28, 18, 0, 0)},
		{"2021-04-28 18:00:00", FromCalendar(2021, 4, 28, 18, 0, 0)},
		{"2021-04-28T18:00", FromCalendar(2021, 4, 28, 18, 0, 0)},
		{"2021-04-28", FromCalendar(2021, 4, 28, 0, 0, 0)},
		{"2021-04-28T18:00:00.000000001", FromCalendar(2021, 4, 28, 18, 0, 0) + 1},
		{"1979-12-31T23:59:59.5", FromCalendar(1979, 12, 31, 23, 59, 59.5)},
	} {
		got, err := ParseTime(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseTime(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
		if back, err := ParseTime(got.String()); err != nil || back != got {
			t.Errorf("String round trip of %q: %q → %v %v", c.in, got.String(), back, err)
		}
	}
	for _, bad := range []string{"", "2021-4-28", "2021-02-30T00:00:00", "2021-04-28T24:00:00", "2021-04-28T18:00:00Z",
		"2021-04-28T18:00:60", "2021-04-28T18:00:00.", "2021-04-28T18:00:00.1234567890", "abcd-ef-gh", "2021-04-28T1:00:00"} {
		if _, err := ParseTime(bad); err == nil {
			t.Errorf("ParseTime(%q) accepted", bad)
		}
	}
}

func ExampleTime_WeekSOW() {
	t, _ := ParseTime("2021-04-28T18:00:00")
	w, s := t.WeekSOW()
	fmt.Println(t, "GPS week", w, "sow", s, "s; GPST-UTC", LeapSeconds(t), "s")
	// Output: 2021-04-28T18:00:00 GPS week 2155 sow 324000 s; GPST-UTC 18 s
}

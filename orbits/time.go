package orbits

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// Time is an epoch on GPS time: the integer number of nanoseconds since the
// GPS epoch 1980-01-06T00:00:00 GPST. GPS time has no leap seconds, so
// differences of Time values are exact elapsed times. The range is ±292
// years around 1980.
type Time int64

// Durations and fixed offsets between time scales.
const (
	nsPerSecond = int64(1_000_000_000)
	nsPerDay    = 86400 * nsPerSecond
	nsPerWeek   = 7 * nsPerDay

	// SecondsPerWeek is the length of a GPS week in seconds.
	SecondsPerWeek = 604800.0

	// gpsEpochUnixDays is 1980-01-06 counted in days from 1970-01-01.
	gpsEpochUnixDays = 3657
	// gpsEpochMJD is the Modified Julian Date of 1980-01-06 (common practice).
	gpsEpochMJD = 44244

	// BDTOffset is GPST − BDT in seconds: BeiDou time started on
	// 2006-01-01T00:00:00 UTC, when GPST − UTC was 14 s, so BDT = GPST − 14 s
	// (BDS-SIS-ICD-B1I §5.1.2, from memory; ../shared/reference/gnss.md §1.2).
	BDTOffset = 14.0
	// BDTWeekOffset is the GPS week number of BDT week 0 (same source).
	BDTWeekOffset = 1356
	// GSTWeekOffset is the GPS week number of Galileo System Time week 0
	// (GST started 1999-08-22T00:00:00 UTC minus 13 s, aligned with GPST
	// within tens of ns; Galileo OS SIS ICD §5.1.2, from memory).
	GSTWeekOffset = 1024
	// GLONASSOffset is GLONASS time − UTC in seconds (UTC(SU) + 3 h;
	// GLONASS ICD Ed. 5.1 §3.3.3, from memory).
	GLONASSOffset = 3 * 3600.0
	// TTMinusGPS is TT − GPST in seconds: TT = TAI + 32.184 s and
	// TAI = GPST + 19 s (IERS Conventions 2010 ch. 10, from memory).
	TTMinusGPS = 51.184
)

// leapTable lists, for each leap second since the GPS epoch, the UTC date
// (00:00:00) from which GPST − UTC takes the value n. Source: IERS Bulletin C
// history of TAI − UTC (from memory), with GPST − UTC = TAI − UTC − 19 s; the
// 2017 value 18 s matches the LEAP SECONDS header of the extdata nav files
// (tested).
var leapTable = [...]struct {
	y, m, d int
	n       int
}{
	{1981, 7, 1, 1}, {1982, 7, 1, 2}, {1983, 7, 1, 3}, {1985, 7, 1, 4},
	{1988, 1, 1, 5}, {1990, 1, 1, 6}, {1991, 1, 1, 7}, {1992, 7, 1, 8},
	{1993, 7, 1, 9}, {1994, 7, 1, 10}, {1996, 1, 1, 11}, {1997, 7, 1, 12},
	{1999, 1, 1, 13}, {2006, 1, 1, 14}, {2009, 1, 1, 15}, {2012, 7, 1, 16},
	{2015, 7, 1, 17}, {2017, 1, 1, 18},
}

// floorDiv returns ⌊a/b⌋ for b > 0.
func floorDiv(a, b int64) int64 {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// daysFromCivil returns the number of days from 1970-01-01 to the given
// proleptic Gregorian date. Months outside 1..12 and days outside the month
// are normalised arithmetically.
func daysFromCivil(y, m, d int) int64 {
	// Normalise the month first.
	y64 := int64(y) + floorDiv(int64(m-1), 12)
	m64 := int64(m-1) - 12*floorDiv(int64(m-1), 12) + 1
	if m64 <= 2 {
		y64--
	}
	era := floorDiv(y64, 400)
	yoe := y64 - era*400
	mp := (m64 + 9) % 12
	doy := (153*mp+2)/5 + int64(d) - 1
	doe := yoe*365 + yoe/4 - yoe/100 + doy
	return era*146097 + doe - 719468
}

// civilFromDays is the inverse of daysFromCivil.
func civilFromDays(z int64) (y, m, d int) {
	z += 719468
	era := floorDiv(z, 146097)
	doe := z - era*146097
	yoe := (doe - doe/1460 + doe/36524 - doe/146096) / 365
	yy := yoe + era*400
	doy := doe - (365*yoe + yoe/4 - yoe/100)
	mp := (5*doy + 2) / 153
	dd := doy - (153*mp+2)/5 + 1
	mm := mp + 3
	if mm > 12 {
		mm -= 12
	}
	if mm <= 2 {
		yy++
	}
	return int(yy), int(mm), int(dd)
}

// secondsToNs converts float64 seconds to integer nanoseconds, rounding to
// the nearest nanosecond.
func secondsToNs(s float64) int64 { return int64(math.Round(s * 1e9)) }

// calendarCount returns the nanosecond count of a calendar date on a scale
// whose origin is 1980-01-06T00:00:00 of the same scale.
func calendarCount(y, mo, d, h, mi int, sec float64) int64 {
	days := daysFromCivil(y, mo, d) - gpsEpochUnixDays
	return days*nsPerDay + int64(h)*3600*nsPerSecond + int64(mi)*60*nsPerSecond + secondsToNs(sec)
}

// countCalendar splits a count from calendarCount back into a calendar date.
func countCalendar(c int64) (y, mo, d, h, mi int, sec float64) {
	days := floorDiv(c, nsPerDay)
	rem := c - days*nsPerDay
	y, mo, d = civilFromDays(days + gpsEpochUnixDays)
	h = int(rem / (3600 * nsPerSecond))
	rem -= int64(h) * 3600 * nsPerSecond
	mi = int(rem / (60 * nsPerSecond))
	rem -= int64(mi) * 60 * nsPerSecond
	sec = float64(rem) / 1e9
	return
}

// FromCalendar returns the epoch of a calendar date and time read on the GPS
// time scale (sec in seconds, rounded to the nanosecond). Out-of-range
// fields are normalised (e.g. hour 24 is midnight of the next day).
func FromCalendar(y, mo, d, h, mi int, sec float64) Time {
	return Time(calendarCount(y, mo, d, h, mi, sec))
}

// Calendar returns the GPS-time calendar date of t (sec in seconds).
func (t Time) Calendar() (y, mo, d, h, mi int, sec float64) {
	return countCalendar(int64(t))
}

// FromWeekSOW returns the epoch of GPS week week and seconds of week sow.
// The week is the continuous count (not modulo 1024).
func FromWeekSOW(week int, sow float64) Time {
	return Time(int64(week)*nsPerWeek + secondsToNs(sow))
}

// WeekSOW returns the continuous GPS week and the seconds of week of t.
func (t Time) WeekSOW() (week int, sow float64) {
	w := floorDiv(int64(t), nsPerWeek)
	return int(w), float64(int64(t)-w*nsPerWeek) / 1e9
}

// Add returns t shifted by the given number of seconds (rounded to the
// nanosecond).
func (t Time) Add(seconds float64) Time { return t + Time(secondsToNs(seconds)) }

// Sub returns t − u in seconds.
func (t Time) Sub(u Time) float64 { return float64(int64(t)-int64(u)) / 1e9 }

// Seconds returns t as float64 seconds since the GPS epoch. It is meant only
// for display and coarse work: its ULP near 2026 is 2.4e-7 s.
func (t Time) Seconds() float64 { return float64(t) / 1e9 }

// String formats t as ISO 8601 on GPS time, e.g. "2021-04-28T18:00:00", with
// a fractional part only when t is not on a whole second.
func (t Time) String() string {
	y, mo, d, h, mi, _ := t.Calendar()
	ns := int64(t) - floorDiv(int64(t), nsPerSecond)*nsPerSecond
	s := int((int64(t) - floorDiv(int64(t), 60*nsPerSecond)*60*nsPerSecond) / nsPerSecond)
	out := fmt.Sprintf("%04d-%02d-%02dT%02d:%02d:%02d", y, mo, d, h, mi, s)
	if ns != 0 {
		frac := strings.TrimRight(fmt.Sprintf("%09d", ns), "0")
		out += "." + frac
	}
	return out
}

// ParseTime reads an ISO 8601 epoch interpreted on GPS time. Accepted forms:
// "2021-04-28", "2021-04-28T18:00", "2021-04-28T18:00:00" and
// "2021-04-28T18:00:00.123456789" (a space may replace the "T"; a trailing
// "Z" or zone offset is rejected because the scale is GPS, not UTC).
func ParseTime(s string) (Time, error) {
	orig := s
	bad := func(why string) (Time, error) {
		return 0, fmt.Errorf("orbits: bad epoch %q (want YYYY-MM-DDThh:mm:ss on GPS time): %s", orig, why)
	}
	s = strings.TrimSpace(s)
	datePart, clock, hasClock := strings.Cut(s, "T")
	if !hasClock {
		datePart, clock, hasClock = strings.Cut(s, " ")
	}
	dp := strings.Split(datePart, "-")
	if len(dp) != 3 || len(dp[0]) != 4 || len(dp[1]) != 2 || len(dp[2]) != 2 {
		return bad("date must be YYYY-MM-DD")
	}
	num := func(f string) (int, bool) {
		for _, c := range f {
			if c < '0' || c > '9' {
				return 0, false
			}
		}
		v, err := strconv.Atoi(f)
		return v, err == nil
	}
	y, ok1 := num(dp[0])
	mo, ok2 := num(dp[1])
	d, ok3 := num(dp[2])
	if !ok1 || !ok2 || !ok3 {
		return bad("non-digit in date")
	}
	if mo < 1 || mo > 12 || d < 1 || d > daysInMonth(y, mo) {
		return bad("date out of range")
	}
	var h, mi int
	var ns int64
	if hasClock {
		cp := strings.Split(clock, ":")
		if len(cp) < 2 || len(cp) > 3 || len(cp[0]) != 2 || len(cp[1]) != 2 {
			return bad("time must be hh:mm[:ss[.fff]]")
		}
		var ok bool
		if h, ok = num(cp[0]); !ok || h > 23 {
			return bad("hour out of range")
		}
		if mi, ok = num(cp[1]); !ok || mi > 59 {
			return bad("minute out of range")
		}
		if len(cp) == 3 {
			whole, frac, hasFrac := strings.Cut(cp[2], ".")
			sec, ok := num(whole)
			if !ok || len(whole) != 2 || sec > 59 {
				return bad("second out of range")
			}
			ns = int64(sec) * nsPerSecond
			if hasFrac {
				if len(frac) == 0 || len(frac) > 9 {
					return bad("fraction must have 1 to 9 digits")
				}
				fv, ok := num(frac)
				if !ok {
					return bad("non-digit in fraction")
				}
				for i := len(frac); i < 9; i++ {
					fv *= 10
				}
				ns += int64(fv)
			}
		}
	}
	days := daysFromCivil(y, mo, d) - gpsEpochUnixDays
	return Time(days*nsPerDay + int64(h)*3600*nsPerSecond + int64(mi)*60*nsPerSecond + ns), nil
}

func daysInMonth(y, m int) int {
	return int(daysFromCivil(y, m+1, 1) - daysFromCivil(y, m, 1))
}

// LeapSeconds returns GPST − UTC in whole seconds at GPS epoch t (0 before
// 1981-07-01, 18 from 2017-01-01 on; table from IERS Bulletin C, from memory).
func LeapSeconds(t Time) int {
	n := 0
	for _, e := range leapTable {
		// The GPS time of the UTC instant y-m-d 00:00:00 is UTC + n.
		if int64(t) >= calendarCount(e.y, e.m, e.d, 0, 0, 0)+int64(e.n)*nsPerSecond {
			n = e.n
		} else {
			break
		}
	}
	return n
}

// leapAtUTC returns GPST − UTC for an epoch counted on the UTC scale.
func leapAtUTC(u int64) int {
	n := 0
	for _, e := range leapTable {
		if u >= calendarCount(e.y, e.m, e.d, 0, 0, 0) {
			n = e.n
		} else {
			break
		}
	}
	return n
}

// FromUTC returns the GPS epoch of a UTC calendar date and time.
func FromUTC(y, mo, d, h, mi int, sec float64) Time {
	u := calendarCount(y, mo, d, h, mi, sec)
	return Time(u + int64(leapAtUTC(u))*nsPerSecond)
}

// UTC returns the UTC calendar date of t. A leap second itself (23:59:60)
// cannot be represented and reads as 00:00:00 of the next day.
func (t Time) UTC() (y, mo, d, h, mi int, sec float64) {
	return countCalendar(int64(t) - int64(LeapSeconds(t))*nsPerSecond)
}

// FromGoTime converts a Go time.Time (read as UTC) to a GPS epoch.
func FromGoTime(g time.Time) Time {
	g = g.UTC()
	return FromUTC(g.Year(), int(g.Month()), g.Day(), g.Hour(), g.Minute(), float64(g.Second())+float64(g.Nanosecond())/1e9)
}

// GoUTC returns t as a Go time.Time in UTC.
func (t Time) GoUTC() time.Time {
	u := int64(t) - int64(LeapSeconds(t))*nsPerSecond
	days := floorDiv(u, nsPerDay)
	return time.Unix((days+gpsEpochUnixDays)*86400, u-days*nsPerDay).UTC()
}

// FromBDT returns the GPS epoch of BeiDou time week (BDT week count, 0 at
// 2006-01-01) and seconds of week sow. BDT = GPST − 14 s.
func FromBDT(week int, sow float64) Time {
	return FromWeekSOW(week+BDTWeekOffset, sow).Add(BDTOffset)
}

// BDTWeekSOW returns the BeiDou week and seconds of week of t.
func (t Time) BDTWeekSOW() (week int, sow float64) {
	w, s := t.Add(-BDTOffset).WeekSOW()
	return w - BDTWeekOffset, s
}

// FromBDTCalendar returns the GPS epoch of a calendar date read on BDT.
func FromBDTCalendar(y, mo, d, h, mi int, sec float64) Time {
	return FromCalendar(y, mo, d, h, mi, sec).Add(BDTOffset)
}

// FromGST returns the GPS epoch of Galileo System Time week (GST week count,
// 0 at 1999-08-22) and seconds of week sow. GST is taken equal to GPST; the
// broadcast GGTO (a few ns) is not applied.
func FromGST(week int, sow float64) Time {
	return FromWeekSOW(week+GSTWeekOffset, sow)
}

// GSTWeekSOW returns the Galileo week and seconds of week of t.
func (t Time) GSTWeekSOW() (week int, sow float64) {
	w, s := t.WeekSOW()
	return w - GSTWeekOffset, s
}

// FromGLONASS returns the GPS epoch of a calendar date read on GLONASS time
// (UTC(SU) + 3 h; UTC(SU) is taken equal to UTC).
func FromGLONASS(y, mo, d, h, mi int, sec float64) Time {
	return FromUTC(y, mo, d, h, mi, sec-GLONASSOffset)
}

// GLONASS returns the calendar date of t on GLONASS time.
func (t Time) GLONASS() (y, mo, d, h, mi int, sec float64) {
	u := int64(t) - int64(LeapSeconds(t))*nsPerSecond + int64(GLONASSOffset)*nsPerSecond
	return countCalendar(u)
}

// MJD returns the Modified Julian Date of t on GPS time split into an integer
// day and the fraction of day in [0, 1).
func (t Time) MJD() (day int, frac float64) {
	d := floorDiv(int64(t), nsPerDay)
	return int(d) + gpsEpochMJD, float64(int64(t)-d*nsPerDay) / float64(nsPerDay)
}

// j2000Offset returns (t + shift seconds) − J2000.0 (2000-01-01T12:00:00 of
// the same scale) split into whole days and a day fraction, keeping full
// nanosecond precision. shiftNs is the offset from GPST to the wanted scale.
func (t Time) j2000Offset(shiftNs int64) (days float64, frac float64) {
	const j2000 = int64(7300)*nsPerDay + 12*3600*nsPerSecond // 2000-01-01T12 − 1980-01-06
	c := int64(t) + shiftNs - j2000
	d := floorDiv(c, nsPerDay)
	return float64(d), float64(c-d*nsPerDay) / float64(nsPerDay)
}

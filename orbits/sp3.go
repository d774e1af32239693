package orbits

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"wallcross/internal/atomicfile"
)

// SP3 holds a precise-orbit file in the Extended Standard Product 3 format
// (S. Hilla, "The Extended Standard Product 3 Orbit Format (SP3-c)", 2007;
// Hilla 2016, SP3-d). Positions are stored in metres and clocks in seconds;
// the file carries km and µs.
type SP3 struct {
	Version    byte   // 'c' or 'd'
	Mode       byte   // 'P' (positions) or 'V' (positions and velocities)
	Start      Time   // header start epoch (GPS time)
	NumEpochs  int    // epoch count stated in the header (not enforced: subsets exist)
	DataUsed   string // e.g. "ORBIT", "d+D"
	CoordSys   string // e.g. "IGb14", "IGS20"
	OrbitType  string // e.g. "FIT", "BCT"
	Agency     string // e.g. "AIUB"
	Interval   float64
	FileType   string // "G", "M", "R", "E", "C", "J"
	TimeSystem string // "GPS" (other systems are converted to GPS time on reading)
	BasePos    float64
	BaseClk    float64
	Comments   []string // comment text without the leading "/* "
	Sats       []SatID
	Accuracy   []int // accuracy exponent per satellite
	Epochs     []Time
	Data       [][]SP3Entry // Data[epoch][satellite index]
}

// SP3Entry is one satellite at one epoch.
type SP3Entry struct {
	Pos       [3]float64 // Earth-fixed position, m (valid when HasPos)
	Clock     float64    // clock bias, s (valid when HasClock)
	Vel       [3]float64 // velocity, m/s (valid when HasVel)
	ClockRate float64    // clock rate, s/s (valid when HasVel and HasClockRate)
	HasPos    bool
	HasClock  bool
	HasVel    bool
	HasRate   bool
}

// SatIndex returns the index of sat in s.Sats, or −1.
func (s *SP3) SatIndex(sat SatID) int {
	for i, x := range s.Sats {
		if x == sat {
			return i
		}
	}
	return -1
}

// OpenFile opens path for reading, transparently decompressing it when it
// starts with the gzip magic bytes.
func OpenFile(path string) (io.ReadCloser, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("orbits: could not open: %w", err)
	}
	br := bufio.NewReader(f)
	magic, _ := br.Peek(2)
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			f.Close()
			return nil, fmt.Errorf("orbits: %s: could not open gzip stream: %w", path, err)
		}
		return struct {
			io.Reader
			io.Closer
		}{zr, f}, nil
	}
	return struct {
		io.Reader
		io.Closer
	}{br, f}, nil
}

// maybeGunzip returns a reader that decompresses r when it starts with the
// gzip magic bytes.
func maybeGunzip(r io.Reader, name string) (io.Reader, error) {
	br := bufio.NewReader(r)
	magic, _ := br.Peek(2)
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("orbits: %s: could not open gzip stream: %w", name, err)
		}
		return zr, nil
	}
	return br, nil
}

// ReadSP3File reads an SP3 file, gzip-compressed or not.
func ReadSP3File(path string) (*SP3, error) {
	rc, err := OpenFile(path)
	if err != nil {
		return nil, err
	}
	defer rc.Close()
	return ReadSP3(rc, path)
}

// col returns the 1-based columns a..b of line (inclusive), padded with
// blanks when the line is short.
func col(line string, a, b int) string {
	if a > len(line) {
		return ""
	}
	if b > len(line) {
		b = len(line)
	}
	return line[a-1 : b]
}

type lineErr struct {
	name string
	line int
}

func (l lineErr) errorf(format string, a ...any) error {
	return fmt.Errorf("orbits: %s:%d: %s", l.name, l.line, fmt.Sprintf(format, a...))
}

func parseIntField(s string) (int, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, fmt.Errorf("empty")
	}
	return strconv.Atoi(s)
}

func parseFloatField(s string) (float64, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, fmt.Errorf("empty")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not finite")
	}
	return v, nil
}

// parseEpochFields reads "yyyy mm dd hh mi ss.ssssssss" at the SP3 columns
// 4..31 and returns the count on the file's own time scale.
func parseSP3Epoch(line string, le lineErr) (int64, error) {
	var v [5]int
	cols := [5][2]int{{4, 7}, {9, 10}, {12, 13}, {15, 16}, {18, 19}}
	for i, c := range cols {
		n, err := parseIntField(col(line, c[0], c[1]))
		if err != nil {
			return 0, le.errorf("bad epoch field at columns %d-%d %q (want an integer)", c[0], c[1], col(line, c[0], c[1]))
		}
		v[i] = n
	}
	sec, err := parseFloatField(col(line, 21, 31))
	if err != nil {
		return 0, le.errorf("bad epoch seconds at columns 21-31 %q", col(line, 21, 31))
	}
	if v[0] < 1900 || v[0] > 2200 || v[1] < 1 || v[1] > 12 || v[2] < 1 || v[2] > 31 || v[3] > 24 || v[4] > 60 || sec < 0 || sec > 61 || v[3] < 0 || v[4] < 0 {
		return 0, le.errorf("epoch %q out of range", strings.TrimSpace(col(line, 4, 31)))
	}
	return calendarCount(v[0], v[1], v[2], v[3], v[4], sec), nil
}

// ReadSP3 reads an SP3-c or SP3-d file, plain or gzip-compressed; name is
// used in error messages. Epochs on GLO/UTC, BDT or TAI time systems are
// converted to GPS time.
func ReadSP3(in io.Reader, name string) (*SP3, error) {
	r, err := maybeGunzip(in, name)
	if err != nil {
		return nil, err
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 256), 1<<20)
	s := &SP3{}
	le := lineErr{name: name}
	next := func() (string, bool) {
		if !sc.Scan() {
			return "", false
		}
		le.line++
		return strings.TrimRight(sc.Text(), "\r"), true
	}
	line, ok := next()
	if !ok {
		if err := sc.Err(); err != nil {
			return nil, fmt.Errorf("orbits: %s: could not read: %w", name, err)
		}
		return nil, le.errorf("empty file (want an SP3 header line starting with #c or #d)")
	}
	if len(line) < 3 || line[0] != '#' || (line[1] != 'c' && line[1] != 'd') {
		return nil, le.errorf("unknown SP3 version %q (want #c or #d)", col(line, 1, 2))
	}
	s.Version = line[1]
	s.Mode = line[2]
	if s.Mode != 'P' && s.Mode != 'V' {
		return nil, le.errorf("bad position/velocity flag %q in column 3 (want P or V)", string(s.Mode))
	}
	start, err := parseSP3Epoch(line, le)
	if err != nil {
		return nil, err
	}
	if n, err := parseIntField(col(line, 33, 39)); err == nil {
		s.NumEpochs = n
	} else {
		return nil, le.errorf("bad number of epochs at columns 33-39 %q", col(line, 33, 39))
	}
	s.DataUsed = strings.TrimSpace(col(line, 41, 45))
	s.CoordSys = strings.TrimSpace(col(line, 47, 51))
	s.OrbitType = strings.TrimSpace(col(line, 53, 55))
	s.Agency = strings.TrimSpace(col(line, 57, 60))

	line, ok = next()
	if !ok || !strings.HasPrefix(line, "##") {
		return nil, le.errorf("missing second header line (want ##)")
	}
	if s.Interval, err = parseFloatField(col(line, 25, 38)); err != nil || s.Interval < 0 {
		return nil, le.errorf("bad epoch interval at columns 25-38 %q", col(line, 25, 38))
	}

	// Satellite list and accuracy lines.
	nsat := -1
	var accs []int
	var pending string
	for {
		line, ok = next()
		if !ok {
			return nil, le.errorf("file ends inside the header")
		}
		if strings.HasPrefix(line, "++") {
			for k := range 17 {
				f := strings.TrimSpace(col(line, 10+3*k, 12+3*k))
				if f == "" {
					continue
				}
				n, err := strconv.Atoi(f)
				if err != nil {
					return nil, le.errorf("bad accuracy exponent %q at columns %d-%d", f, 10+3*k, 12+3*k)
				}
				accs = append(accs, n)
			}
			continue
		}
		if strings.HasPrefix(line, "+") {
			if nsat < 0 {
				n, err := parseIntField(col(line, 3, 6))
				if err != nil || n < 0 || n > 999 {
					return nil, le.errorf("bad number of satellites at columns 4-6 %q", col(line, 3, 6))
				}
				nsat = n
			}
			for k := range 17 {
				f := col(line, 10+3*k, 12+3*k)
				ft := strings.TrimSpace(f)
				if ft == "" || ft == "0" || ft == "00" || ft == "000" {
					continue
				}
				id := strings.ReplaceAll(f, " ", "0")
				if len(id) != 3 {
					return nil, le.errorf("bad satellite id %q at columns %d-%d", f, 10+3*k, 12+3*k)
				}
				if id[0] >= '0' && id[0] <= '9' { // SP3-a style "  1" = GPS
					id = "G" + id[1:]
				}
				s.Sats = append(s.Sats, SatID(id))
			}
			continue
		}
		pending = line
		break
	}
	if nsat < 0 {
		return nil, le.errorf("missing satellite list (+ lines)")
	}
	if len(s.Sats) != nsat {
		return nil, le.errorf("header announces %d satellites but the + lines list %d", nsat, len(s.Sats))
	}
	seen := map[SatID]bool{}
	for _, id := range s.Sats {
		if seen[id] {
			return nil, le.errorf("satellite %s listed twice in the header", id)
		}
		seen[id] = true
	}
	s.Accuracy = make([]int, nsat)
	copy(s.Accuracy, accs)

	// %c, %f, %i and comment lines, up to the first epoch.
	nc, nf := 0, 0
	line = pending
	for {
		switch {
		case strings.HasPrefix(line, "%c"):
			if nc == 0 {
				s.FileType = strings.TrimSpace(col(line, 4, 5))
				s.TimeSystem = strings.TrimSpace(col(line, 10, 12))
			}
			nc++
		case strings.HasPrefix(line, "%f"):
			if nf == 0 {
				s.BasePos, _ = parseFloatField(col(line, 4, 13))
				s.BaseClk, _ = parseFloatField(col(line, 15, 26))
			}
			nf++
		case strings.HasPrefix(line, "%i"):
		case strings.HasPrefix(line, "/*"):
			s.Comments = append(s.Comments, strings.TrimRight(strings.TrimPrefix(strings.TrimPrefix(line, "/*"), " "), " "))
		case strings.HasPrefix(line, "* "), strings.HasPrefix(line, "EOF"):
			goto body
		case strings.TrimSpace(line) == "":
		default:
			return nil, le.errorf("unexpected header line %q (want %%c, %%f, %%i, /* or an epoch line *)", trunc(line))
		}
		line, ok = next()
		if !ok {
			return nil, le.errorf("file ends inside the header (no epoch lines and no EOF)")
		}
	}
body:
	shift, err := sp3TimeShift(s.TimeSystem, start)
	if err != nil {
		return nil, le.errorf("%v", err)
	}
	s.Start = Time(start + shift)
	if s.TimeSystem == "" || s.TimeSystem == "ccc" {
		s.TimeSystem = "GPS"
	}
	index := make(map[SatID]int, nsat)
	for i, id := range s.Sats {
		index[id] = i
	}
	sawEOF := false
	for {
		switch {
		case strings.HasPrefix(line, "EOF"):
			sawEOF = true
		case strings.HasPrefix(line, "* "):
			c, err := parseSP3Epoch(line, le)
			if err != nil {
				return nil, err
			}
			sh, _ := sp3TimeShift(s.TimeSystem, c)
			t := Time(c + sh)
			if n := len(s.Epochs); n > 0 && t <= s.Epochs[n-1] {
				return nil, le.errorf("epoch %v is not after the previous epoch %v", t, s.Epochs[n-1])
			}
			s.Epochs = append(s.Epochs, t)
			s.Data = append(s.Data, make([]SP3Entry, nsat))
		case strings.HasPrefix(line, "P"), strings.HasPrefix(line, "V"):
			if len(s.Epochs) == 0 {
				return nil, le.errorf("%c record before the first epoch line", line[0])
			}
			id := SatID(strings.ReplaceAll(col(line, 2, 4), " ", "0"))
			if len(id) == 3 && id[0] >= '0' && id[0] <= '9' {
				id = "G" + id[1:]
			}
			i, ok := index[id]
			if !ok {
				return nil, le.errorf("satellite %q is not in the header list", id)
			}
			var v [4]float64
			for k := range 4 {
				a := 5 + 14*k
				f, err := parseFloatField(col(line, a, a+13))
				if err != nil {
					return nil, le.errorf("bad number %q at columns %d-%d (want F14.6)", col(line, a, a+13), a, a+13)
				}
				v[k] = f
			}
			e := &s.Data[len(s.Epochs)-1][i]
			if line[0] == 'P' {
				if v[0] != 0 || v[1] != 0 || v[2] != 0 {
					e.Pos = [3]float64{v[0] * 1e3, v[1] * 1e3, v[2] * 1e3}
					e.HasPos = true
				}
				if math.Abs(v[3]) < 999999 {
					e.Clock = v[3] * 1e-6
					e.HasClock = true
				}
			} else {
				e.Vel = [3]float64{v[0] * 0.1, v[1] * 0.1, v[2] * 0.1}
				e.HasVel = true
				if math.Abs(v[3]) < 999999 {
					e.ClockRate = v[3] * 1e-10
					e.HasRate = true
				}
			}
		case strings.HasPrefix(line, "EP"), strings.HasPrefix(line, "EV"):
		case strings.TrimSpace(line) == "":
		default:
			return nil, le.errorf("unexpected line %q (want *, P, V, EP, EV or EOF)", trunc(line))
		}
		if sawEOF {
			break
		}
		line, ok = next()
		if !ok {
			break
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("orbits: %s:%d: could not read: %w", name, le.line, err)
	}
	if !sawEOF {
		return nil, le.errorf("file is truncated: no EOF line")
	}
	return s, nil
}

func trunc(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}

// sp3TimeShift returns the nanoseconds to add to a count on the given SP3
// time system to obtain GPS time.
func sp3TimeShift(ts string, c int64) (int64, error) {
	switch ts {
	case "", "GPS", "GAL", "QZS", "ccc", "IRN":
		return 0, nil
	case "BDT":
		return secondsToNs(BDTOffset), nil
	case "TAI":
		return -19 * nsPerSecond, nil
	case "UTC", "GLO":
		return int64(leapAtUTC(c)) * nsPerSecond, nil
	}
	return 0, fmt.Errorf("unknown SP3 time system %q", ts)
}

// WriteSP3 writes s as SP3-d (whatever s.Version says): positions in km and
// clocks in µs as F14.6, a missing clock as 999999.999999, a missing
// position as 0.000000, velocities (Mode 'V') in dm/s and 1e-4 µs/s, and a
// final EOF line. Epochs are written on GPS time.
func WriteSP3(w io.Writer, s *SP3) error {
	if len(s.Data) != len(s.Epochs) {
		return fmt.Errorf("orbits: sp3: %d data rows for %d epochs", len(s.Data), len(s.Epochs))
	}
	if len(s.Sats) > 999 {
		return fmt.Errorf("orbits: sp3: %d satellites exceed the SP3-d limit of 999", len(s.Sats))
	}
	for _, id := range s.Sats {
		if len(id) != 3 {
			return fmt.Errorf("orbits: sp3: satellite id %q is not 3 characters", id)
		}
	}
	if !(s.Interval >= 0 && s.Interval < 1e5) {
		return fmt.Errorf("orbits: sp3: epoch interval %g s does not fit F14.8", s.Interval)
	}
	mode := s.Mode
	if mode != 'V' {
		mode = 'P'
	}
	bw := bufio.NewWriter(w)
	start := s.Start
	if len(s.Epochs) > 0 && start == 0 {
		start = s.Epochs[0]
	}
	y, mo, d, h, mi, sec := start.Calendar()
	field := func(v string, n int) string {
		if v == "" {
			v = strings.Repeat(" ", n)
		}
		if len(v) > n {
			v = v[:n]
		}
		return fmt.Sprintf("%-*s", n, v)
	}
	nep := s.NumEpochs
	if nep == 0 {
		nep = len(s.Epochs)
	}
	fmt.Fprintf(bw, "#d%c%4d %2d %2d %2d %2d %11.8f %7d %s %s %s %s\n", mode, y, mo, d, h, mi, sec, nep,
		field(s.DataUsed, 5), field(s.CoordSys, 5), field(s.OrbitType, 3), strings.TrimRight(field(s.Agency, 4), " "))
	week, sow := start.WeekSOW()
	mjd, frac := start.MJD()
	fmt.Fprintf(bw, "## %4d %15.8f %14.8f %5d %15.13f\n", week, sow, s.Interval, mjd, frac)
	nlines := (len(s.Sats) + 16) / 17
	if nlines < 5 {
		nlines = 5
	}
	for l := range nlines {
		if l == 0 {
			fmt.Fprintf(bw, "+  %3d   ", len(s.Sats))
		} else {
			bw.WriteString("+        ")
		}
		for k := range 17 {
			if i := l*17 + k; i < len(s.Sats) {
				bw.WriteString(string(s.Sats[i]))
			} else {
				bw.WriteString("  0")
			}
		}
		bw.WriteByte('\n')
	}
	for l := range nlines {
		bw.WriteString("++       ")
		for k := range 17 {
			a := 0
			if i := l*17 + k; i < len(s.Sats) && i < len(s.Accuracy) {
				a = s.Accuracy[i]
			}
			fmt.Fprintf(bw, "%3d", a)
		}
		bw.WriteByte('\n')
	}
	ft := s.FileType
	if ft == "" {
		ft = sp3FileType(s.Sats)
	}
	fmt.Fprintf(bw, "%%c %-2s cc GPS ccc cccc cccc cccc cccc ccccc ccccc ccccc ccccc\n", field(ft, 2))
	bw.WriteString("%c cc cc ccc ccc cccc cccc cccc cccc ccccc ccccc ccccc ccccc\n")
	bp, bc := s.BasePos, s.BaseClk
	if bp == 0 && bc == 0 {
		bp, bc = 1.25, 1.025 // common practice (CODE/IGS files)
	}
	fmt.Fprintf(bw, "%%f %10.7f %12.9f  0.00000000000  0.000000000000000\n", bp, bc)
	bw.WriteString("%f  0.0000000  0.000000000  0.00000000000  0.000000000000000\n")
	bw.WriteString("%i    0    0    0    0      0      0      0      0         0\n")
	bw.WriteString("%i    0    0    0    0      0      0      0      0         0\n")
	comments := s.Comments
	for len(comments) < 4 {
		comments = append(comments, "")
	}
	for _, c := range comments {
		c = strings.Map(func(r rune) rune {
			if r < 32 || r > 126 {
				return ' '
			}
			return r
		}, c)
		if len(c) > 77 {
			c = c[:77]
		}
		fmt.Fprintf(bw, "/* %s\n", c)
	}
	for e, t := range s.Epochs {
		y, mo, d, h, mi, sec := t.Calendar()
		fmt.Fprintf(bw, "*  %4d %2d %2d %2d %2d %11.8f\n", y, mo, d, h, mi, sec)
		for i, id := range s.Sats {
			en := s.Data[e][i]
			var p [3]float64
			if en.HasPos {
				p = [3]float64{en.Pos[0] / 1e3, en.Pos[1] / 1e3, en.Pos[2] / 1e3}
			}
			clk := 999999.999999
			if en.HasClock {
				clk = en.Clock * 1e6
			}
			if err := checkF146(id, t, p[0], p[1], p[2], clk); err != nil {
				return err
			}
			fmt.Fprintf(bw, "P%s%14.6f%14.6f%14.6f%14.6f\n", id, p[0], p[1], p[2], clk)
			if mode == 'V' {
				var v [3]float64
				if en.HasVel {
					v = [3]float64{en.Vel[0] * 10, en.Vel[1] * 10, en.Vel[2] * 10}
				}
				rate := 999999.999999
				if en.HasRate {
					rate = en.ClockRate * 1e10
				}
				if err := checkF146(id, t, v[0], v[1], v[2], rate); err != nil {
					return err
				}
				fmt.Fprintf(bw, "V%s%14.6f%14.6f%14.6f%14.6f\n", id, v[0], v[1], v[2], rate)
			}
		}
	}
	bw.WriteString("EOF\n")
	return bw.Flush()
}

func checkF146(id SatID, t Time, v ...float64) error {
	for _, x := range v {
		// F14.6 holds 7 integer digits for positive and 6 for negative values.
		if math.IsNaN(x) || x >= 9999999.9999995 || x <= -999999.9999995 {
			return fmt.Errorf("orbits: sp3: %s at %v: value %g does not fit F14.6", id, t, x)
		}
	}
	return nil
}

func sp3FileType(sats []SatID) string {
	var sys byte
	for _, s := range sats {
		if sys == 0 {
			sys = s.System()
		} else if s.System() != sys {
			return "M"
		}
	}
	if sys == 0 {
		return "G"
	}
	return string(sys)
}

// WriteSP3File writes s to path atomically (temporary file + rename).
func WriteSP3File(path string, s *SP3) error {
	var buf bytes.Buffer
	if err := WriteSP3(&buf, s); err != nil {
		return err
	}
	return writeAtomic(path, buf.Bytes())
}

func writeAtomic(path string, data []byte) error {
	if _, err := atomicfile.WriteBytes(path, data); err != nil {
		return fmt.Errorf("orbits: %w", err)
	}
	return nil
}

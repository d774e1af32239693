package sim

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"time"

	"wallcross/orbits"
)

// RINEX clock layout, measured on the CODE files in ../shared/extdata
// (reference/gnss.md §2.3): in 3.04 the header label starts at column 66
// and names are 9 characters; in 2.00 (and 3.00–3.02, from memory) the label
// starts at column 61 and names are 4 characters.

// ClockRecord is one data record of a RINEX clock file.
type ClockRecord struct {
	Type  string      // record type: "AS" satellite, "AR" receiver, "CR", "DR", "MS"
	Name  string      // satellite ("G01") or station name, trimmed
	Epoch orbits.Time // epoch, calendar read on the file's time system
	N     int         // number of values, 1–6
	// Values holds bias (s), bias sigma (s), rate (s/s), rate sigma,
	// acceleration (1/s), acceleration sigma; only the first N are set.
	Values [6]float64
}

// RefClock is one clock of an ANALYSIS CLK REF header line.
type RefClock struct {
	Name       string  // clock name
	DOMES      string  // identifier, may be empty
	Constraint float64 // a-priori clock constraint, s
}

// RefBlock is one "# OF CLK REF" block: the reference clocks valid from
// Start to End (both zero when the header gives no epochs).
type RefBlock struct {
	Start, End orbits.Time
	Clocks     []RefClock
}

// SolnStation is one SOLN STA NAME / NUM header line.
type SolnStation struct {
	Name, DOMES string
	X, Y, Z     float64 // Earth-fixed position, m (the file holds mm)
}

// ClockFile is the content of a RINEX clock file.
type ClockFile struct {
	Version        float64  // format version, e.g. 3.04 or 2.00
	System         string   // satellite system letter of the first header line (may be "")
	TimeSystem     string   // TIME SYSTEM ID, e.g. "GPS" ("" when absent)
	LeapSeconds    int      // LEAP SECONDS (GNSS), s
	DataTypes      []string // # / TYPES OF DATA, e.g. ["AR", "AS"]
	AnalysisCenter string   // ANALYSIS CENTER, as written
	Comments       []string // COMMENT lines, trailing blanks removed
	Refs           []RefBlock
	Frame          string        // terrestrial reference frame of # OF SOLN STA / TRF
	Stations       []SolnStation // SOLN STA NAME / NUM
	PRNs           []string      // PRN LIST
	Records        []ClockRecord // data records in file order
}

// Reference returns the names of the reference clocks of the first block.
func (c *ClockFile) Reference() []string {
	if len(c.Refs) == 0 {
		return nil
	}
	var out []string
	for _, r := range c.Refs[0].Clocks {
		out = append(out, r.Name)
	}
	return out
}

// ReadRinexClock reads a RINEX clock file (3.04 or 2.00 layout, gzip
// optional).
func ReadRinexClock(path string) (*ClockFile, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("sim: could not read RINEX clock file: %w", err)
	}
	defer f.Close()
	return ParseRinexClock(f, path)
}

// maxLine bounds the length of a RINEX clock line accepted by the reader.
const maxLine = 4096

// ParseRinexClock reads a RINEX clock file from r; name is used in error
// messages (file:line). gzip input is detected by its magic bytes.
func ParseRinexClock(r io.Reader, name string) (*ClockFile, error) {
	br := bufio.NewReader(r)
	if magic, err := br.Peek(2); err == nil && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("sim: %s: could not open gzip stream: %w", name, err)
		}
		defer zr.Close()
		br = bufio.NewReader(zr)
	}
	sc := bufio.NewScanner(br)
	sc.Buffer(make([]byte, 0, 256), maxLine)
	p := &clkParser{name: name, sc: sc, cf: &ClockFile{}}
	if err := p.header(); err != nil {
		return nil, err
	}
	if err := p.records(); err != nil {
		return nil, err
	}
	return p.cf, nil
}

type clkParser struct {
	name  string
	sc    *bufio.Scanner
	line  int
	cf    *ClockFile
	lab   int // 0-based column where header labels start
	nameW int // width of the record name field
	names map[string]string
}

func (p *clkParser) errf(format string, a ...any) error {
	return fmt.Errorf("sim: %s:%d: %s", p.name, p.line, fmt.Sprintf(format, a...))
}

func (p *clkParser) next() (string, bool, error) {
	if !p.sc.Scan() {
		if err := p.sc.Err(); err != nil {
			if errors.Is(err, bufio.ErrTooLong) {
				return "", false, fmt.Errorf("sim: %s:%d: line longer than %d bytes", p.name, p.line+1, maxLine)
			}
			return "", false, fmt.Errorf("sim: %s:%d: %w", p.name, p.line+1, err)
		}
		return "", false, nil
	}
	p.line++
	return strings.TrimRight(p.sc.Text(), " \r"), true, nil
}

var clkLabels = map[string]bool{
	"RINEX VERSION / TYPE": true, "PGM / RUN BY / DATE": true, "COMMENT": true,
	"TIME SYSTEM ID": true, "LEAP SECONDS": true, "LEAP SECONDS GNSS": true,
	"SYS / PCVS APPLIED": true, "SYS / DCBS APPLIED": true, "# / TYPES OF DATA": true,
	"ANALYSIS CENTER": true, "# OF CLK REF": true, "ANALYSIS CLK REF": true,
	"# OF SOLN STA / TRF": true, "SOLN STA NAME / NUM": true, "# OF SOLN SATS": true,
	"PRN LIST": true, "END OF HEADER": true, "STATION NAME / NUM": true,
	"STATION CLK REF": true, "SYS / # / OBS TYPES": true, "MARKER NAME": true,
	"MARKER NUMBER": true, "INTERVAL": true,
}

// split returns the content and label of a header line, trying the
// version's label column first and the other one second.
func (p *clkParser) split(line string) (content, label string) {
	for _, at := range []int{p.lab, 60 + 65 - p.lab} {
		if len(line) > at {
			if l := strings.TrimSpace(line[at:]); clkLabels[l] {
				return line[:at], l
			}
		}
	}
	if len(line) > p.lab {
		return line[:p.lab], strings.TrimSpace(line[p.lab:])
	}
	return line, ""
}

func field(s string, from, to int) string {
	if from >= len(s) {
		return ""
	}
	if to > len(s) {
		to = len(s)
	}
	return s[from:to]
}

func atoi(s string) (int, error) { return strconv.Atoi(strings.TrimSpace(s)) }

// parseFloat reads a Fortran-style number (D or E exponent, either case).
func parseFloat(s string) (float64, error) {
	s = strings.TrimSpace(s)
	s = strings.Map(func(r rune) rune {
		if r == 'D' || r == 'd' {
			return 'E'
		}
		return r
	}, s)
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not a finite number: %q", s)
	}
	return v, nil
}

func (p *clkParser) header() error {
	line, ok, err := p.next()
	if err != nil {
		return err
	}
	if !ok {
		return fmt.Errorf("sim: %s: empty file, want a RINEX clock header", p.name)
	}
	if !strings.Contains(line, "RINEX VERSION / TYPE") {
		return p.errf("first line lacks RINEX VERSION / TYPE: %q", line)
	}
	tok := strings.Fields(field(line, 0, 20))
	if len(tok) == 0 {
		return p.errf("no version number in %q", line)
	}
	v, err := strconv.ParseFloat(tok[0], 64)
	if err != nil || v < 1 || v >= 10 {
		return p.errf("bad RINEX clock version %q", tok[0])
	}
	p.cf.Version = v
	if field(line, 20, 21) != "C" && field(line, 21, 22) != "C" {
		return p.errf("file type is not C (clock data): %q", line)
	}
	p.lab, p.nameW = 60, 4
	if v >= 3.035 { // 3.04 and later
		p.lab, p.nameW = 65, 9
		p.cf.System = strings.TrimSpace(field(line, 42, 43))
	} else {
		p.cf.System = strings.TrimSpace(field(line, 40, 41))
	}
	off := p.nameW - 4 // name-width shift of the fixed columns after the name
	for {
		line, ok, err := p.next()
		if err != nil {
			return err
		}
		if !ok {
			return fmt.Errorf("sim: %s:%d: no END OF HEADER", p.name, p.line)
		}
		c, label := p.split(line)
		switch label {
		case "END OF HEADER":
			return nil
		case "COMMENT":
			p.cf.Comments = append(p.cf.Comments, strings.TrimRight(c, " "))
		case "TIME SYSTEM ID":
			p.cf.TimeSystem = strings.TrimSpace(c)
		case "LEAP SECONDS", "LEAP SECONDS GNSS":
			n, err := atoi(field(c, 0, 6))
			if err != nil {
				return p.errf("bad %s %q", label, field(c, 0, 6))
			}
			p.cf.LeapSeconds = n
		case "# / TYPES OF DATA":
			n, err := atoi(field(c, 0, 6))
			tt := strings.Fields(field(c, 6, len(c)))
			if err != nil || n < 0 || n != len(tt) {
				return p.errf("bad # / TYPES OF DATA %q", strings.TrimSpace(c))
			}
			p.cf.DataTypes = tt
		case "ANALYSIS CENTER":
			p.cf.AnalysisCenter = strings.TrimSpace(c)
		case "# OF CLK REF":
			n, err := atoi(field(c, 0, 6))
			if err != nil || n < 0 {
				return p.errf("bad # OF CLK REF %q", field(c, 0, 6))
			}
			var b RefBlock
			if t := strings.Fields(field(c, 6, len(c))); len(t) == 12 {
				b.Start, err = calendarTokens(t[0:6])
				if err == nil {
					b.End, err = calendarTokens(t[6:12])
				}
				if err != nil {
					return p.errf("bad # OF CLK REF epochs: %v", err)
				}
			} else if len(t) != 0 {
				return p.errf("bad # OF CLK REF epochs %q", strings.TrimSpace(c[6:]))
			}
			p.cf.Refs = append(p.cf.Refs, b)
		case "ANALYSIS CLK REF":
			if len(p.cf.Refs) == 0 {
				p.cf.Refs = append(p.cf.Refs, RefBlock{})
			}
			rc := RefClock{
				Name:  strings.TrimSpace(field(c, 0, p.nameW)),
				DOMES: strings.TrimSpace(field(c, p.nameW+1, p.nameW+21)),
			}
			if s := strings.TrimSpace(field(c, 40+off, 60+off)); s != "" {
				v, err := parseFloat(s)
				if err != nil {
					return p.errf("bad ANALYSIS CLK REF constraint %q", s)
				}
				rc.Constraint = v
			}
			if rc.Name == "" {
				return p.errf("ANALYSIS CLK REF without a clock name")
			}
			b := &p.cf.Refs[len(p.cf.Refs)-1]
			b.Clocks = append(b.Clocks, rc)
		case "# OF SOLN STA / TRF":
			if _, err := atoi(field(c, 0, 6)); err != nil {
				return p.errf("bad # OF SOLN STA %q", field(c, 0, 6))
			}
			p.cf.Frame = strings.TrimSpace(field(c, 6, len(c)))
		case "SOLN STA NAME / NUM":
			s := SolnStation{
				Name:  strings.TrimSpace(field(c, 0, p.nameW)),
				DOMES: strings.TrimSpace(field(c, p.nameW+1, p.nameW+21)),
			}
			var xyz [3]float64
			for i := range 3 {
				from := 25 + off + 12*i
				mm, err := strconv.ParseInt(strings.TrimSpace(field(c, from, from+11)), 10, 64)
				if err != nil {
					return p.errf("bad SOLN STA coordinate %q (mm)", field(c, from, from+11))
				}
				xyz[i] = float64(mm) / 1000
			}
			s.X, s.Y, s.Z = xyz[0], xyz[1], xyz[2]
			p.cf.Stations = append(p.cf.Stations, s)
		case "# OF SOLN SATS":
			if _, err := atoi(field(c, 0, 6)); err != nil {
				return p.errf("bad # OF SOLN SATS %q", field(c, 0, 6))
			}
		case "PRN LIST":
			p.cf.PRNs = append(p.cf.PRNs, strings.Fields(c)...)
		}
	}
}

// calendarTokens reads "yyyy mm dd hh mi ss.ssssss" on the GPS calendar.
func calendarTokens(t []string) (orbits.Time, error) {
	var f [5]int
	for i := range 5 {
		v, err := strconv.Atoi(t[i])
		if err != nil {
			return 0, fmt.Errorf("bad epoch field %q", t[i])
		}
		f[i] = v
	}
	sec, err := strconv.ParseFloat(t[5], 64)
	if err != nil {
		return 0, fmt.Errorf("bad seconds %q", t[5])
	}
	if f[0] < 1900 || f[0] > 2200 || f[1] < 1 || f[1] > 12 || f[2] < 1 || f[2] > 31 ||
		f[3] < 0 || f[3] > 23 || f[4] < 0 || f[4] > 59 || !(sec >= 0 && sec < 61) {
		return 0, fmt.Errorf("epoch %s-%s-%s %s:%s:%s out of range", t[0], t[1], t[2], t[3], t[4], t[5])
	}
	c := time.Date(f[0], time.Month(f[1]), f[2], f[3], f[4], 0, 0, time.UTC)
	return gpsFromCalendar(c) + orbits.Time(math.Round(sec*1e9)), nil
}

func (p *clkParser) records() error {
	p.names = make(map[string]string)
	for {
		line, ok, err := p.next()
		if err != nil {
			return err
		}
		if !ok {
			return nil
		}
		if strings.TrimSpace(line) == "" {
			continue
		}
		if len(line) < 3+p.nameW || line[2] != ' ' {
			return p.errf("bad clock record %q", line)
		}
		var r ClockRecord
		typ := line[0:2]
		switch typ {
		case "AS", "AR", "CR", "DR", "MS":
		default:
			return p.errf("unknown clock record type %q", typ)
		}
		r.Type = typ
		nm := strings.TrimSpace(line[3 : 3+p.nameW])
		if nm == "" {
			return p.errf("clock record without a name")
		}
		if s, ok := p.names[nm]; ok {
			nm = s // share one string per clock name
		} else {
			p.names[nm] = nm
		}
		r.Name = nm
		t := strings.Fields(line[3+p.nameW:])
		if len(t) < 8 {
			return p.errf("clock record has %d fields after the name, want epoch, count and values", len(t))
		}
		if r.Epoch, err = calendarTokens(t[0:6]); err != nil {
			return p.errf("%v", err)
		}
		n, err := strconv.Atoi(t[6])
		if err != nil || n < 1 || n > 6 {
			return p.errf("bad number of clock values %q, want 1 to 6", t[6])
		}
		r.N = n
		vals := t[7:]
		if len(vals) > 2 || len(vals) > n {
			return p.errf("clock record has %d values on its first line, want at most %d", len(vals), min(n, 2))
		}
		if n > 2 {
			if len(vals) != 2 {
				return p.errf("clock record announces %d values but its first line holds %d", n, len(vals))
			}
			cont, ok, err := p.next()
			if err != nil {
				return err
			}
			if !ok {
				return p.errf("missing continuation line for %d clock values", n)
			}
			ct := strings.Fields(cont)
			if len(ct) != n-2 {
				return p.errf("continuation line has %d values, want %d", len(ct), n-2)
			}
			vals = append(vals, ct...)
		} else if len(vals) != n {
			return p.errf("clock record announces %d values but holds %d", n, len(vals))
		}
		for i, s := range vals {
			v, err := parseFloat(s)
			if err != nil {
				return p.errf("bad clock value %q", s)
			}
			r.Values[i] = v
		}
		p.cf.Records = append(p.cf.Records, r)
	}
}

// appendE19 appends v in the Fortran E19.12 form used by RINEX clock files:
// a sign column, "0.", 12 digits, "E", a signed two-digit exponent (e.g.
// " 0.326868022879E-03"). |v| < 1e-99 is written as zero.
func appendE19(b []byte, v float64) ([]byte, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return b, fmt.Errorf("sim: cannot write %g in RINEX E19.12", v)
	}
	if math.Abs(v) < 1e-99 {
		return append(b, " 0.000000000000E+00"...), nil
	}
	var tmp [32]byte
	s := strconv.AppendFloat(tmp[:0], v, 'e', 11, 64) // d.ddddddddddde±XX: 12 significant digits
	neg := s[0] == '-'
	if neg {
		s = s[1:]
	}
	ei := bytes.IndexByte(s, 'e')
	exp, err := strconv.Atoi(string(s[ei+1:]))
	if err != nil {
		return b, fmt.Errorf("sim: cannot format %g: %w", v, err)
	}
	exp++ // 0.d1d2… form
	if exp > 99 || exp < -99 {
		return b, fmt.Errorf("sim: %g out of range for RINEX E19.12", v)
	}
	if neg {
		b = append(b, '-')
	} else {
		b = append(b, ' ')
	}
	b = append(b, '0', '.', s[0])
	b = append(b, s[2:ei]...)
	b = append(b, 'E')
	if exp < 0 {
		b = append(b, '-')
		exp = -exp
	} else {
		b = append(b, '+')
	}
	return append(b, byte('0'+exp/10), byte('0'+exp%10)), nil
}

// rinexEpoch formats an epoch as " yyyy mm dd hh mi ss.ssssss" (1X,I4,4I3,F10.6).
func rinexEpoch(t orbits.Time) (string, error) {
	if int64(t)%1000 != 0 {
		return "", fmt.Errorf("sim: epoch %v is not a whole number of µs, which RINEX clock F10.6 seconds cannot hold", t)
	}
	c := gpsCalendar(t)
	us := c.Nanosecond() / 1000
	return fmt.Sprintf(" %4d %2d %2d %2d %2d %2d.%06d", c.Year(), int(c.Month()), c.Day(), c.Hour(), c.Minute(), c.Second(), us), nil
}

// clkHeaderLine pads content to the 3.04 label column (66) and appends the label.
func clkHeaderLine(w *bufio.Writer, content, label string) error {
	if len(content) > 65 {
		return fmt.Errorf("sim: RINEX clock header field %q longer than 65 columns", content)
	}
	_, err := fmt.Fprintf(w, "%-65s%s\n", content, label)
	return err
}

// WriteRinexClock writes clocks.clk: RINEX clock 3.04 with AR station and
// AS satellite records (bias only, s), relative to the reference clock(s)
// named in ANALYSIS CLK REF, time system GPS. Gaps are absent records.
func WriteRinexClock(path string, d *Dataset) (FileSum, error) {
	if err := d.Validate(); err != nil {
		return FileSum{}, err
	}
	for _, c := range d.Clocks {
		if len(c.ID) > 9 {
			return FileSum{}, fmt.Errorf("sim: clock id %q longer than the 9 characters of a RINEX clock name", c.ID)
		}
	}
	if d.IntervalNS()%1000 != 0 {
		return FileSum{}, fmt.Errorf("sim: sample interval %g s is not a whole number of µs", d.Interval)
	}
	if _, err := rinexEpoch(d.Start); err != nil {
		return FileSum{}, err
	}
	return writeAtomic(path, func(w *bufio.Writer) error {
		return writeRinexClock(w, d)
	})
}

func writeRinexClock(w *bufio.Writer, d *Dataset) error {
	var sats, stas []int
	sys := ""
	for j, c := range d.Clocks {
		if c.Kind == Satellite {
			sats = append(sats, j)
			s := c.ID[:1]
			switch {
			case sys == "":
				sys = s
			case sys != s:
				sys = "M"
			}
		} else {
			stas = append(stas, j)
		}
	}
	if sys == "" {
		sys = "M"
	}
	h := func(content, label string) error { return clkHeaderLine(w, content, label) }
	if err := h(fmt.Sprintf("%-21s%-21s%s", "3.04", "C", sys), "RINEX VERSION / TYPE"); err != nil {
		return err
	}
	date := gpsCalendar(d.Start).Format("20060102 150405") + " GPS"
	if err := h(fmt.Sprintf("%-20s %-20s %s", "wallcross", "wallcross", date), "PGM / RUN BY / DATE"); err != nil {
		return err
	}
	comments := []string{
		"Synthetic clock solutions with injected domain-wall signals",
		fmt.Sprintf("tool %.50s", d.ToolVersion),
		fmt.Sprintf("run seed %d", d.Seed),
		"PGM date field = first epoch, so equal runs give equal bytes",
		"bias = clock - reference, s; truth in events/crossings.csv",
	}
	allRefs := append([]ReferenceChange{{Epoch: 0, Reference: d.Reference}}, d.ReferenceChanges...)
	for _, rc := range allRefs {
		if len(rc.Reference.Clocks) > 1 {
			comments = append(comments, fmt.Sprintf("from epoch %d: weighted ensemble reference:", rc.Epoch))
			for i, id := range rc.Reference.Clocks {
				comments = append(comments, fmt.Sprintf("  %-9s weight %.15g", id, rc.Reference.Weights[i]))
			}
		}
	}
	for _, c := range comments {
		if err := h(c, "COMMENT"); err != nil {
			return err
		}
	}
	if err := h("   GPS", "TIME SYSTEM ID"); err != nil {
		return err
	}
	types := fmt.Sprintf("%6d", len(boolList(len(stas) > 0, len(sats) > 0)))
	if len(stas) > 0 {
		types += "    AR"
	}
	if len(sats) > 0 {
		types += "    AS"
	}
	if err := h(types, "# / TYPES OF DATA"); err != nil {
		return err
	}
	if err := h("WXS  wallcross synthetic network", "ANALYSIS CENTER"); err != nil {
		return err
	}
	for i, rc := range allRefs {
		count := fmt.Sprintf("%6d", len(rc.Reference.Clocks))
		if len(allRefs) > 1 {
			// Validity epochs (1X,I4,4I3,F10.6 each; layout from memory of
			// RINEX clock 3.04 Table A1): from this change to the next one.
			end := d.Epochs - 1
			if i+1 < len(allRefs) {
				end = allRefs[i+1].Epoch - 1
			}
			a, _ := rinexEpoch(d.EpochTime(rc.Epoch))
			b, _ := rinexEpoch(d.EpochTime(end))
			count += a + b
		}
		if err := h(count, "# OF CLK REF"); err != nil {
			return err
		}
		for _, id := range rc.Reference.Clocks {
			zero, _ := appendE19(nil, 0)
			if err := h(fmt.Sprintf("%-9s %-20s%15s%s", id, "", "", zero), "ANALYSIS CLK REF"); err != nil {
				return err
			}
		}
	}
	pos := make(map[string]StationInfo, len(d.Stations))
	for _, s := range d.Stations {
		pos[s.ID] = s
	}
	var soln []StationInfo
	for _, j := range stas {
		if s, ok := pos[d.Clocks[j].ID]; ok {
			soln = append(soln, s)
		}
	}
	if err := h(fmt.Sprintf("%6d    %s", len(soln), "WGS84"), "# OF SOLN STA / TRF"); err != nil {
		return err
	}
	for _, s := range soln {
		mm := [3]float64{s.X * 1000, s.Y * 1000, s.Z * 1000}
		for _, v := range mm {
			if !(math.Abs(v) < 1e10) {
				return fmt.Errorf("sim: station %s coordinate %g mm does not fit I11", s.ID, v)
			}
		}
		line := fmt.Sprintf("%-9s %-20s%11d %11d %11d", s.ID, "", int64(math.Round(mm[0])), int64(math.Round(mm[1])), int64(math.Round(mm[2])))
		if err := h(line, "SOLN STA NAME / NUM"); err != nil {
			return err
		}
	}
	if err := h(fmt.Sprintf("%6d", len(sats)), "# OF SOLN SATS"); err != nil {
		return err
	}
	for i := 0; i < len(sats); i += 16 {
		var sb strings.Builder
		for _, j := range sats[i:min(i+16, len(sats))] {
			fmt.Fprintf(&sb, "%-3s ", d.Clocks[j].ID)
		}
		if err := h(sb.String(), "PRN LIST"); err != nil {
			return err
		}
	}
	if err := h("", "END OF HEADER"); err != nil {
		return err
	}
	// Records: per epoch, stations then satellites, each in column order.
	order := append(append([]int{}, stas...), sats...)
	nc := len(d.Clocks)
	names := make([][]byte, nc)
	for j, c := range d.Clocks {
		typ := "AS"
		if c.Kind == Station {
			typ = "AR"
		}
		names[j] = fmt.Appendf(nil, "%s %-9s", typ, c.ID)
	}
	rec := make([]byte, 0, 96)
	for k := 0; k < d.Epochs; k++ {
		ep, err := rinexEpoch(d.EpochTime(k))
		if err != nil {
			return err
		}
		row := d.Bias[k*nc : (k+1)*nc]
		for _, j := range order {
			v := row[j]
			if math.IsNaN(v) {
				continue
			}
			rec = append(rec[:0], names[j]...)
			rec = append(rec, ep...)
			rec = append(rec, "  1   "...)
			if rec, err = appendE19(rec, v); err != nil {
				return fmt.Errorf("clock %s epoch %d: %w", d.Clocks[j].ID, k, err)
			}
			rec = append(rec, '\n')
			if _, err := w.Write(rec); err != nil {
				return err
			}
		}
	}
	return nil
}

func boolList(b ...bool) []bool {
	var out []bool
	for _, v := range b {
		if v {
			out = append(out, v)
		}
	}
	return out
}

// Matrix arranges the bias records (value 1) of the given record types
// ("AS", "AR"; all types when none are given) as a row-major matrix
// [epochs × clocks], NaN where a clock has no record at an epoch. Epochs
// are the distinct record epochs in increasing order; clocks are in order
// of first appearance.
func (c *ClockFile) Matrix(types ...string) (epochs []orbits.Time, names []string, bias []float64) {
	want := func(t string) bool {
		if len(types) == 0 {
			return true
		}
		for _, w := range types {
			if w == t {
				return true
			}
		}
		return false
	}
	ei := map[orbits.Time]int{}
	ci := map[string]int{}
	for _, r := range c.Records {
		if !want(r.Type) {
			continue
		}
		if _, ok := ei[r.Epoch]; !ok {
			ei[r.Epoch] = 0
			epochs = append(epochs, r.Epoch)
		}
		if _, ok := ci[r.Name]; !ok {
			ci[r.Name] = len(names)
			names = append(names, r.Name)
		}
	}
	slices.Sort(epochs)
	for i, t := range epochs {
		ei[t] = i
	}
	bias = make([]float64, len(epochs)*len(names))
	for i := range bias {
		bias[i] = math.NaN()
	}
	for _, r := range c.Records {
		if want(r.Type) {
			bias[ei[r.Epoch]*len(names)+ci[r.Name]] = r.Values[0]
		}
	}
	return epochs, names, bias
}

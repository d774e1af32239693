package overlay

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"wallcross/orbits"
)

// ClockFile is a RINEX clock file held as its original bytes with the
// positions of every bias value, so that values can be replaced without
// touching anything else.
type ClockFile struct {
	Name    string  // file name, for messages
	Version float64 // 3.04, 2.00, ...
	Data    []byte  // the file's bytes
	// Refs are the reference clocks of the header's ANALYSIS CLK REF
	// lines (names as in the records).
	Refs []string
	// Stations maps a receiver name to its Earth-fixed position from
	// SOLN STA NAME / NUM, m.
	Stations map[string][3]float64
	Records  []Record
	nameW    int // width of the record name field (9 in 3.04, 4 before)
}

// Record is one AS or AR data record.
type Record struct {
	Type  string      // "AS" or "AR"
	Name  string      // satellite (G05) or receiver name
	Epoch orbits.Time // GPS time of the record
	Line  int         // 1-based line number
	// Bias is the clock bias, s, and [Start, End) the byte range of its
	// text in Data.
	Bias       float64
	Start, End int
}

// ParseClockFile indexes the bytes of a RINEX clock file. Malformed
// header or record lines are errors naming name:line.
func ParseClockFile(name string, data []byte) (*ClockFile, error) {
	cf := &ClockFile{Name: name, Data: data, Stations: map[string][3]float64{}}
	lineNo := 0
	pos := 0
	inHeader := true
	labelCol := 60
	skip := 0 // continuation lines to skip
	for pos < len(data) {
		end := bytes.IndexByte(data[pos:], '\n')
		next := len(data)
		if end >= 0 {
			next = pos + end + 1
			end = pos + end
		} else {
			end = len(data)
		}
		raw := data[pos:end]
		line := strings.TrimRight(string(raw), "\r")
		lineNo++
		lineStart := pos
		pos = next
		if inHeader {
			if lineNo == 1 {
				v, err := strconv.ParseFloat(strings.TrimSpace(col(line, 0, 9)), 64)
				if err != nil || !strings.Contains(line, "RINEX VERSION / TYPE") {
					return nil, fmt.Errorf("overlay: %s:1: not a RINEX clock file: want \"RINEX VERSION / TYPE\" with a version in columns 1-9, got %q", name, trunc(line))
				}
				if v < 2 || v >= 4 {
					return nil, fmt.Errorf("overlay: %s:1: RINEX clock version %.2f not supported (want 2.00 to 3.05)", name, v)
				}
				if !strings.Contains(col(line, 20, 40), "C") {
					return nil, fmt.Errorf("overlay: %s:1: file type is not C (clock data): %q", name, trunc(line))
				}
				cf.Version = v
				cf.nameW = 4
				if v >= 3.04 {
					cf.nameW = 9
					labelCol = 65
				}
				continue
			}
			label := strings.TrimSpace(col(line, labelCol, labelCol+20))
			switch label {
			case "END OF HEADER":
				inHeader = false
			case "ANALYSIS CLK REF":
				n := strings.TrimSpace(col(line, 0, cf.nameW))
				if n == "" {
					return nil, fmt.Errorf("overlay: %s:%d: ANALYSIS CLK REF without a clock name", name, lineNo)
				}
				cf.Refs = append(cf.Refs, n)
			case "SOLN STA NAME / NUM":
				// name A4/A9, DOMES, then X, Y, Z in mm as I11 each ending
				// at the label column (gnss.md §2.3).
				n := strings.TrimSpace(col(line, 0, cf.nameW))
				var xyz [3]float64
				for k := 0; k < 3; k++ {
					a := labelCol - 35 + 12*k
					f := strings.TrimSpace(col(line, a, a+11))
					mm, err := strconv.ParseInt(f, 10, 64)
					if err != nil {
						return nil, fmt.Errorf("overlay: %s:%d: SOLN STA NAME / NUM: bad coordinate %q in columns %d-%d (want mm as an integer)", name, lineNo, f, a+1, a+11)
					}
					xyz[k] = float64(mm) / 1e3
				}
				cf.Stations[n] = xyz
			}
			continue
		}
		if skip > 0 {
			skip--
			continue
		}
		if strings.TrimSpace(line) == "" {
			continue
		}
		typ := col(line, 0, 2)
		r, nvals, err := cf.parseRecord(line, lineNo)
		if err != nil {
			return nil, err
		}
		if nvals > 2 {
			skip = 1 // values 3-6 on one continuation line
		}
		if typ != "AS" && typ != "AR" {
			continue
		}
		r.Start += lineStart
		r.End += lineStart
		cf.Records = append(cf.Records, r)
	}
	if inHeader {
		return nil, fmt.Errorf("overlay: %s:%d: no END OF HEADER", name, lineNo)
	}
	return cf, nil
}

// parseRecord reads one data line: type, name, epoch, value count and the
// first value (the bias) with its byte range within the line.
func (cf *ClockFile) parseRecord(line string, lineNo int) (Record, int, error) {
	bad := func(what string) (Record, int, error) {
		return Record{}, 0, fmt.Errorf("overlay: %s:%d: %s in clock record %q", cf.Name, lineNo, what, trunc(line))
	}
	typ := col(line, 0, 2)
	switch typ {
	case "AS", "AR", "CR", "DR", "MS":
	default:
		return bad(fmt.Sprintf("unknown record type %q (want AS, AR, CR, DR or MS)", typ))
	}
	w := cf.nameW
	e := 3 + w + 1 // epoch start, 0-based
	fields := strings.Fields(col(line, e, e+26))
	if len(fields) != 6 {
		return bad(fmt.Sprintf("want an epoch (year month day hour minute second) in columns %d-%d", e+1, e+26))
	}
	var ymdhm [5]int
	for i := 0; i < 5; i++ {
		v, err := strconv.Atoi(fields[i])
		if err != nil {
			return bad(fmt.Sprintf("bad epoch field %q", fields[i]))
		}
		ymdhm[i] = v
	}
	sec, err := strconv.ParseFloat(fields[5], 64)
	if err != nil || sec < 0 || sec >= 61 {
		return bad(fmt.Sprintf("bad epoch seconds %q", fields[5]))
	}
	if ymdhm[1] < 1 || ymdhm[1] > 12 || ymdhm[2] < 1 || ymdhm[2] > 31 || ymdhm[3] > 23 || ymdhm[4] > 59 || ymdhm[3] < 0 || ymdhm[4] < 0 {
		return bad("epoch out of range")
	}
	nv, err := strconv.Atoi(strings.TrimSpace(col(line, e+26, e+29)))
	if err != nil || nv < 1 || nv > 6 {
		return bad(fmt.Sprintf("bad number of values %q in columns %d-%d (want 1 to 6)", col(line, e+26, e+29), e+27, e+29))
	}
	vs := e + 29 + 3 // first value, 19 characters
	if len(line) < vs+19 {
		return bad(fmt.Sprintf("line too short for the bias value in columns %d-%d", vs+1, vs+19))
	}
	txt := line[vs : vs+19]
	b, err := parseFortranFloat(txt)
	if err != nil {
		return bad(fmt.Sprintf("bad bias value %q in columns %d-%d", txt, vs+1, vs+19))
	}
	r := Record{
		Type:  typ,
		Name:  strings.TrimSpace(col(line, 3, 3+w)),
		Epoch: orbits.FromCalendar(ymdhm[0], ymdhm[1], ymdhm[2], ymdhm[3], ymdhm[4], sec),
		Line:  lineNo,
		Bias:  b,
		Start: vs, End: vs + 19,
	}
	return r, nv, nil
}

func parseFortranFloat(s string) (float64, error) {
	t := strings.TrimSpace(s)
	t = strings.NewReplacer("D", "E", "d", "e").Replace(t)
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fmt.Errorf("bad number %q", s)
	}
	return v, nil
}

// formatLike formats v in the same Fortran E layout and width as old
// (e.g. " 0.217267716775E-06": sign or blank, "0.", 12 digits, exponent
// with sign and two digits), rounded to the printed precision.
func formatLike(old string, v float64) (string, error) {
	t := strings.TrimSpace(old)
	if strings.HasPrefix(t, "-") || strings.HasPrefix(t, "+") {
		t = t[1:]
	}
	ei := strings.IndexAny(t, "EeDd")
	dot := strings.IndexByte(t, '.')
	if ei < 0 || dot < 0 || dot > ei {
		return "", fmt.Errorf("overlay: cannot reproduce the number format of %q", old)
	}
	digits := ei - dot - 1
	lead := t[:dot] // "0" for the 0.ddd form, "d" for d.ddd
	expChar := t[ei : ei+1]
	expDigits := len(t) - ei - 2
	if expDigits < 2 {
		expDigits = 2
	}
	var mant string
	var exp int
	if v == 0 {
		mant = strings.Repeat("0", digits)
		exp = 0
	} else if lead == "0" {
		// 0.ddd form: mantissa in [0.1, 1).
		s := strconv.FormatFloat(math.Abs(v), 'e', digits-1, 64) // d.ddde±x
		k := strings.IndexByte(s, 'e')
		mant = strings.Replace(s[:k], ".", "", 1)
		x, _ := strconv.Atoi(s[k+1:])
		exp = x + 1
	} else {
		s := strconv.FormatFloat(math.Abs(v), 'e', digits, 64)
		k := strings.IndexByte(s, 'e')
		mant = s[:k]
		x, _ := strconv.Atoi(s[k+1:])
		exp = x
	}
	var b strings.Builder
	if v < 0 {
		b.WriteByte('-')
	}
	if lead == "0" {
		b.WriteString("0.")
		b.WriteString(mant)
	} else {
		b.WriteString(mant)
	}
	b.WriteString(expChar)
	if exp < 0 {
		b.WriteByte('-')
		exp = -exp
	} else {
		b.WriteByte('+')
	}
	es := strconv.Itoa(exp)
	for len(es) < expDigits {
		es = "0" + es
	}
	b.WriteString(es)
	out := b.String()
	if len(out) > len(old) {
		return "", fmt.Errorf("overlay: value %g does not fit the %d-character field of %q", v, len(old), old)
	}
	return strings.Repeat(" ", len(old)-len(out)) + out, nil
}

func col(s string, a, b int) string {
	if a >= len(s) {
		return ""
	}
	if b > len(s) {
		b = len(s)
	}
	return s[a:b]
}

func trunc(s string) string {
	if len(s) > 90 {
		return s[:90] + "…"
	}
	return s
}

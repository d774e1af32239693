package orbits

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Nav is the content of a RINEX navigation file: the ephemeris records of
// the supported systems and counts of what was skipped.
type Nav struct {
	// Name is the file name used in messages.
	Name string
	// Version is the RINEX version (2.x, 3.02–3.05, 4.00).
	Version float64
	// LeapSeconds is the header's GPST − UTC in s (0 when absent).
	LeapSeconds int
	// Records holds every supported ephemeris record in file order.
	Records []Ephemeris
	// Unsupported counts records skipped because their system or message
	// type is not supported, keyed e.g. "S" (SBAS), "I" (NavIC) or
	// "C CNV1" (RINEX 4 message type).
	Unsupported map[string]int
	// Other counts RINEX 4 non-ephemeris records (STO, ION, EOP), skipped.
	Other map[string]int

	bySat map[SatID][]Ephemeris // sorted by Ref
}

// ReadNav reads a RINEX navigation file, gzip-compressed or not.
func ReadNav(path string) (*Nav, error) {
	rc, err := OpenFile(path)
	if err != nil {
		return nil, err
	}
	defer rc.Close()
	return ReadNavFrom(rc, path)
}

type navLine struct {
	text string
	num  int
}

// navReader walks the lines of a nav file.
type navReader struct {
	sc   *bufio.Scanner
	name string
	line int
	peek *navLine
}

func (r *navReader) next() (navLine, bool) {
	if r.peek != nil {
		l := *r.peek
		r.peek = nil
		return l, true
	}
	if !r.sc.Scan() {
		return navLine{}, false
	}
	r.line++
	return navLine{strings.TrimRight(r.sc.Text(), "\r"), r.line}, true
}

func (r *navReader) unread(l navLine) { r.peek = &l }

func (r *navReader) errorf(line int, format string, a ...any) error {
	return fmt.Errorf("orbits: %s:%d: %s", r.name, line, fmt.Sprintf(format, a...))
}

// parseNavFloat reads a Fortran D19.12-style number with exponent letter
// D, E, d or e; a blank field is 0 (RINEX: blank = zero or unknown).
func parseNavFloat(s string) (float64, bool) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, true
	}
	s = strings.Map(func(r rune) rune {
		switch r {
		case 'D', 'd', 'e':
			return 'E'
		}
		return r
	}, s)
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}

// ReadNavFrom reads a RINEX navigation file from in (plain or gzip); name
// is used in error messages. Supported: RINEX 2.x GPS and GLONASS, 3.02–3.05 and 4.00
// (mixed); GPS/QZSS LNAV, Galileo I/NAV and F/NAV, BeiDou D1/D2, GLONASS
// FDMA records. Other systems and message types are counted in
// Unsupported; a malformed record is an error naming file:line and what
// was expected.
func ReadNavFrom(in io.Reader, name string) (*Nav, error) {
	rd, err := maybeGunzip(in, name)
	if err != nil {
		return nil, err
	}
	sc := bufio.NewScanner(rd)
	sc.Buffer(make([]byte, 0, 256), 1<<20)
	r := &navReader{sc: sc, name: name}
	n := &Nav{Name: name, Unsupported: map[string]int{}, Other: map[string]int{}}

	first, ok := r.next()
	if !ok {
		if err := sc.Err(); err != nil {
			return nil, fmt.Errorf("orbits: %s: could not read: %w", name, err)
		}
		return nil, r.errorf(1, "empty file (want a RINEX VERSION / TYPE header line)")
	}
	if !strings.Contains(first.text, "RINEX VERSION / TYPE") {
		return nil, r.errorf(1, "first line is not RINEX VERSION / TYPE")
	}
	ver, err := strconv.ParseFloat(strings.TrimSpace(col(first.text, 1, 9)), 64)
	if err != nil {
		return nil, r.errorf(1, "bad RINEX version %q at columns 1-9", strings.TrimSpace(col(first.text, 1, 9)))
	}
	n.Version = ver
	major := int(ver)
	ftype := col(first.text, 21, 21)
	sys2 := byte('G')
	switch {
	case major == 2:
		switch ftype {
		case "N":
			sys2 = 'G'
		case "G":
			sys2 = 'R'
		case "H":
			sys2 = 'S'
		default:
			return nil, r.errorf(1, "RINEX 2 file type %q in column 21 is not navigation (want N, G or H)", ftype)
		}
	case major == 3 && ver >= 3.0 && ver < 3.06, major == 4 && ver < 4.02:
		if ftype != "N" {
			return nil, r.errorf(1, "file type %q in column 21 is not navigation (want N)", ftype)
		}
	default:
		return nil, r.errorf(1, "unknown RINEX navigation version %g (want 2.x, 3.00-3.05 or 4.00-4.01)", ver)
	}

	// Header.
	for {
		l, ok := r.next()
		if !ok {
			return nil, r.errorf(r.line, "file ends inside the header (no END OF HEADER)")
		}
		label := strings.TrimSpace(col(l.text, 61, 80))
		if label == "END OF HEADER" {
			break
		}
		if label == "LEAP SECONDS" {
			if v, err := strconv.Atoi(strings.TrimSpace(col(l.text, 1, 6))); err == nil {
				n.LeapSeconds = v
			} else {
				return nil, r.errorf(l.num, "bad LEAP SECONDS value %q at columns 1-6", col(l.text, 1, 6))
			}
		}
	}

	// Records.
	for {
		l, ok := r.next()
		if !ok {
			break
		}
		if strings.TrimSpace(l.text) == "" {
			continue
		}
		var rec Ephemeris
		var err error
		switch major {
		case 2:
			rec, err = n.readRecord2(r, l, sys2)
		case 3:
			rec, err = n.readRecord3(r, l, "")
		default:
			rec, err = n.readRecord4(r, l)
		}
		if err != nil {
			return nil, err
		}
		if rec != nil {
			n.Records = append(n.Records, rec)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("orbits: %s:%d: could not read: %w", name, r.line, err)
	}
	n.index()
	return n, nil
}

// continuation reports whether a line continues a record (its first
// `indent` columns are blank).
func continuation(s string, indent int) bool {
	if len(s) < indent {
		return strings.TrimSpace(s) == ""
	}
	return strings.TrimSpace(s[:indent]) == ""
}

// gather reads the continuation lines of a record: lines whose first
// indent columns are blank. A completely blank line counts only while fewer
// than want lines were read (a writer that omits trailing blank fields may
// leave an orbit line empty); afterwards it ends the record.
func (r *navReader) gather(indent, want int) []navLine {
	var out []navLine
	for {
		l, ok := r.next()
		if !ok {
			return out
		}
		blank := strings.TrimSpace(l.text) == ""
		if strings.HasPrefix(l.text, ">") || !continuation(l.text, indent) || blank && len(out) >= want {
			r.unread(l)
			return out
		}
		out = append(out, l)
	}
}

// rawRecord is a record as numbers: vals[0] holds the 3 clock values of
// the first line, vals[k] (k ≥ 1) the 4 fields of orbit line k.
type rawRecord struct {
	sat   SatID
	epoch int64 // calendar count on the system's own scale
	line  int
	vals  [][4]float64
}

func (r *navReader) parseBody(sat SatID, epoch int64, first navLine, valStart int, orbit []navLine, fieldStart int) (*rawRecord, error) {
	rr := &rawRecord{sat: sat, epoch: epoch, line: first.num, vals: make([][4]float64, 1+len(orbit))}
	for k := range 3 {
		a := valStart + 19*k
		f := col(first.text, a, a+18)
		v, ok := parseNavFloat(f)
		if !ok {
			return nil, r.errorf(first.num, "%s record: bad number %q at columns %d-%d (want D19.12)", sat, strings.TrimSpace(f), a, a+18)
		}
		rr.vals[0][k] = v
	}
	for i, l := range orbit {
		for k := range 4 {
			a := fieldStart + 19*k
			f := col(l.text, a, a+18)
			v, ok := parseNavFloat(f)
			if !ok {
				return nil, r.errorf(l.num, "%s record: bad number %q in field %d of broadcast orbit line %d (columns %d-%d, want D19.12)", sat, strings.TrimSpace(f), k+1, i+1, a, a+18)
			}
			rr.vals[i+1][k] = v
		}
	}
	return rr, nil
}

// epochFields parses integer date fields at the given 1-based column pairs
// and the seconds field.
func (r *navReader) epochFields(l navLine, sat SatID, cols [][2]int, secCols [2]int, twoDigitYear bool) (int64, error) {
	var v [5]int
	for i, c := range cols {
		f := strings.TrimSpace(col(l.text, c[0], c[1]))
		x, err := strconv.Atoi(f)
		if err != nil {
			return 0, r.errorf(l.num, "%s record: bad epoch field %q at columns %d-%d (want an integer)", sat, f, c[0], c[1])
		}
		v[i] = x
	}
	sf := strings.TrimSpace(col(l.text, secCols[0], secCols[1]))
	sec, err := strconv.ParseFloat(sf, 64)
	if err != nil || sec < 0 || sec >= 61 {
		return 0, r.errorf(l.num, "%s record: bad epoch seconds %q at columns %d-%d", sat, sf, secCols[0], secCols[1])
	}
	if twoDigitYear {
		if v[0] < 0 || v[0] > 99 {
			return 0, r.errorf(l.num, "%s record: bad two-digit year %d", sat, v[0])
		}
		if v[0] >= 80 {
			v[0] += 1900
		} else {
			v[0] += 2000
		}
	}
	if v[0] < 1980 || v[0] > 2200 || v[1] < 1 || v[1] > 12 || v[2] < 1 || v[2] > 31 || v[3] < 0 || v[3] > 24 || v[4] < 0 || v[4] > 59 {
		return 0, r.errorf(l.num, "%s record: epoch %04d-%02d-%02d %02d:%02d out of range", sat, v[0], v[1], v[2], v[3], v[4])
	}
	return calendarCount(v[0], v[1], v[2], v[3], v[4], sec), nil
}

// readRecord2 reads a RINEX 2 record (PRN at cols 1-2, 3X indent).
func (n *Nav) readRecord2(r *navReader, l navLine, sys byte) (Ephemeris, error) {
	prn, err := strconv.Atoi(strings.TrimSpace(col(l.text, 1, 2)))
	if err != nil || prn < 1 {
		return nil, r.errorf(l.num, "bad satellite number %q at columns 1-2 (want a PRN/slot record line)", col(l.text, 1, 2))
	}
	sat := MakeSatID(sys, prn)
	ep, err := r.epochFields(l, sat, [][2]int{{4, 5}, {7, 8}, {10, 11}, {13, 14}, {16, 17}}, [2]int{18, 22}, true)
	if err != nil {
		return nil, err
	}
	want := 7
	if sys != 'G' {
		want = 3
	}
	orbit := r.gather(3, want)
	if len(orbit) != want {
		return nil, r.errorf(l.num, "%s record has %d broadcast orbit lines, want %d (RINEX %g)", sat, len(orbit), want, n.Version)
	}
	rr, err := r.parseBody(sat, ep, l, 23, orbit, 4)
	if err != nil {
		return nil, err
	}
	switch sys {
	case 'G':
		return r.kepler(rr, "LNAV")
	case 'R':
		return r.glonass(rr)
	}
	n.Unsupported[string(sys)]++
	return nil, nil
}

// readRecord3 reads a RINEX 3 (or 4 body) record. msg is the RINEX 4
// message type ("" in RINEX 3).
func (n *Nav) readRecord3(r *navReader, l navLine, msg string) (Ephemeris, error) {
	id := col(l.text, 1, 3)
	sys := id[0]
	if !strings.ContainsRune("GRECJSI", rune(sys)) || len(id) != 3 {
		return nil, r.errorf(l.num, "expected a record line starting with a satellite id (G, R, E, C, J, S or I + 2 digits), got %q", trunc(l.text))
	}
	prn, err := strconv.Atoi(strings.TrimSpace(strings.ReplaceAll(id[1:], " ", "0")))
	if err != nil || prn < 1 {
		return nil, r.errorf(l.num, "bad satellite number %q at columns 2-3", id[1:])
	}
	sat := MakeSatID(sys, prn)
	// Expected orbit-line counts (RINEX 3.04/3.05 Tables A4–A16, checked on
	// the extdata files [data]).
	want := map[byte]int{'G': 7, 'J': 7, 'E': 7, 'C': 7, 'I': 7, 'S': 3, 'R': 4}[sys]
	if sys == 'R' && n.Version < 3.05 {
		want = 3
	}
	orbit := r.gather(4, want)
	// GLONASS line 4 (status flags, added in 3.05) is also accepted when a
	// writer omits it, and tolerated in older versions.
	if sys == 'R' && (len(orbit) == 3 || len(orbit) == 4) {
		want = len(orbit)
	}
	if len(orbit) != want {
		return nil, r.errorf(l.num, "%s record has %d broadcast orbit lines, want %d (RINEX %.2f)", sat, len(orbit), want, n.Version)
	}
	if sys == 'S' || sys == 'I' {
		n.Unsupported[string(sys)]++
		return nil, nil
	}
	ep, err := r.epochFields(l, sat, [][2]int{{5, 8}, {10, 11}, {13, 14}, {16, 17}, {19, 20}}, [2]int{22, 23}, false)
	if err != nil {
		return nil, err
	}
	rr, err := r.parseBody(sat, ep, l, 24, orbit, 5)
	if err != nil {
		return nil, err
	}
	switch sys {
	case 'R':
		return r.glonass(rr)
	case 'G', 'J':
		return r.kepler(rr, "LNAV")
	case 'C':
		if msg == "" {
			msg = "D1"
			if prn <= 5 || prn >= 59 {
				msg = "D2"
			}
		}
		return r.kepler(rr, msg)
	case 'E':
		return r.kepler(rr, msg)
	}
	return nil, nil
}

// readRecord4 reads one RINEX 4 record ("> TYPE SV MSG" + body).
func (n *Nav) readRecord4(r *navReader, l navLine) (Ephemeris, error) {
	if !strings.HasPrefix(l.text, ">") {
		return nil, r.errorf(l.num, "expected a RINEX 4 record header line starting with '>' (e.g. \"> EPH G01 LNAV\"), got %q", trunc(l.text))
	}
	f := strings.Fields(l.text[1:])
	if len(f) < 2 {
		return nil, r.errorf(l.num, "RINEX 4 record header %q lacks the record type and satellite", trunc(l.text))
	}
	typ := f[0]
	if typ != "EPH" {
		n.Other[typ]++
		r.skipTo4()
		return nil, nil
	}
	if len(f) < 3 || len(f[1]) != 3 {
		return nil, r.errorf(l.num, "EPH record header %q: want \"> EPH SVN MSG\"", trunc(l.text))
	}
	sys, msg := f[1][0], f[2]
	supported := (sys == 'G' || sys == 'J') && msg == "LNAV" || sys == 'E' && (msg == "INAV" || msg == "FNAV") ||
		sys == 'C' && (msg == "D1" || msg == "D2") || sys == 'R' && msg == "FDMA"
	if !supported {
		n.Unsupported[string(sys)+" "+msg]++
		r.skipTo4()
		return nil, nil
	}
	body, ok := r.next()
	if !ok {
		return nil, r.errorf(l.num, "%s %s record is truncated: no SV / EPOCH line", f[1], msg)
	}
	if strings.HasPrefix(body.text, ">") {
		return nil, r.errorf(body.num, "%s %s record is truncated: no SV / EPOCH line before the next record", f[1], msg)
	}
	if col(body.text, 1, 3) != f[1] {
		return nil, r.errorf(body.num, "SV / EPOCH line names %q, the record header %q", col(body.text, 1, 3), f[1])
	}
	rec, err := n.readRecord3(r, body, msg)
	if err != nil {
		return nil, err
	}
	// Nothing but the next record (or EOF) may follow.
	if x, ok := r.next(); ok {
		if !strings.HasPrefix(x.text, ">") && strings.TrimSpace(x.text) != "" {
			return nil, r.errorf(x.num, "unexpected line after the %s %s record (want the next '>' record): %q", f[1], msg, trunc(x.text))
		}
		r.unread(x)
	}
	return rec, nil
}

func (r *navReader) skipTo4() {
	for {
		l, ok := r.next()
		if !ok {
			return
		}
		if strings.HasPrefix(l.text, ">") {
			r.unread(l)
			return
		}
	}
}

// kepler builds a Keplerian record from the RINEX fields (RINEX 3.04
// Tables A6 GPS, A8 Galileo, A14 BeiDou, A10 QZSS, from memory; the
// reference gnss.md §2.1 table).
func (r *navReader) kepler(rr *rawRecord, msg string) (Ephemeris, error) {
	v := rr.vals
	sys := rr.sat.System()
	k := &Kepler{ID: rr.sat, Msg: msg}
	var toc Time
	if sys == 'C' {
		toc = Time(rr.epoch).Add(BDTOffset) // BeiDou epochs are on BDT
	} else {
		toc = Time(rr.epoch)
	}
	k.Toc = toc
	k.Af0, k.Af1, k.Af2 = v[0][0], v[0][1], v[0][2]
	k.IODE = int(v[1][0])
	k.Crs, k.DeltaN, k.M0 = v[1][1], v[1][2], v[1][3]
	k.Cuc, k.Ecc, k.Cus, k.SqrtA = v[2][0], v[2][1], v[2][2], v[2][3]
	toe := v[3][0]
	k.Cic, k.Omega0, k.Cis = v[3][1], v[3][2], v[3][3]
	k.I0, k.Crc, k.Omega, k.OmegaD = v[4][0], v[4][1], v[4][2], v[4][3]
	k.IDot = v[5][0]
	k.Health = int(v[6][1])
	k.TGD, k.TGD2 = v[6][2], v[6][3]
	if !(toe >= 0 && toe < SecondsPerWeek+1) {
		return nil, r.errorf(rr.line, "%s record: toe %g s outside a week", rr.sat, toe)
	}
	// toe: seconds of the week of toc (BDT week for BeiDou); the week
	// number in the file is not needed (and may be modulo 1024 elsewhere):
	// the nearest candidate to toc is taken.
	var best Time
	bestD := math.Inf(1)
	for d := -1; d <= 1; d++ {
		var c Time
		if sys == 'C' {
			w, _ := toc.BDTWeekSOW()
			c = FromBDT(w+d, toe)
		} else {
			w, _ := toc.WeekSOW()
			c = FromWeekSOW(w+d, toe)
		}
		if dd := math.Abs(c.Sub(toc)); dd < bestD {
			best, bestD = c, dd
		}
	}
	k.Toe = best
	switch sys {
	case 'G':
		k.FitHours = v[7][1] // fit interval in hours (0 ⇒ 4 h)
	case 'J':
		// QZSS writes the fit-interval flag: 0 ⇒ 2 h (IS-QZSS-PNT §4.1.2.4, from memory).
		switch f := v[7][1]; {
		case f == 0:
			k.FitHours = 2
		case f == 1:
			k.FitHours = 4
		default:
			k.FitHours = f
		}
	case 'E':
		ds := int(v[5][1])
		k.DataSource = ds
		// Data-source bits: 0 I/NAV E1-B, 1 F/NAV E5a-I, 2 I/NAV E5b-I
		// (RINEX 3.04 Table A8, from memory; gnss.md §1.2).
		switch {
		case msg == "INAV" || msg == "FNAV":
		case ds&5 != 0:
			k.Msg = "INAV"
		case ds&2 != 0:
			k.Msg = "FNAV"
		default:
			k.Msg = "INAV"
		}
		// Records are issued every 10 min and fitted over short arcs: a
		// ±1 h window keeps set C within 1.02 m 3D RMS (max 4.7 m), while the
		// nominal 4 h validity gives 2.66 m (max 20.9 m) [run:
		// TestBroadcastAgainstPrecise]; ±1 h is our choice.
		k.FitHours = 2
	case 'C':
		k.FitHours = 2 // records are issued every hour; ±1 h (our choice, not validated: no BeiDou SP3 here)
	}
	if k.FitHours < 0 || math.IsNaN(k.FitHours) {
		return nil, r.errorf(rr.line, "%s record: negative fit interval %g h", rr.sat, k.FitHours)
	}
	if err := k.Prepare(); err != nil {
		return nil, r.errorf(rr.line, "%s record: %v", rr.sat, strings.TrimPrefix(err.Error(), "orbits: "))
	}
	// BeiDou GEO: inclination below ~20° (gnss.md §1.3 working test).
	k.GEO = sys == 'C' && math.Abs(k.I0) < 20*math.Pi/180
	return k, nil
}

// glonass builds a GLONASS record; epochs are UTC in RINEX.
func (r *navReader) glonass(rr *rawRecord) (Ephemeris, error) {
	v := rr.vals
	g := &Glonass{ID: rr.sat}
	g.Tb = Time(rr.epoch + int64(leapAtUTC(rr.epoch))*nsPerSecond)
	g.ClkBias, g.ClkRate = v[0][0], v[0][1]
	g.Pos = [3]float64{v[1][0] * 1e3, v[2][0] * 1e3, v[3][0] * 1e3}
	g.Vel = [3]float64{v[1][1] * 1e3, v[2][1] * 1e3, v[3][1] * 1e3}
	g.Acc = [3]float64{v[1][2] * 1e3, v[2][2] * 1e3, v[3][2] * 1e3}
	g.Health = int(v[1][3])
	g.FreqNum = int(v[2][3])
	g.Age = int(v[3][3])
	rad := norm(g.Pos)
	if rad < 1e7 || rad > 5e7 {
		return nil, r.errorf(rr.line, "%s record: position radius %.0f m is not a GLONASS orbit", rr.sat, rad)
	}
	return g, nil
}

func (n *Nav) index() {
	n.bySat = map[SatID][]Ephemeris{}
	for _, e := range n.Records {
		n.bySat[e.Sat()] = append(n.bySat[e.Sat()], e)
	}
	for _, l := range n.bySat {
		sort.SliceStable(l, func(i, j int) bool { return l[i].Ref() < l[j].Ref() })
	}
}

// Sats returns the satellites with at least one record, sorted.
func (n *Nav) Sats() []SatID {
	out := make([]SatID, 0, len(n.bySat))
	for s := range n.bySat {
		out = append(out, s)
	}
	sort.Slice(out, func(i, j int) bool { return out[i] < out[j] })
	return out
}

// RecordsOf returns the records of sat sorted by reference epoch.
func (n *Nav) RecordsOf(sat SatID) []Ephemeris { return n.bySat[sat] }

// SelectOptions controls ephemeris selection.
type SelectOptions struct {
	// KeepUnhealthy allows records whose health word is non-zero.
	KeepUnhealthy bool
	// GalileoMessage is the Galileo message kept: "INAV" (default) or
	// "FNAV"; the two carry different clock references and are never mixed.
	GalileoMessage string
	// Extend lets a record serve epochs up to Extend seconds beyond its fit
	// interval (default 0: strict), to bridge gaps of station-collected nav
	// files when metre accuracy is not needed. Accuracy then degrades with
	// the distance from the reference epoch: Keplerian records grow to tens
	// of metres within hours, GLONASS RK4 from the broadcast state faster
	// (the luni-solar accelerations are constant only over ±15 min).
	Extend float64
}

// halfFit returns the half-width of e's fit interval in seconds.
func halfFit(e Ephemeris) float64 {
	switch x := e.(type) {
	case *Kepler:
		return x.fitSeconds()
	case *Glonass:
		return glonassFit
	}
	return 0
}

// propagateUnchecked propagates e at t ignoring its fit interval.
func propagateUnchecked(e Ephemeris, t Time) (pos, vel [3]float64, err error) {
	switch x := e.(type) {
	case *Kepler:
		kk, err := x.ensure()
		if err != nil {
			return pos, vel, err
		}
		pos, vel = kk.posVel(t.Sub(x.Toe))
		return pos, vel, nil
	case *Glonass:
		pos, vel = x.integrate(t.Sub(x.Tb))
		return pos, vel, nil
	}
	return e.PosVel(t)
}

// Select returns the record of sat whose reference epoch is nearest to t
// among those whose fit interval covers t (widened by SelectOptions.Extend
// in SelectWith; the caller must then propagate beyond the fit interval
// itself — Nav.Orbit does) (healthy only unless
// keepUnhealthy; Galileo I/NAV only).
func (n *Nav) Select(sat SatID, t Time, keepUnhealthy bool) (Ephemeris, error) {
	return n.SelectWith(sat, t, SelectOptions{KeepUnhealthy: keepUnhealthy})
}

// SelectWith is Select with all options.
func (n *Nav) SelectWith(sat SatID, t Time, o SelectOptions) (Ephemeris, error) {
	recs := n.bySat[sat]
	if len(recs) == 0 {
		return nil, fmt.Errorf("orbits: %s: no ephemeris for %s", n.Name, sat)
	}
	gm := o.GalileoMessage
	if gm == "" {
		gm = "INAV"
	}
	var best Ephemeris
	bestD := math.Inf(1)
	unhealthy := 0
	// Records are sorted by Ref; a linear scan is fine for a day file
	// (≤ ~150 records per satellite).
	for _, e := range recs {
		if !e.Covers(t) && !(o.Extend > 0 && math.Abs(t.Sub(e.Ref())) <= halfFit(e)+o.Extend) {
			continue
		}
		if sat.System() == 'E' && e.Message() != gm {
			continue
		}
		if !o.KeepUnhealthy && !e.Healthy() {
			unhealthy++
			continue
		}
		if d := math.Abs(t.Sub(e.Ref())); d < bestD {
			best, bestD = e, d
		}
	}
	if best == nil {
		why := "no record's fit interval covers it"
		if unhealthy > 0 {
			why = fmt.Sprintf("the %d covering record(s) are unhealthy", unhealthy)
		}
		return nil, fmt.Errorf("orbits: %s: no valid ephemeris for %s at %v GPST: %s", n.Name, sat, t, why)
	}
	return best, nil
}

// Orbit returns a track of sat that selects the record per epoch with the
// given options; it satisfies Orbit and can be passed to NewGeometry.
func (n *Nav) Orbit(sat SatID, o SelectOptions) Orbit { return &navTrack{n: n, sat: sat, o: o} }

type navTrack struct {
	n   *Nav
	sat SatID
	o   SelectOptions
}

func (t *navTrack) Sat() SatID { return t.sat }

func (t *navTrack) PosVel(tm Time) (pos, vel [3]float64, err error) {
	e, err := t.n.SelectWith(t.sat, tm, t.o)
	if err != nil {
		return pos, vel, err
	}
	if !e.Covers(tm) { // selected through SelectOptions.Extend
		return propagateUnchecked(e, tm)
	}
	return e.PosVel(tm)
}

package score

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// A table is a CSV file read by header name, so column order does not
// matter. Lines starting with '#' are comments.
type table struct {
	name string         // file name for error messages
	col  map[string]int // header name → column index
	rows [][]string
	line []int // 1-based line of each row
}

func readTable(r io.Reader, name string, required ...string) (*table, error) {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = 0
	cr.TrimLeadingSpace = true
	hdr, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, fmt.Errorf("score: %s: empty file, want a header line", name)
	}
	if err != nil {
		return nil, fmt.Errorf("score: %s: %w", name, err)
	}
	t := &table{name: name, col: make(map[string]int, len(hdr))}
	for i, h := range hdr {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		if h == "" {
			continue
		}
		if _, dup := t.col[h]; dup {
			line, _ := cr.FieldPos(i)
			return nil, fmt.Errorf("score: %s:%d: column %q appears twice", name, line, h)
		}
		t.col[h] = i
	}
	for _, req := range required {
		if _, ok := t.col[req]; !ok {
			return nil, fmt.Errorf("score: %s:1: missing required column %q (header has %s)", name, req, strings.Join(hdr, ","))
		}
	}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("score: %s: %w", name, err)
		}
		line, _ := cr.FieldPos(0)
		t.rows = append(t.rows, rec)
		t.line = append(t.line, line)
	}
	return t, nil
}

// str returns the trimmed cell of row i in column col ("" if absent).
func (t *table) str(i int, col string) string {
	j, ok := t.col[col]
	if !ok || j >= len(t.rows[i]) {
		return ""
	}
	return strings.TrimSpace(t.rows[i][j])
}

// float parses a required finite number.
func (t *table) float(i int, col string) (float64, error) {
	s := t.str(i, col)
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("score: %s:%d: column %s: bad number %q", t.name, t.line[i], col, s)
	}
	return v, nil
}

// optFloat parses an optional number; an absent column or empty cell gives NaN.
func (t *table) optFloat(i int, col string) (float64, error) {
	if t.str(i, col) == "" {
		return math.NaN(), nil
	}
	return t.float(i, col)
}

// unknownFloat is optFloat that also reads "NaN" as unknown.
func (t *table) unknownFloat(i int, col string) (float64, error) {
	if strings.EqualFold(t.str(i, col), "nan") {
		return math.NaN(), nil
	}
	return t.optFloat(i, col)
}

// integer parses a required integer.
func (t *table) integer(i int, col string) (int, error) {
	s := t.str(i, col)
	v, err := strconv.Atoi(s)
	if err != nil {
		return 0, fmt.Errorf("score: %s:%d: column %s: bad integer %q", t.name, t.line[i], col, s)
	}
	return v, nil
}

// errorf reports a problem with row i.
func (t *table) errorf(i int, format string, a ...any) error {
	return fmt.Errorf("score: %s:%d: %s", t.name, t.line[i], fmt.Sprintf(format, a...))
}

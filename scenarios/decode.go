package scenarios

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// A Problem is one thing wrong with a scenario file.
type Problem struct {
	File  string // file name as given to Decode
	Line  int    // 1-based line, 0 if unknown
	Field string // dotted path of the field, e.g. "time.span", may be empty
	Msg   string
}

func (p Problem) String() string {
	var b strings.Builder
	b.WriteString(p.File)
	if p.Line > 0 {
		fmt.Fprintf(&b, ":%d", p.Line)
	}
	b.WriteString(": ")
	if p.Field != "" {
		b.WriteString(p.Field + ": ")
	}
	b.WriteString(p.Msg)
	return b.String()
}

// Problems is every problem found in one scenario file; it is the error
// Decode returns for a bad file.
type Problems []Problem

func (ps Problems) Error() string {
	lines := make([]string, len(ps))
	for i, p := range ps {
		lines[i] = p.String()
	}
	return strings.Join(lines, "\n")
}

// Load reads and decodes a scenario file.
func Load(path string) (*Scenario, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("scenarios: %w", err)
	}
	return Decode(path, data)
}

// maxScenarioBytes bounds the size of a scenario file.
const maxScenarioBytes = 16 << 20

// Decode decodes a scenario from YAML, strictly (unknown keys are errors),
// fills in the defaults and validates it. A bad file gives a Problems
// error listing every problem with its file:line, not only the first.
func Decode(file string, data []byte) (*Scenario, error) {
	if len(data) > maxScenarioBytes {
		return nil, Problems{{File: file, Msg: fmt.Sprintf("file is %d bytes, larger than the %d-byte limit", len(data), maxScenarioBytes)}}
	}
	var s Scenario
	ps, lines := decodeStrict(file, data, &s)
	if lines == nil {
		return nil, ps
	}
	s.applyDefaults()
	v := validator{file: file, lines: *lines}
	s.validate(&v)
	ps = append(ps, v.ps...)
	if len(ps) > 0 {
		sortProblems(ps)
		return &s, ps
	}
	return &s, nil
}

// decodeStrict decodes one YAML document into out with unknown keys as
// errors, collecting every decoding problem. A nil pathLines means the
// file could not be decoded at all.
func decodeStrict(file string, data []byte, out any) (Problems, *pathLines) {
	// First pass: the node tree, for the line of every field path.
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return Problems{syntaxProblem(file, err)}, nil
	}
	if root.Kind == 0 || len(root.Content) == 0 {
		return Problems{{File: file, Line: 1, Msg: "empty file: want a YAML mapping"}}, nil
	}
	lines := pathLines{byPath: map[string]int{}, byPos: map[[2]int]string{}}
	lines.walk(root.Content[0], "")

	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	var ps Problems
	err := dec.Decode(out)
	if err != nil && !errors.Is(err, io.EOF) {
		var te *yaml.TypeError
		if !errors.As(err, &te) {
			return Problems{syntaxProblem(file, err)}, nil
		}
		for _, msg := range te.Errors {
			ps = append(ps, lines.problem(file, msg))
		}
	}
	// A second document would be silently ignored: refuse it.
	var extra yaml.Node
	if err := dec.Decode(&extra); err == nil {
		ps = append(ps, Problem{File: file, Line: extra.Line, Msg: "more than one YAML document; a file holds exactly one"})
	}
	return ps, &lines
}

func sortProblems(ps Problems) {
	sort.SliceStable(ps, func(i, j int) bool { return ps[i].Line < ps[j].Line })
}

var lineRE = regexp.MustCompile(`^(?:yaml: )?line (\d+)(?: column (\d+))?: (.*)$`)

func syntaxProblem(file string, err error) Problem {
	msg := err.Error()
	if m := lineRE.FindStringSubmatch(msg); m != nil {
		n, _ := strconv.Atoi(m[1])
		return Problem{File: file, Line: n, Msg: "YAML syntax: " + m[3]}
	}
	return Problem{File: file, Msg: "YAML syntax: " + strings.TrimPrefix(msg, "yaml: ")}
}

// pathLines maps field paths to the lines they appear on, and value
// positions back to field paths.
type pathLines struct {
	byPath map[string]int
	byPos  map[[2]int]string
}

func (pl *pathLines) walk(n *yaml.Node, path string) {
	switch n.Kind {
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			p := k.Value
			if path != "" {
				p = path + "." + k.Value
			}
			pl.byPath[p] = k.Line
			pl.byPos[[2]int{v.Line, v.Column}] = p
			pl.walk(v, p)
		}
	case yaml.SequenceNode:
		for i, c := range n.Content {
			p := fmt.Sprintf("%s[%d]", path, i)
			pl.byPath[p] = c.Line
			pl.byPos[[2]int{c.Line, c.Column}] = p
			pl.walk(c, p)
		}
	}
}

// line returns the line of path, or of its nearest given parent.
func (pl *pathLines) line(path string) int {
	for p := path; p != ""; {
		if l, ok := pl.byPath[p]; ok {
			return l
		}
		i := strings.LastIndexAny(p, ".[")
		if i < 0 {
			break
		}
		p = p[:i]
	}
	return 0
}

var posRE = regexp.MustCompile(`^line (\d+)(?: column (\d+))?: (.*)$`)
var unknownFieldRE = regexp.MustCompile(`field (\S+) not found in type scenarios\.(\w+)`)
var yamlTypeRE = regexp.MustCompile(`cannot unmarshal !!(\w+) ` + "`" + `?([^` + "`" + `]*)` + "`" + `? into (\S+)`)

// problem turns one yaml.TypeError message into a Problem.
func (pl *pathLines) problem(file, msg string) Problem {
	p := Problem{File: file, Msg: msg}
	m := posRE.FindStringSubmatch(msg)
	if m == nil {
		return p
	}
	p.Line, _ = strconv.Atoi(m[1])
	p.Msg = m[3]
	if m[2] != "" {
		col, _ := strconv.Atoi(m[2])
		p.Field = pl.byPos[[2]int{p.Line, col}]
	}
	if u := unknownFieldRE.FindStringSubmatch(p.Msg); u != nil {
		p.Msg = fmt.Sprintf("unknown key %q (not a field of %s)", u[1], sectionName(u[2]))
		for path, l := range pl.byPath {
			if l == p.Line && (path == u[1] || strings.HasSuffix(path, "."+u[1])) {
				p.Field = path
				break
			}
		}
	} else if t := yamlTypeRE.FindStringSubmatch(p.Msg); t != nil {
		p.Msg = fmt.Sprintf("cannot use %s %q here: want %s", t[1], t[2], goTypeName(t[3]))
		// Find the field on that line.
		for pos, path := range pl.byPos {
			if pos[0] == p.Line && pl.byPath[path] == p.Line {
				p.Field = path
				break
			}
		}
	}
	return p
}

func sectionName(goType string) string {
	switch goType {
	case "Scenario":
		return "the scenario"
	case "TimeSection":
		return "time"
	}
	return strings.ToLower(goType)
}

func goTypeName(t string) string {
	switch {
	case strings.HasPrefix(t, "int"), strings.HasPrefix(t, "uint"):
		return "an integer"
	case strings.HasPrefix(t, "float"):
		return "a number"
	case t == "bool":
		return "true or false"
	case t == "string":
		return "a string"
	case strings.HasPrefix(t, "[]"):
		return "a list"
	}
	return "a " + strings.TrimPrefix(t, "scenarios.")
}

// given reports whether path appears in the file (even with a bad value).
func (v *validator) given(path string) bool {
	_, ok := v.lines.byPath[path]
	return ok
}

// validator collects problems with the lines of their fields.
type validator struct {
	file  string
	lines pathLines
	ps    Problems
}

func (v *validator) add(path string, format string, a ...any) {
	v.ps = append(v.ps, Problem{File: v.file, Line: v.lines.line(path), Field: path, Msg: fmt.Sprintf(format, a...)})
}

// addAt is add for a quantity whose own line is known.
func (v *validator) addAt(path string, line int, format string, a ...any) {
	if line == 0 {
		line = v.lines.line(path)
	}
	v.ps = append(v.ps, Problem{File: v.file, Line: line, Field: path, Msg: fmt.Sprintf(format, a...)})
}

func (v *validator) positive(path string, q quantity, d Dimension) {
	if q.set && !(q.si > 0) {
		v.addAt(path, q.line, "must be positive, got %s", showQ(q, d))
	}
}

func (v *validator) nonNegative(path string, q quantity, d Dimension) {
	if q.set && q.si < 0 {
		v.addAt(path, q.line, "must not be negative, got %s", showQ(q, d))
	}
}

func (v *validator) finite(path string, x float64) bool {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		v.add(path, "must be a finite number, got %v", x)
		return false
	}
	return true
}

func showQ(q quantity, d Dimension) string {
	if q.text != "" {
		return strconv.Quote(q.text)
	}
	return FormatQuantity(q.si, d)
}

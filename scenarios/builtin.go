package scenarios

import (
	"embed"
	"fmt"
	"path"
	"sort"
	"strings"
)

//go:embed builtin/*.yaml
var builtinFS embed.FS

// Builtin is one scenario shipped inside the binary.
type Builtin struct {
	Name        string
	Description string
	Source      []byte // the YAML text
}

// Builtins returns the built-in scenarios sorted by name.
func Builtins() ([]Builtin, error) {
	ents, err := builtinFS.ReadDir("builtin")
	if err != nil {
		return nil, fmt.Errorf("scenarios: %w", err)
	}
	var out []Builtin
	for _, e := range ents {
		if !strings.HasSuffix(e.Name(), ".yaml") {
			continue
		}
		data, err := builtinFS.ReadFile(path.Join("builtin", e.Name()))
		if err != nil {
			return nil, fmt.Errorf("scenarios: %w", err)
		}
		s, err := Decode(e.Name(), data)
		if err != nil {
			return nil, fmt.Errorf("scenarios: built-in %s is invalid: %w", e.Name(), err)
		}
		out = append(out, Builtin{Name: s.Name, Description: s.Description, Source: data})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out, nil
}

// BuiltinSource returns the YAML text of the built-in scenario name.
func BuiltinSource(name string) ([]byte, error) {
	bs, err := Builtins()
	if err != nil {
		return nil, err
	}
	var names []string
	for _, b := range bs {
		if b.Name == name {
			return b.Source, nil
		}
		names = append(names, b.Name)
	}
	return nil, fmt.Errorf("scenarios: no built-in scenario %q (built-in: %s)", name, strings.Join(names, ", "))
}

// Resolve loads a scenario given either the name of a built-in scenario or
// the path of a YAML file. A name containing a path separator or ending in
// .yaml/.yml is always taken as a file.
func Resolve(nameOrPath string) (*Scenario, error) {
	if !strings.ContainsAny(nameOrPath, `/\`) && !strings.HasSuffix(nameOrPath, ".yaml") && !strings.HasSuffix(nameOrPath, ".yml") {
		src, err := BuiltinSource(nameOrPath)
		if err != nil {
			return nil, err
		}
		return Decode("builtin:"+nameOrPath, src)
	}
	return Load(nameOrPath)
}

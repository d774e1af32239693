// Package buildinfo describes the running wallcross binary (module version
// and VCS revision) for the version command and for dataset manifests.
package buildinfo

import (
	"fmt"
	"runtime/debug"
)

// Info is what the build information says about the binary.
type Info struct {
	Version  string // module version, "(devel)" for a work-tree build
	Revision string // VCS revision, "unknown" when not recorded
	Time     string // VCS commit time (RFC 3339), may be empty
	Modified bool   // the work tree had uncommitted changes
	Go       string // Go toolchain version
}

// Read returns the build information of the running binary.
func Read() Info {
	info := Info{Version: "(devel)", Revision: "unknown"}
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return info
	}
	if bi.Main.Version != "" {
		info.Version = bi.Main.Version
	}
	info.Go = bi.GoVersion
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			info.Revision = s.Value
		case "vcs.time":
			info.Time = s.Value
		case "vcs.modified":
			info.Modified = s.Value == "true"
		}
	}
	return info
}

// String is the one-line form printed by "wallcross version", e.g.
// "wallcross (devel) revision 0ba3fb9…+dirty (2026-12-01T22:20:00Z) go1.26.8".
func (i Info) String() string {
	dirty := ""
	if i.Modified {
		dirty = "+dirty"
	}
	s := fmt.Sprintf("wallcross %s revision %s%s", i.Version, i.Revision, dirty)
	if i.Time != "" {
		s += " (" + i.Time + ")"
	}
	if i.Go != "" {
		s += " " + i.Go
	}
	return s
}

// Short is the version and revision without the Go version, for manifests.
func (i Info) Short() string {
	dirty := ""
	if i.Modified {
		dirty = "+dirty"
	}
	return i.Version + " " + i.Revision + dirty
}

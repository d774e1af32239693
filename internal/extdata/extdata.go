// Package extdata locates the external reference data (real IGS broadcast,
// precise orbit and clock files) that tests check against.
//
// The data live in ../shared/extdata relative to the repository root, or in
// the directory named by $WALLCROSS_EXTDATA. Outside CI a test that needs
// them is skipped with a message when they are absent; with CI=true their
// absence fails the test.
package extdata

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// Dir returns the external-data directory, skipping (or, in CI, failing) t
// when it cannot be found.
func Dir(t testing.TB) string {
	t.Helper()
	if d := os.Getenv("WALLCROSS_EXTDATA"); d != "" {
		if st, err := os.Stat(d); err == nil && st.IsDir() {
			return d
		}
		missing(t, d)
		return ""
	}
	_, file, _, ok := runtime.Caller(0)
	if ok {
		// internal/extdata/extdata.go → repository root is two levels up.
		root := filepath.Dir(filepath.Dir(filepath.Dir(file)))
		d := filepath.Join(root, "..", "shared", "extdata")
		if st, err := os.Stat(d); err == nil && st.IsDir() {
			return d
		}
		missing(t, d)
		return ""
	}
	missing(t, "../shared/extdata")
	return ""
}

// Path returns the path of a file inside the external-data directory,
// skipping (or failing in CI) when the file is missing.
func Path(t testing.TB, rel string) string {
	t.Helper()
	p := filepath.Join(Dir(t), rel)
	if _, err := os.Stat(p); err != nil {
		missing(t, p)
	}
	return p
}

func missing(t testing.TB, where string) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("external data not found at %s (set WALLCROSS_EXTDATA); required when CI=true", where)
	}
	t.Skipf("external data not found at %s (set WALLCROSS_EXTDATA); skipping", where)
}

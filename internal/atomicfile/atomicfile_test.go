package atomicfile

import (
	"bufio"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

func TestWriteAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	// sha256("hello\n") = 5891b5b5...be03 (coreutils sha256sum).
	sum, err := WriteBytes(p, []byte("hello\n"))
	if err != nil || sum != "5891b5b522d5df086d0ff0b110fbd9d21bb4fc7163af34d08286a2e846f6be03" {
		t.Fatalf("sum %s, err %v", sum, err)
	}
	// A failing fill leaves the old file and no temporary behind.
	_, _, err = Write(p, func(w *bufio.Writer) error {
		w.Write([]byte("partial"))
		return errors.New("disk on fire")
	})
	if err == nil {
		t.Fatal("want an error")
	}
	b, _ := os.ReadFile(p)
	if string(b) != "hello\n" {
		t.Errorf("file now %q", b)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("%d entries left in the directory, want 1", len(ents))
	}
	if st, err := os.Stat(p); err != nil || st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644 (%v)", st.Mode().Perm(), err)
	}
	if s2, _ := SumFile(p); s2 != sum {
		t.Errorf("SumFile %s != %s", s2, sum)
	}
}

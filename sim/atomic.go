package sim

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"hash"
	"io"
	"os"
	"path/filepath"
)

// FileSum is the size and SHA-256 checksum of one written file.
type FileSum struct {
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// countHash counts and hashes everything written through it.
type countHash struct {
	h hash.Hash
	n int64
}

func (c *countHash) Write(p []byte) (int, error) {
	c.n += int64(len(p))
	return c.h.Write(p)
}

// writeAtomic writes path through fill: the bytes go to a temporary file in
// the same directory, which is renamed onto path only when fill, the flush
// and the close all succeed. On any failure the temporary file is removed
// and path is left as it was. It returns the size and SHA-256 of the bytes.
func writeAtomic(path string, fill func(w *bufio.Writer) error) (sum FileSum, err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp*")
	if err != nil {
		return sum, fmt.Errorf("sim: could not create %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	ch := &countHash{h: sha256.New()}
	w := bufio.NewWriterSize(io.MultiWriter(f, ch), 1<<16)
	if err = fill(w); err != nil {
		return sum, fmt.Errorf("sim: could not write %s: %w", path, err)
	}
	if err = w.Flush(); err != nil {
		return sum, fmt.Errorf("sim: could not write %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return sum, fmt.Errorf("sim: could not write %s: %w", path, err)
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return sum, fmt.Errorf("sim: could not write %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return sum, fmt.Errorf("sim: could not write %s: %w", path, err)
	}
	return FileSum{Bytes: ch.n, SHA256: hex.EncodeToString(ch.h.Sum(nil))}, nil
}

// fileSum returns the size and SHA-256 of the file at path.
func fileSum(path string) (FileSum, error) {
	f, err := os.Open(path)
	if err != nil {
		return FileSum{}, err
	}
	defer f.Close()
	ch := &countHash{h: sha256.New()}
	if _, err := io.Copy(ch, f); err != nil {
		return FileSum{}, err
	}
	return FileSum{Bytes: ch.n, SHA256: hex.EncodeToString(ch.h.Sum(nil))}, nil
}

// Package atomicfile writes files so that they appear whole or not at all:
// the bytes go to a temporary file in the same directory, which is renamed
// onto the target only when writing, flushing and closing all succeeded.
package atomicfile

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Write writes path through fill and returns the SHA-256 (hex) and size
// of what was written. The file gets mode 0644. On any failure nothing is
// left behind and an existing file at path is untouched.
func Write(path string, fill func(w *bufio.Writer) error) (sum string, n int64, err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp*")
	if err != nil {
		return "", 0, fmt.Errorf("could not create %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	h := sha256.New()
	cw := &counter{w: io.MultiWriter(f, h)}
	bw := bufio.NewWriterSize(cw, 1<<16)
	if err = fill(bw); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return "", 0, fmt.Errorf("could not write %s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), cw.n, nil
}

// WriteBytes writes data to path atomically.
func WriteBytes(path string, data []byte) (sum string, err error) {
	sum, _, err = Write(path, func(w *bufio.Writer) error {
		_, err := w.Write(data)
		return err
	})
	return sum, err
}

// SumFile returns the SHA-256 (hex) of the file at path.
func SumFile(path string) (string, error) {
	sum, _, err := Sum(path)
	return sum, err
}

// Sum returns the SHA-256 (hex) and size of the file at path.
func Sum(path string) (sum string, n int64, err error) {
	f, err := os.Open(path)
	if err != nil {
		return "", 0, err
	}
	defer f.Close()
	h := sha256.New()
	if n, err = io.Copy(h, f); err != nil {
		return "", 0, err
	}
	return hex.EncodeToString(h.Sum(nil)), n, nil
}

type counter struct {
	w io.Writer
	n int64
}

func (c *counter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += int64(n)
	return n, err
}

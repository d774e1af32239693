package sim

import (
	"bufio"
	"fmt"

	"wallcross/internal/atomicfile"
)

// FileSum is the size and SHA-256 checksum of one written file.
type FileSum struct {
	Bytes  int64  `json:"bytes"`
	SHA256 string `json:"sha256"`
}

// writeAtomic writes path through fill: the bytes go to a temporary file in
// the same directory, which is renamed onto path only when fill, the flush
// and the close all succeed. On any failure the temporary file is removed
// and path is left as it was. It returns the size and SHA-256 of the bytes.
func writeAtomic(path string, fill func(w *bufio.Writer) error) (FileSum, error) {
	sum, n, err := atomicfile.Write(path, fill)
	if err != nil {
		return FileSum{}, fmt.Errorf("sim: %w", err)
	}
	return FileSum{Bytes: n, SHA256: sum}, nil
}

// fileSum returns the size and SHA-256 of the file at path.
func fileSum(path string) (FileSum, error) {
	sum, n, err := atomicfile.Sum(path)
	if err != nil {
		return FileSum{}, err
	}
	return FileSum{Bytes: n, SHA256: sum}, nil
}

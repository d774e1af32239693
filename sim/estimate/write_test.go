package estimate

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

func TestWriteLinksCSV(t *testing.T) {
	dir := t.TempDir()
	links := []LinkRecord{
		{T: 1830, Station: "STAA", Satellite: "G01", ElevationDeg: 42.5, CosIncidence: -0.3, Delay: 1.25e-18},
		{T: 1860, Station: "STAB", Satellite: "G02", ElevationDeg: 12.125, CosIncidence: 0.99, Delay: -3e-21},
	}
	p := filepath.Join(dir, "links.csv")
	sum, err := WriteLinksCSV(p, links)
	if err != nil {
		t.Fatal(err)
	}
	rows := readCSV(t, p)
	if len(rows) != 3 || len(rows[0]) != 6 || rows[0][0] != "t_s" || rows[0][5] != "delay_s" {
		t.Fatalf("unexpected table %v", rows)
	}
	for i, l := range links {
		r := rows[i+1]
		d, _ := strconv.ParseFloat(r[5], 64)
		c, _ := strconv.ParseFloat(r[4], 64)
		if r[1] != l.Station || r[2] != l.Satellite || d != l.Delay || c != l.CosIncidence {
			t.Errorf("row %d = %v, want %+v", i, r, l)
		}
	}
	if fi, _ := os.Stat(p); fi.Size() != sum.Bytes || len(sum.SHA256) != 64 {
		t.Errorf("checksum record %+v for a %d-byte file", sum, fi.Size())
	}
	pd := filepath.Join(dir, "links-detail.csv")
	links[0].Bending, links[0].Direction = -2e-40, 3e-30
	if _, err := WriteLinksDetailCSV(pd, links); err != nil {
		t.Fatal(err)
	}
	if rd := readCSV(t, pd); len(rd[0]) != 8 || rd[0][6] != "bending_s" || rd[1][6] != "-2e-40" || rd[1][7] != "3e-30" {
		t.Errorf("detail table %v", rd)
	}
	os.Remove(pd)
	// A bad name fails and leaves neither the file nor a temporary behind.
	q := filepath.Join(dir, "bad.csv")
	if _, err := WriteLinksCSV(q, []LinkRecord{{Station: "A,B", Satellite: "G01"}}); err == nil {
		t.Error("station name with a comma accepted")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("directory holds %d entries after a failed write, want 1", len(ents))
	}
}

func TestWriteEstimatedCSV(t *testing.T) {
	sol := &Solution{Interval: 30, Epochs: 2, Clocks: []string{"G01", "STAA"}, Reference: "STAA",
		Bias: []float64{1.5e-4, 0, math.NaN(), 0}}
	p := filepath.Join(t.TempDir(), "estimated.csv")
	if _, err := WriteEstimatedCSV(p, sol, []string{"STAA", "G01"}); err != nil {
		t.Fatal(err)
	}
	rows := readCSV(t, p)
	want := [][]string{{"t_s", "STAA", "G01"}, {"0", "0", "0.00015"}, {"30", "0", ""}}
	for i := range want {
		for j := range want[i] {
			if rows[i][j] != want[i][j] {
				t.Errorf("cell %d,%d = %q, want %q", i, j, rows[i][j], want[i][j])
			}
		}
	}
	if _, err := WriteEstimatedCSV(p, sol, []string{"G02"}); err == nil {
		t.Error("unknown clock column accepted")
	}
}

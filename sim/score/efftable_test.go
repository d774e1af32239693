package score

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"
)

func TestEfficiencyRoundTrip(t *testing.T) {
	a, _ := NewEffRow(1e6, 3e5, 1e12, 2.5e-10, 10, 3)
	b, _ := NewEffRow(1e7, math.NaN(), 3e11, math.NaN(), 0, 0)
	var buf bytes.Buffer
	if err := WriteEfficiency(&buf, []EffRow{a, b}); err != nil {
		t.Fatal(err)
	}
	want := "thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found,eff,wilson_low,wilson_high,cp_low,cp_high\n" +
		"1e+06,300000,1e+12,2.5e-10,10,3,0.300000,0.107791,0.603222,0.066740,0.652453\n" + // 3/10: intervals.py gives Wilson [0.1077913, 0.6032219], CP [0.0667395, 0.6524529]
		"1e+07,,3e+11,,0,0,,0.000000,1.000000,0.000000,1.000000\n"
	if buf.String() != want {
		t.Errorf("written:\n%s\nwant:\n%s", buf.String(), want)
	}
	rows, err := ReadEfficiency(strings.NewReader(buf.String()), "eff.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].Found != 3 || rows[0].CP != a.CP || !math.IsNaN(rows[1].Speed) || !math.IsNaN(rows[1].Eff) {
		t.Errorf("read back %+v", rows)
	}
}

// TestEfficiencyRecompute: written interval columns are not trusted, and
// column order does not matter.
func TestEfficiencyRecompute(t *testing.T) {
	in := "found,n,lambda_eff_gev,thickness_m,cp_low,cp_high\n5,10,1e12,1e6,0.9,0.95\n"
	rows, err := ReadEfficiency(strings.NewReader(in), "e.csv")
	if err != nil {
		t.Fatal(err)
	}
	cp, _ := ClopperPearson(5, 10, EfficiencyCL)
	if rows[0].CP != cp || !math.IsNaN(rows[0].Speed) || !math.IsNaN(rows[0].Step) {
		t.Errorf("row %+v, want CP %v", rows[0], cp)
	}
}

// TestMergePools: pooled counts, intervals from the pooled counts (not an
// average of the per-table intervals), N-weighted steps.
func TestMergePools(t *testing.T) {
	a1, _ := NewEffRow(1e6, 3e5, 1e12, 1e-10, 10, 3)
	a2, _ := NewEffRow(1e6, 3e5, 1e12, 4e-10, 30, 4)
	b, _ := NewEffRow(1e6, 2e5, 1e12, math.NaN(), 5, 5)
	c, _ := NewEffRow(1e5, math.NaN(), 1e12, math.NaN(), 5, 1)
	m, err := MergeEfficiency([]EffRow{a1, b}, []EffRow{c, a2})
	if err != nil {
		t.Fatal(err)
	}
	if len(m) != 3 {
		t.Fatalf("%d rows, want 3: %+v", len(m), m)
	}
	// Sorted: d = 1e5 first, then d = 1e6 at 2e5 m/s, then 3e5 m/s.
	if m[0].Thickness != 1e5 || m[1].Speed != 2e5 || m[2].Speed != 3e5 {
		t.Errorf("order %+v", m)
	}
	p := m[2]
	cp, _ := ClopperPearson(7, 40, EfficiencyCL)
	w, _ := Wilson(7, 40, EfficiencyCL)
	if p.N != 40 || p.Found != 7 || p.CP != cp || p.Wilson != w || p.Eff != 7.0/40 {
		t.Errorf("pooled %+v, want 7/40 with CP %v", p, cp)
	}
	if math.Abs(p.Step-(1e-10*10+4e-10*30)/40) > 1e-22 {
		t.Errorf("pooled step %g, want 3.25e-10", p.Step)
	}
	if _, err := MergeEfficiency([]EffRow{{Thickness: 1, LambdaEff: 1, N: 2, Found: 3}}); err == nil {
		t.Error("found > n merged")
	}
}

func TestReadEfficiencyErrors(t *testing.T) {
	hdr := "thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found\n"
	for _, c := range []struct{ in, want string }{
		{"", "empty file"},
		{"thickness_m,lambda_eff_gev,found\n1,2,1\n", `e.csv:1: missing required column "n"`},
		{hdr + "1e6,3e5,1e12,,10,11\n", "e.csv:2: columns n,found: need 0 ≤ found ≤ n, got found=11 n=10"},
		{hdr + "1e6,3e5,1e12,,ten,1\n", `e.csv:2: column n: bad integer "ten"`},
		{hdr + "1e6,3e5,abc,,10,1\n", `e.csv:2: column lambda_eff_gev: bad number "abc"`},
		{hdr + "-1e6,3e5,1e12,,10,1\n", "e.csv:2: thickness -1e+06 m"},
		{hdr + "1e6,3e5,1e12,,10,1\n1e6,3e5,1e12,,5,1\n", "e.csv:3: cell thickness=1e+06 m speed=300000 lambda_eff=1e+12 GeV repeats line 2"},
		{hdr + "1e6,3e5,1e12,,10\n", "wrong number of fields"},
		{hdr + "1e6,NaN,1e12,,10,1\n", `column speed_m_s: bad number "NaN"`},
	} {
		_, err := ReadEfficiency(strings.NewReader(c.in), "e.csv")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: err = %v, want %q", c.in, err, c.want)
		}
	}
}

func TestEfficiencyUnknownLambda(t *testing.T) {
	rows, err := ReadEfficiency(strings.NewReader("thickness_m,n,found\n1e6,10,2\n"), "e.csv")
	if err != nil || len(rows) != 1 || !math.IsNaN(rows[0].LambdaEff) {
		t.Fatalf("rows %+v, err %v", rows, err)
	}
	if _, err := Reach(rows, ReachOptions{MeanIntervals: []float64{1}, Span: 10}); err == nil || !strings.Contains(err.Error(), "needs a positive Λ_eff") {
		t.Errorf("reach without Λ_eff: %v", err)
	}
}

// TestEfficiencyStepGrid: a table whose grid is in the step (no Λ_eff)
// keeps one cell per step when read and merged.
func TestEfficiencyStepGrid(t *testing.T) {
	in := "thickness_m,speed_m_s,step_s,n,found\n1e6,3e5,1e-11,20,2\n1e6,3e5,2e-11,20,9\n1e6,3e5,4e-11,20,18\n"
	rows, err := ReadEfficiency(strings.NewReader(in), "e.csv")
	if err != nil {
		t.Fatal(err)
	}
	m, err := MergeEfficiency(rows, rows)
	if err != nil {
		t.Fatal(err)
	}
	if len(m) != 3 || m[0].Step != 1e-11 || m[0].N != 40 || m[2].Step != 4e-11 || m[2].Found != 36 {
		t.Errorf("merged %+v", m)
	}
	if _, err := ReadEfficiency(strings.NewReader(in+"1e6,3e5,2e-11,5,1\n"), "e.csv"); err == nil || !strings.Contains(err.Error(), "e.csv:5:") {
		t.Errorf("duplicate step cell: %v", err)
	}
	if fits := FitByThickness(m, 0.6827); len(fits) != 1 {
		t.Errorf("%d fits, want 1", len(fits))
	}
}

func ExampleMergeEfficiency() {
	shard1, _ := NewEffRow(1e7, 3e5, 1e12, 2e-10, 50, 20)
	shard2, _ := NewEffRow(1e7, 3e5, 1e12, 2e-10, 50, 25)
	m, _ := MergeEfficiency([]EffRow{shard1}, []EffRow{shard2})
	r := m[0]
	fmt.Printf("d = %g km: %d of %d found, efficiency %.2f, Clopper–Pearson [%.3f, %.3f]\n",
		r.Thickness/1e3, r.Found, r.N, r.Eff, r.CP.Low, r.CP.High)
	// Output: d = 10000 km: 45 of 100 found, efficiency 0.45, Clopper–Pearson [0.350, 0.553]
}

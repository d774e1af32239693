package score

import (
	"math"
	"strings"
	"testing"
)

func TestReadCandidates(t *testing.T) {
	in := "# comment\nstat, t0_s ,nx,ny,nz,thickness_m,extra\n5,100,0,0,2,,x\n7.5,200,,,,1e6,y\n"
	c, err := ReadCandidates(strings.NewReader(in), "c.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(c) != 2 || c[0].Line != 3 || c[0].T0 != 100 || c[0].Stat != 5 || !c[0].HasN || c[0].N != [3]float64{0, 0, 1} ||
		c[1].HasN || c[1].Thick != 1e6 || !math.IsNaN(c[1].Speed) || !math.IsNaN(c[0].Thick) {
		t.Errorf("read %+v", c)
	}
}

func TestReadCandidatesErrors(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"", "c.csv: empty file"},
		{"t0_s\n1\n", `c.csv:1: missing required column "stat"`},
		{"t0_s,stat\n1,2\n3,abc\n", `c.csv:3: column stat: bad number "abc"`},
		{"t0_s,stat\n1,2\n,2\n", `c.csv:3: column t0_s: bad number ""`},
		{"t0_s,stat\nInf,2\n", `c.csv:2: column t0_s: bad number "Inf"`},
		{"t0_s,stat,nx,ny,nz\n1,2,1,,0\n", "c.csv:2: columns nx,ny,nz: give all three direction components or none"},
		{"t0_s,stat,nx,ny,nz\n1,2,0,0,0\n", "c.csv:2: columns nx,ny,nz: direction (0, 0, 0) has length 0"},
		{"t0_s,stat,speed_m_s\n1,2,-5\n", "c.csv:2: column speed_m_s: speed -5 m/s must be positive"},
		{"t0_s,stat,thickness_m\n1,2,0\n", "c.csv:2: column thickness_m: thickness 0 m must be positive"},
		{"t0_s,stat,t0_s\n1,2,3\n", `c.csv:1: column "t0_s" appears twice`},
		{"t0_s,stat\n1,2,3\n", "c.csv: record on line 2: wrong number of fields"},
		{"t0_s,stat\n1,\"2\n", "c.csv"},
	} {
		_, err := ReadCandidates(strings.NewReader(c.in), "c.csv")
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.HasPrefix(err.Error(), "score: ") {
			t.Errorf("%q: err = %v, want %q", c.in, err, c.want)
		}
	}
}

func FuzzReadCandidates(f *testing.F) {
	f.Add("t0_s,stat\n1,2\n")
	f.Add("t0_s,stat,nx,ny,nz,speed_m_s,thickness_m\n1,2,1,0,0,3e5,1e6\n")
	f.Add("stat,t0_s\n\"1\",2\n")
	f.Fuzz(func(t *testing.T, in string) {
		c, err := ReadCandidates(strings.NewReader(in), "f.csv")
		if err != nil {
			return
		}
		for _, x := range c {
			if math.IsNaN(x.T0) || math.IsNaN(x.Stat) {
				t.Fatalf("NaN accepted: %+v", x)
			}
			if x.HasN && math.Abs(x.N[0]*x.N[0]+x.N[1]*x.N[1]+x.N[2]*x.N[2]-1) > 1e-9 {
				t.Fatalf("direction not unit: %+v", x)
			}
		}
	})
}

func FuzzReadEfficiency(f *testing.F) {
	f.Add("thickness_m,speed_m_s,lambda_eff_gev,step_s,n,found\n1e6,3e5,1e12,,10,3\n")
	f.Add("thickness_m,lambda_eff_gev,n,found\n1,1,0,0\n")
	f.Fuzz(func(t *testing.T, in string) {
		rows, err := ReadEfficiency(strings.NewReader(in), "f.csv")
		if err != nil {
			return
		}
		for _, r := range rows {
			if r.Found > r.N || r.CP.Low > r.CP.High || r.Wilson.Low > r.Wilson.High {
				t.Fatalf("bad row %+v", r)
			}
		}
		if _, err := MergeEfficiency(rows, rows); err != nil {
			t.Fatal(err)
		}
		known := len(rows) > 0
		for _, r := range rows {
			known = known && r.LambdaEff > 0
		}
		if _, err := Reach(rows, ReachOptions{MeanIntervals: []float64{1}, Span: 10}); err != nil && known {
			t.Fatal(err)
		}
	})
}

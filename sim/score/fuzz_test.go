package score

import (
	"math"
	"os"
	"strings"
	"testing"
)

// FuzzReadTruth feeds arbitrary events.csv, crossings.csv and clocks.csv
// contents to the readers behind ReadTruth and scores a fixed candidate list against what it
// accepts: no input may panic.
func FuzzReadTruth(f *testing.F) {
	ev, _ := os.ReadFile("testdata/ds1/events.csv")
	cr, _ := os.ReadFile("testdata/ds1/crossings.csv")
	f.Add(string(ev), string(cr), "t_s,A,B\n0,1,\n30,,2\n60,1,1\n")
	f.Add("event,t0_s,nx,ny,nz,speed_m_s,thickness_m,lambda_eff_gev\n0,10,1,0,0,3e5,1e6,1e12\n", "", "t_s\n0\n")
	f.Fuzz(func(t *testing.T, events, crossings, clocks string) {
		tr, err := truthFrom(events, crossings, clocks)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "score: ") {
				t.Fatalf("error without package prefix: %v", err)
			}
			return
		}
		cands := []Candidate{{Line: 2, T0: 10, Stat: 1, Speed: math.NaN(), Thick: math.NaN()}}
		r, err := Score(tr, cands, Options{})
		if err != nil {
			return
		}
		if r.Found+r.Missed != r.Usable || r.Usable+r.InGap != r.Events {
			t.Fatalf("inconsistent counts %+v", r)
		}
	})
}

// FuzzScore scores arbitrary candidate files against ds1 and checks the
// bookkeeping identities.
func FuzzScore(f *testing.F) {
	c, _ := os.ReadFile("testdata/candidates1.csv")
	f.Add(string(c), 3.0, 30.0)
	f.Add("t0_s,stat\n5000,1\n5000,1\n", 0.0, 0.0)
	tr, err := ReadTruth("testdata/ds1")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, in string, thr, tolDeg float64) {
		cands, err := ReadCandidates(strings.NewReader(in), "f.csv")
		if err != nil {
			return
		}
		r, err := Score(tr, cands, Options{Threshold: thr, HasThreshold: true, DirectionTol: tolDeg * math.Pi / 180})
		if err != nil {
			return
		}
		matched := 0
		for _, m := range r.Matches {
			if m.Event != "" && m.Candidate > 0 {
				matched++
			}
		}
		if r.Found+r.Missed != r.Usable || matched+len(r.Matches)-r.Events != len(cands) || r.False > r.Counted {
			t.Fatalf("inconsistent: %+v", r)
		}
	})
}

// truthFrom is ReadTruth on in-memory files (no stations or orbits).
func truthFrom(events, crossings, clocks string) (*Truth, error) {
	tr := &Truth{}
	t, err := readTable(strings.NewReader(events), "events.csv", eventColumns...)
	if err != nil {
		return nil, err
	}
	if err := tr.eventsFrom(t); err != nil {
		return nil, err
	}
	if t, err = readTable(strings.NewReader(crossings), "crossings.csv", crossingColumns...); err == nil {
		if err := tr.crossingsFrom(t); err != nil {
			return nil, err
		}
	}
	if err := tr.clocksFrom(strings.NewReader(clocks), "clocks.csv"); err != nil {
		return nil, err
	}
	tr.RMax, tr.RMaxSource = fallbackRMax, "fallback"
	return tr, nil
}

func FuzzSP3Radius(f *testing.F) {
	b, _ := os.ReadFile("testdata/ds1/orbits.sp3")
	f.Add(string(b))
	f.Add("PG01 1 2\n")
	f.Fuzz(func(t *testing.T, in string) {
		r, err := sp3MaxRadius(strings.NewReader(in), "o.sp3")
		if err == nil && (r < 0 || math.IsNaN(r)) {
			t.Fatalf("radius %g", r)
		}
	})
}

package orbits

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// CompareOptions controls Compare.
type CompareOptions struct {
	// Systems lists the system letters compared (e.g. "GER"); empty means
	// every system the nav file holds.
	Systems string
	// Select controls ephemeris selection (health, Galileo message).
	Select SelectOptions
	// From and To limit the precise epochs compared (zero = no limit).
	From, To Time
}

// OrbitStats summarises broadcast-minus-precise differences for one
// satellite or one system. Lengths in metres, clocks in seconds.
type OrbitStats struct {
	Name     string // satellite id or system letter
	N        int    // satellite-epochs with both positions
	RMS3D    float64
	RMSR     float64 // radial
	RMSA     float64 // along-track
	RMSC     float64 // cross-track
	MeanR    float64 // mean radial difference (broadcast − precise)
	Max3D    float64
	MaxAt    Time  // epoch of Max3D
	MaxSat   SatID // satellite of Max3D
	ClockN   int
	ClockRMS float64 // clock difference RMS after removing, per epoch and system, the mean over satellites
	sum2     [4]float64
	sumR     float64
	clk2     float64
}

func (s *OrbitStats) add(d3, r, a, c float64, t Time, sat SatID) {
	s.N++
	s.sum2[0] += d3 * d3
	s.sum2[1] += r * r
	s.sum2[2] += a * a
	s.sum2[3] += c * c
	s.sumR += r
	if d3 > s.Max3D {
		s.Max3D, s.MaxAt, s.MaxSat = d3, t, sat
	}
}

func (s *OrbitStats) finish() {
	if s.N > 0 {
		n := float64(s.N)
		s.RMS3D = math.Sqrt(s.sum2[0] / n)
		s.RMSR = math.Sqrt(s.sum2[1] / n)
		s.RMSA = math.Sqrt(s.sum2[2] / n)
		s.RMSC = math.Sqrt(s.sum2[3] / n)
		s.MeanR = s.sumR / n
	}
	if s.ClockN > 0 {
		s.ClockRMS = math.Sqrt(s.clk2 / float64(s.ClockN))
	}
}

// Comparison is the result of Compare.
type Comparison struct {
	Systems []OrbitStats // one per system letter, sorted
	Sats    []OrbitStats // one per satellite, sorted
	// NoEphemeris counts precise satellite-epochs of compared systems with
	// no valid broadcast record (they are left out of the statistics).
	NoEphemeris int
}

// Compare evaluates the broadcast orbit and clock of every satellite of
// the nav file at each epoch of the precise file and returns the
// differences broadcast − precise: 3D, radial/along/cross (axes from the
// precise position and the broadcast inertial velocity), and the broadcast
// clock polynomial (no relativistic term, no group delay) against the
// precise clock after removing per epoch and system the mean over
// satellites (the clock datum of each product differs). No antenna-offset
// correction is applied: broadcast orbits refer to the antenna phase
// centre, SP3 to the centre of mass (Montenbruck et al. 2015, GPS Solut.
// 19:321).
func Compare(nav *Nav, precise *SP3, o CompareOptions) (*Comparison, error) {
	if len(precise.Epochs) == 0 {
		return nil, fmt.Errorf("orbits: compare: the precise file has no epochs")
	}
	want := func(sys byte) bool { return o.Systems == "" || strings.IndexByte(o.Systems, sys) >= 0 }
	sats := map[SatID]*OrbitStats{}
	syss := map[byte]*OrbitStats{}
	res := &Comparison{}
	type clk struct {
		sat SatID
		d   float64
	}
	for e, t := range precise.Epochs {
		if o.From != 0 && t < o.From || o.To != 0 && t > o.To {
			continue
		}
		clocks := map[byte][]clk{}
		for i, sat := range precise.Sats {
			en := precise.Data[e][i]
			if !en.HasPos || !want(sat.System()) || len(nav.RecordsOf(sat)) == 0 {
				continue
			}
			eph, err := nav.SelectWith(sat, t, o.Select)
			if err != nil {
				res.NoEphemeris++
				continue
			}
			var p, v [3]float64
			if eph.Covers(t) {
				p, v, err = eph.PosVel(t)
			} else { // selected through Select.Extend
				p, v, err = propagateUnchecked(eph, t)
			}
			if err != nil {
				res.NoEphemeris++
				continue
			}
			d := [3]float64{p[0] - en.Pos[0], p[1] - en.Pos[1], p[2] - en.Pos[2]}
			rh := unit(en.Pos)
			vi := [3]float64{v[0] - OmegaEGPS*p[1], v[1] + OmegaEGPS*p[0], v[2]}
			ch := unit(cross(en.Pos, vi))
			ah := cross(ch, rh)
			r, a, c := dot(d, rh), dot(d, ah), dot(d, ch)
			d3 := norm(d)
			if sats[sat] == nil {
				sats[sat] = &OrbitStats{Name: string(sat)}
			}
			sy := sat.System()
			if syss[sy] == nil {
				syss[sy] = &OrbitStats{Name: string(sy)}
			}
			sats[sat].add(d3, r, a, c, t, sat)
			syss[sy].add(d3, r, a, c, t, sat)
			if en.HasClock {
				clocks[sy] = append(clocks[sy], clk{sat, eph.ClockBias(t) - en.Clock})
			}
		}
		for sy, l := range clocks {
			if len(l) < 2 {
				continue
			}
			var m float64
			for _, c := range l {
				m += c.d
			}
			m /= float64(len(l))
			for _, c := range l {
				r := c.d - m
				sats[c.sat].clk2 += r * r
				sats[c.sat].ClockN++
				syss[sy].clk2 += r * r
				syss[sy].ClockN++
			}
		}
	}
	for _, s := range syss {
		s.finish()
		res.Systems = append(res.Systems, *s)
	}
	for _, s := range sats {
		s.finish()
		res.Sats = append(res.Sats, *s)
	}
	sort.Slice(res.Systems, func(i, j int) bool { return res.Systems[i].Name < res.Systems[j].Name })
	sort.Slice(res.Sats, func(i, j int) bool { return res.Sats[i].Name < res.Sats[j].Name })
	return res, nil
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

func unit(a [3]float64) [3]float64 {
	n := norm(a)
	if n == 0 {
		return a
	}
	return [3]float64{a[0] / n, a[1] / n, a[2] / n}
}

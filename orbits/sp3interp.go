package orbits

import (
	"fmt"
	"sort"
)

// LagrangePoints is the number of SP3 epochs each interpolated position
// uses (degree 9). Ten points over 5-min (or 15-min) epochs is the usual
// choice for IGS orbits (common practice); it keeps the interpolation
// error at the millimetre level at 5-min spacing.
const LagrangePoints = 10

// Track is one satellite's precise orbit from an SP3 file, for Lagrange
// interpolation, in the Earth-fixed or the celestial frame. Times are
// seconds since Origin.
type Track struct {
	Sat    SatID
	Origin Time
	T      []float64    // s since Origin, increasing
	Pos    [][3]float64 // position, m (frame as built by Tracks)
}

// Tracks turns every satellite of an SP3 file into a Track, dropping
// epochs without a position; with celestial the positions are rotated to
// the celestial frame (ECEFToCelestial), otherwise they stay Earth-fixed.
// Satellites with fewer than LagrangePoints positions are left out.
func (s *SP3) Tracks(origin Time, celestial bool) map[SatID]*Track {
	out := map[SatID]*Track{}
	for j, sat := range s.Sats {
		o := &Track{Sat: sat, Origin: origin}
		for i, ep := range s.Epochs {
			if j >= len(s.Data[i]) {
				continue
			}
			e := s.Data[i][j]
			if !e.HasPos {
				continue
			}
			o.T = append(o.T, ep.Sub(origin))
			p := e.Pos
			if celestial {
				p = ECEFToCelestial(ep, p)
			}
			o.Pos = append(o.Pos, p)
		}
		if len(o.T) >= LagrangePoints {
			out[sat] = o
		}
	}
	return out
}

// Span returns the first and last time of the orbit, s since Origin.
func (o *Track) Span() (float64, float64) { return o.T[0], o.T[len(o.T)-1] }

// At returns the interpolated position at t (s since Origin). Inside the
// orbit's span, and up to one epoch spacing beyond either end, it is the
// Lagrange polynomial through the LagrangePoints nearest epochs (the
// window slides inward at the ends); farther out the position continues
// along a straight line with the end velocity, which is only meant for
// bracketing a root — check Span before trusting it.
func (o *Track) At(t float64) [3]float64 {
	n := len(o.T)
	lo, hi := o.T[0], o.T[n-1]
	if t < lo-(o.T[1]-lo) || t > hi+(hi-o.T[n-2]) {
		e := lo - (o.T[1] - lo)
		if t > hi {
			e = hi + (hi - o.T[n-2])
		}
		p := o.interp(e)
		h := 1.0
		if t > hi {
			h = -1
		}
		q := o.interp(e + h)
		var r [3]float64
		for k := range r {
			v := (p[k] - q[k]) / (-h)
			r[k] = p[k] + v*(t-e)
		}
		return r
	}
	return o.interp(t)
}

func (o *Track) interp(t float64) [3]float64 {
	n := len(o.T)
	// First index of the window: centre it on t.
	i := sort.SearchFloat64s(o.T, t) - LagrangePoints/2
	if i < 0 {
		i = 0
	}
	if i > n-LagrangePoints {
		i = n - LagrangePoints
	}
	ts := o.T[i : i+LagrangePoints]
	var r [3]float64
	for a := range ts {
		if t == ts[a] {
			return o.Pos[i+a]
		}
	}
	for a, ta := range ts {
		w := 1.0
		for b, tb := range ts {
			if b != a {
				w *= (t - tb) / (ta - tb)
			}
		}
		p := o.Pos[i+a]
		r[0] += w * p[0]
		r[1] += w * p[1]
		r[2] += w * p[2]
	}
	return r
}

// CheckGaps reports a satellite whose orbit has a hole wider than maxGap
// seconds inside [t0, t1].
func (o *Track) CheckGaps(t0, t1, maxGap float64) error {
	for k := 1; k < len(o.T); k++ {
		if o.T[k] < t0 || o.T[k-1] > t1 {
			continue
		}
		if g := o.T[k] - o.T[k-1]; g > maxGap {
			return fmt.Errorf("satellite %s: SP3 positions missing for %.0f s around %.0f s after the first clock epoch", o.Sat, g, o.T[k-1])
		}
	}
	return nil
}

package overlay

import (
	"fmt"
	"sort"

	"wallcross/orbits"
)

// LagrangePoints is the number of SP3 epochs each interpolated position
// uses (degree 9). Ten points over 5-min (or 15-min) epochs is the usual
// choice for IGS orbits (common practice); it keeps the interpolation
// error at the millimetre level at 5-min spacing.
const LagrangePoints = 10

// Orbit is one satellite's precise orbit in the celestial frame, for
// interpolation. Times are seconds since Origin.
type Orbit struct {
	Sat    orbits.SatID
	Origin orbits.Time
	T      []float64    // s since Origin, increasing
	Pos    [][3]float64 // celestial position, m
}

// OrbitsFromSP3 turns every satellite of an SP3 file into an Orbit with
// its positions rotated to the celestial frame (package orbits' model),
// dropping epochs without a position. Satellites with fewer than
// LagrangePoints positions are left out.
func OrbitsFromSP3(s *orbits.SP3, origin orbits.Time) map[orbits.SatID]*Orbit {
	out := map[orbits.SatID]*Orbit{}
	for j, sat := range s.Sats {
		o := &Orbit{Sat: sat, Origin: origin}
		for i, ep := range s.Epochs {
			if j >= len(s.Data[i]) {
				continue
			}
			e := s.Data[i][j]
			if !e.HasPos {
				continue
			}
			o.T = append(o.T, ep.Sub(origin))
			o.Pos = append(o.Pos, orbits.ECEFToCelestial(ep, e.Pos))
		}
		if len(o.T) >= LagrangePoints {
			out[sat] = o
		}
	}
	return out
}

// Span returns the first and last time of the orbit, s since Origin.
func (o *Orbit) Span() (float64, float64) { return o.T[0], o.T[len(o.T)-1] }

// At returns the interpolated celestial position at t (s since Origin).
// Inside the orbit's span it is the Lagrange polynomial through the
// LagrangePoints nearest epochs (the window slides inward at the ends so
// it never extrapolates); outside it, the position continues along a
// straight line with the end velocity, which is only meant for bracketing
// a root — check Span before trusting it.
func (o *Orbit) At(t float64) [3]float64 {
	n := len(o.T)
	lo, hi := o.T[0], o.T[n-1]
	if t < lo || t > hi {
		e := lo
		if t > hi {
			e = hi
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

func (o *Orbit) interp(t float64) [3]float64 {
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

// checkGaps reports a satellite whose orbit has a hole wider than maxGap
// seconds inside [t0, t1].
func (o *Orbit) checkGaps(t0, t1, maxGap float64) error {
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

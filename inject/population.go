package inject

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Orientation selects how a wall's normal relates to its velocity
// (physics.md §4, options (a) and (b)). The zero value is invalid.
type Orientation int

const (
	// OrientAlongVelocity: n̂ = v̂_rel and normal speed |v_rel| (option a).
	OrientAlongVelocity Orientation = iota + 1
	// OrientIsotropic: n̂ isotropic, normal speed v⊥ = v_rel·n̂; n̂ is flipped
	// when v⊥ < 0 so the wall moves along +n̂ (option b).
	OrientIsotropic
)

// String returns "along-velocity" or "isotropic".
func (o Orientation) String() string {
	switch o {
	case OrientAlongVelocity:
		return "along-velocity"
	case OrientIsotropic:
		return "isotropic"
	}
	return fmt.Sprintf("Orientation(%d)", int(o))
}

// ParseOrientation accepts "along-velocity" (or "along", "velocity") and "isotropic".
func ParseOrientation(s string) (Orientation, error) {
	switch s {
	case "along-velocity", "along", "velocity":
		return OrientAlongVelocity, nil
	case "isotropic":
		return OrientIsotropic, nil
	}
	return 0, fmt.Errorf("inject: unknown wall orientation %q (want along-velocity or isotropic)", s)
}

// DefaultMinSpeed is the lowest accepted normal speed when Population.MinSpeed
// is 0, m/s: well above any clock's speed (LEO 7.8 km/s), so the crossing is
// unique and the linear approximation within a crossing holds.
const DefaultMinSpeed = 20e3

// DefaultMaxEvents caps the number of walls one Sample call may draw when
// Population.MaxEvents is 0.
const DefaultMaxEvents = 1_000_000

// Population describes the walls of one run.
type Population struct {
	MeanInterval float64 // T, mean time between encounters, s
	Span         float64 // arrivals T0 are drawn over [−Margin, Span + Margin), s since the run start
	Margin       float64 // s, ≥ 0: lets sweeps that straddle the span edges appear
	Halo         Halo
	Orientation  Orientation
	// FluxWeighted weights the velocity draws by the normal speed (the
	// encounter rate ∝ v⊥), by rejection against v_esc + |v_E| + v_orb.
	// Needs a truncated halo.
	FluxWeighted bool
	MinSpeed     float64 // lowest normal speed kept (redrawn below), m/s; 0: DefaultMinSpeed
	Thickness    float64 // d, m
	Profile      Profile
	Amplitude    AmplitudeSpec // MeanInterval 0 there means this population's
	Coupling     Coupling
	ClockMotion  bool // sets Wall.ClockMotion on every wall (τ = d/v_rel per clock)
	FirstID      int  // id of the first wall; later ones count up
	MaxEvents    int  // 0: DefaultMaxEvents
	// Explicit, if not empty, replaces the random draws: one wall per entry,
	// in order, with this population's thickness, profile, amplitude and
	// coupling (MeanInterval still sets T of a density amplitude). For tests
	// and hand-made scenarios; Sample then uses no random numbers.
	Explicit []EventSpec
}

// EventSpec is an explicitly given wall arrival.
type EventSpec struct {
	T0    float64    // s since the run start: centre plane at the geocentre
	N     [3]float64 // velocity direction, celestial frame (normalised by Sample)
	Speed float64    // normal speed, m/s
}

func (p Population) minSpeed() float64 {
	if p.MinSpeed == 0 {
		return DefaultMinSpeed
	}
	return p.MinSpeed
}

func (p Population) maxEvents() int {
	if p.MaxEvents == 0 {
		return DefaultMaxEvents
	}
	return p.MaxEvents
}

func (p Population) amplitude() AmplitudeSpec {
	a := p.Amplitude
	if a.MeanInterval == 0 {
		a.MeanInterval = p.MeanInterval
	}
	return a
}

// Validate reports an inconsistency before sampling. With Explicit walls
// only the wall model (thickness, profile, amplitude, coupling) is checked;
// Sample checks each explicit entry.
func (p Population) Validate() error {
	if len(p.Explicit) == 0 {
		if err := p.validateRandom(); err != nil {
			return err
		}
	}
	if p.MeanInterval != 0 && (!(p.MeanInterval > 0) || math.IsInf(p.MeanInterval, 0)) {
		return fmt.Errorf("inject: mean interval %g s must be positive and finite", p.MeanInterval)
	}
	// The amplitude must resolve at a nominal speed.
	v := 3e5
	if len(p.Explicit) == 0 {
		v = p.Halo.V0
	}
	if _, err := p.amplitude().Resolve(p.Profile, p.Coupling, p.Thickness, v); err != nil {
		return err
	}
	return p.Coupling.Validate()
}

func (p Population) validateRandom() error {
	if !(p.MeanInterval > 0) || math.IsInf(p.MeanInterval, 0) {
		return fmt.Errorf("inject: mean interval %g s must be positive and finite", p.MeanInterval)
	}
	if !(p.Span >= 0) || math.IsInf(p.Span, 0) {
		return fmt.Errorf("inject: span %g s must be non-negative and finite", p.Span)
	}
	if !(p.Margin >= 0) || math.IsInf(p.Margin, 0) {
		return fmt.Errorf("inject: margin %g s must be non-negative and finite", p.Margin)
	}
	if err := p.Halo.Validate(); err != nil {
		return err
	}
	if p.Orientation != OrientAlongVelocity && p.Orientation != OrientIsotropic {
		return fmt.Errorf("inject: invalid wall orientation %d", int(p.Orientation))
	}
	if p.FluxWeighted && p.Halo.VEsc == 0 {
		return fmt.Errorf("inject: flux weighting needs a truncated halo (escape speed 0 m/s)")
	}
	if ms := p.minSpeed(); !(ms > 0) || !(ms < SpeedOfLight) {
		return fmt.Errorf("inject: minimum speed %g m/s must be in (0, c)", p.MinSpeed)
	}
	if p.Halo.VEsc > 0 && p.minSpeed() >= p.Halo.VEsc+vnorm(p.Halo.SunVelocity())+EarthOrbitalSpeed {
		return fmt.Errorf("inject: minimum speed %g m/s exceeds the largest possible wall speed", p.minSpeed())
	}
	if p.MaxEvents < 0 {
		return fmt.Errorf("inject: max events %d must be non-negative", p.MaxEvents)
	}
	return nil
}

func vnorm(v [3]float64) float64 { return math.Sqrt(dot(v, v)) }

// Sample draws the walls of one run: Poisson arrivals with mean interval T
// over [−Margin, Span + Margin), each with a halo-model velocity and the
// configured orientation, thickness, profile, amplitude and coupling. The
// same rng state gives the same walls.
func (p Population) Sample(rng *rand.Rand) ([]Wall, error) {
	if rng == nil {
		return nil, fmt.Errorf("inject: population sample: nil random generator")
	}
	if err := p.Validate(); err != nil {
		return nil, err
	}
	amp := p.amplitude()
	var walls []Wall
	if len(p.Explicit) > 0 {
		for i, e := range p.Explicit {
			nn := vnorm(e.N)
			if !(nn > 0) || math.IsInf(nn, 0) {
				return nil, fmt.Errorf("inject: explicit event %d: direction %v cannot be normalised", i, e.N)
			}
			a2, err := amp.Resolve(p.Profile, p.Coupling, p.Thickness, e.Speed)
			if err != nil {
				return nil, fmt.Errorf("inject: explicit event %d: %w", i, err)
			}
			w := Wall{ID: p.FirstID + i, T0: e.T0, N: [3]float64{e.N[0] / nn, e.N[1] / nn, e.N[2] / nn}, Speed: e.Speed,
				Thickness: p.Thickness, Profile: p.Profile, A2: a2, Coupling: p.Coupling, ClockMotion: p.ClockMotion}
			if err := w.Validate(); err != nil {
				return nil, fmt.Errorf("inject: explicit event %d: %w", i, err)
			}
			walls = append(walls, w)
		}
		return walls, nil
	}
	if exp := (p.Span + 2*p.Margin) / p.MeanInterval; exp > float64(p.maxEvents()) {
		return nil, fmt.Errorf("inject: %.3g expected walls (span %g s / interval %g s) exceed the cap of %d", exp, p.Span+2*p.Margin, p.MeanInterval, p.maxEvents())
	}
	t := -p.Margin
	for {
		t += p.MeanInterval * rng.ExpFloat64()
		if t >= p.Span+p.Margin {
			break
		}
		if len(walls) == p.maxEvents() {
			return nil, fmt.Errorf("inject: more than %d walls drawn", p.maxEvents())
		}
		n, v, err := p.drawVelocity(rng, t)
		if err != nil {
			return nil, err
		}
		a2, err := amp.Resolve(p.Profile, p.Coupling, p.Thickness, v)
		if err != nil {
			return nil, err
		}
		walls = append(walls, Wall{ID: p.FirstID + len(walls), T0: t, N: n, Speed: v,
			Thickness: p.Thickness, Profile: p.Profile, A2: a2, Coupling: p.Coupling, ClockMotion: p.ClockMotion})
	}
	return walls, nil
}

// maxDraws caps the rejection loop of drawVelocity.
const maxDraws = 100000

// drawVelocity returns the wall's unit normal (celestial) and normal speed (m/s).
func (p Population) drawVelocity(rng *rand.Rand, t float64) ([3]float64, float64, error) {
	vmax := p.Halo.VEsc + vnorm(p.Halo.SunVelocity()) + EarthOrbitalSpeed
	for range maxDraws {
		v := p.Halo.SampleRelative(rng, t)
		var n [3]float64
		var s float64
		switch p.Orientation {
		case OrientAlongVelocity:
			s = vnorm(v)
			if s == 0 {
				continue
			}
			n = [3]float64{v[0] / s, v[1] / s, v[2] / s}
		default:
			n = isotropic(rng)
			s = dot(v, n)
			if s < 0 {
				n, s = [3]float64{-n[0], -n[1], -n[2]}, -s
			}
		}
		if s < p.minSpeed() || s >= SpeedOfLight {
			continue
		}
		if p.FluxWeighted && rng.Float64()*vmax >= s {
			continue
		}
		return n, s, nil
	}
	return [3]float64{}, 0, fmt.Errorf("inject: no wall speed above the minimum %g m/s in %d draws", p.minSpeed(), maxDraws)
}

// isotropic draws a uniformly distributed unit vector.
func isotropic(rng *rand.Rand) [3]float64 {
	z := 2*rng.Float64() - 1
	phi := 2 * math.Pi * rng.Float64()
	r := math.Sqrt(1 - z*z)
	s, c := math.Sincos(phi)
	return [3]float64{r * c, r * s, z}
}

// Describe states the population model in one line, for the manifest.
func (p Population) Describe() string {
	if len(p.Explicit) > 0 {
		return fmt.Sprintf("%d explicit walls; profile %s, thickness %g m, amplitude %s, clock motion in τ %t",
			len(p.Explicit), p.Profile, p.Thickness, p.Amplitude.Mode, p.ClockMotion)
	}
	orbit := "off"
	if p.Halo.EarthOrbit {
		orbit = fmt.Sprintf("on (March equinox at %g s)", p.Halo.EquinoxT)
	}
	vesc := "untruncated"
	if p.Halo.VEsc > 0 {
		vesc = fmt.Sprintf("v_esc %g km/s", p.Halo.VEsc/1e3)
	}
	sv := p.Halo.SunPeculiar
	return fmt.Sprintf("Poisson arrivals, mean interval %g s, over [%g, %g) s; standard halo model v0 %g km/s, %s, "+
		"solar peculiar (U,V,W) (%g, %g, %g) km/s, Earth orbit %s; wall normal %s, flux-weighted %t, "+
		"min normal speed %g km/s; profile %s, thickness %g m, amplitude %s, clock motion in τ %t",
		p.MeanInterval, -p.Margin, p.Span+p.Margin, p.Halo.V0/1e3, vesc, sv[0]/1e3, sv[1]/1e3, sv[2]/1e3, orbit,
		p.Orientation, p.FluxWeighted, p.minSpeed()/1e3, p.Profile, p.Thickness, p.Amplitude.Mode, p.ClockMotion)
}

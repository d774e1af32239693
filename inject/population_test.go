package inject

import (
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

func testPopulation() Population {
	return Population{
		MeanInterval: 3600,
		Span:         86400,
		Halo:         StandardHalo(),
		Orientation:  OrientAlongVelocity,
		Thickness:    1e7,
		Profile:      ProfileGaussian,
		Amplitude:    AmplitudeSpec{Mode: AmplitudeDensity, RhoDM: 0.4 * GeVPerCm3, VBar: 3e5},
		Coupling:     Coupling{Mode: CouplingEff, LambdaEff: 1e11},
		FirstID:      1,
	}
}

// Poisson arrivals: over many runs the number of walls per span has mean and
// variance Span/T, and the gaps have mean T.
func TestPopulationPoisson(t *testing.T) {
	p := testPopulation()
	rng := rand.New(rand.NewPCG(1, 1))
	const runs = 400
	var sum, sum2 float64
	for range runs {
		w, err := p.Sample(rng)
		if err != nil {
			t.Fatal(err)
		}
		n := float64(len(w))
		sum += n
		sum2 += n * n
		for i := range w {
			if w[i].ID != p.FirstID+i {
				t.Fatalf("wall %d has id %d", i, w[i].ID)
			}
			if w[i].T0 < 0 || w[i].T0 >= p.Span {
				t.Fatalf("t0 %g s outside the span", w[i].T0)
			}
		}
	}
	mu := p.Span / p.MeanInterval // 24
	mean := sum / runs
	variance := sum2/runs - mean*mean
	if math.Abs(mean-mu) > 4*math.Sqrt(mu/runs) {
		t.Errorf("mean count %.2f, want %g", mean, mu)
	}
	if math.Abs(variance-mu) > 0.25*mu {
		t.Errorf("count variance %.2f, want %g (Poisson)", variance, mu)
	}
	// Gaps in one long run (gaps inside a short window are biased low).
	p.Span = 5000 * p.MeanInterval
	w, err := p.Sample(rng)
	if err != nil {
		t.Fatal(err)
	}
	var gaps, gaps2 float64
	for i := 1; i < len(w); i++ {
		g := w[i].T0 - w[i-1].T0
		gaps += g
		gaps2 += g * g
	}
	ng := float64(len(w) - 1)
	if g := gaps / ng; math.Abs(g-p.MeanInterval) > 4*p.MeanInterval/math.Sqrt(ng) {
		t.Errorf("mean gap %.1f s, want %g", g, p.MeanInterval)
	}
	// Exponential gaps: standard deviation equals the mean.
	if sd := math.Sqrt(gaps2/ng - (gaps/ng)*(gaps/ng)); math.Abs(sd-p.MeanInterval) > 0.08*p.MeanInterval {
		t.Errorf("gap standard deviation %.1f s, want %g (exponential)", sd, p.MeanInterval)
	}
}

// Same seed, same walls; the walls are valid and their amplitude follows the
// density relation.
func TestPopulationDeterministic(t *testing.T) {
	p := testPopulation()
	a, err := p.Sample(rand.New(rand.NewPCG(42, 7)))
	if err != nil {
		t.Fatal(err)
	}
	b, err := p.Sample(rand.New(rand.NewPCG(42, 7)))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a, b) || len(a) == 0 {
		t.Fatalf("same seed gave different walls (%d, %d)", len(a), len(b))
	}
	want := A2FromDensity(0.4*GeVPerCm3, 3e5, 3600, 1e7)
	for i := range a {
		if err := a[i].Validate(); err != nil {
			t.Error(err)
		}
		if a[i].A2 != want {
			t.Errorf("wall %d: A² %g, want %g", i, a[i].A2, want)
		}
		if a[i].Speed < DefaultMinSpeed {
			t.Errorf("wall %d: speed %g m/s below the minimum", i, a[i].Speed)
		}
	}
}

// Isotropic orientation: mean normal speed ≈ half the mean relative speed
// (physics.md §4: 165 vs 330 km/s), normals spread over the whole sphere;
// along-velocity normals cluster around the anti-apex.
func TestPopulationOrientation(t *testing.T) {
	anti := GalacticToICRS(StandardHalo().SunVelocity())
	anti = unit([3]float64{-anti[0], -anti[1], -anti[2]})
	for _, o := range []Orientation{OrientAlongVelocity, OrientIsotropic} {
		p := testPopulation()
		p.Orientation = o
		p.MeanInterval = 10
		p.MinSpeed = 1 // keep the slow isotropic walls for the mean
		walls, err := p.Sample(rand.New(rand.NewPCG(5, uint64(o))))
		if err != nil {
			t.Fatal(err)
		}
		var sv, cosSum float64
		for _, w := range walls {
			sv += w.Speed
			cosSum += dot(w.N, anti)
		}
		n := float64(len(walls))
		switch o {
		case OrientAlongVelocity:
			if m := sv / n; math.Abs(m-330e3) > 4e3 {
				t.Errorf("along-velocity mean speed %.1f km/s, want ≈ 330", m/1e3)
			}
			if c := cosSum / n; c < 0.6 {
				t.Errorf("along-velocity mean cos to anti-apex %.3f, want clustered", c)
			}
		case OrientIsotropic:
			if m := sv / n; math.Abs(m-165e3) > 3e3 {
				t.Errorf("isotropic mean normal speed %.1f km/s, want ≈ 165", m/1e3)
			}
			// n̂ is flipped to make v⊥ > 0, so it leans toward the anti-apex, ⟨cos⟩ ≈ 1/2·… > 0 but < along-velocity.
			if c := cosSum / n; c < 0.2 || c > 0.75 {
				t.Errorf("isotropic mean cos to anti-apex %.3f", c)
			}
		}
	}
}

// Flux weighting raises the mean speed to the flux-weighted value of
// physics.md §4 (379 km/s along the velocity).
func TestPopulationFluxWeighted(t *testing.T) {
	p := testPopulation()
	p.MeanInterval = 10
	p.FluxWeighted = true
	walls, err := p.Sample(rand.New(rand.NewPCG(8, 8)))
	if err != nil {
		t.Fatal(err)
	}
	var sv float64
	for _, w := range walls {
		sv += w.Speed
	}
	if m := sv / float64(len(walls)); math.Abs(m-379e3) > 5e3 {
		t.Errorf("flux-weighted mean speed %.1f km/s from %d walls, want ≈ 379", m/1e3, len(walls))
	}
}

func TestPopulationErrors(t *testing.T) {
	for name, mod := range map[string]func(p *Population){
		"zero interval":       func(p *Population) { p.MeanInterval = 0 },
		"negative span":       func(p *Population) { p.Span = -1 },
		"no orientation":      func(p *Population) { p.Orientation = 0 },
		"no profile":          func(p *Population) { p.Profile = 0 },
		"zero thickness":      func(p *Population) { p.Thickness = 0 },
		"bad halo":            func(p *Population) { p.Halo.V0 = -1 },
		"flux untruncated":    func(p *Population) { p.FluxWeighted = true; p.Halo.VEsc = 0 },
		"too many events":     func(p *Population) { p.MeanInterval = 1e-3 },
		"no amplitude mode":   func(p *Population) { p.Amplitude.Mode = 0 },
		"no coupling":         func(p *Population) { p.Coupling = Coupling{} },
		"min speed too large": func(p *Population) { p.MinSpeed = 2e6 },
	} {
		p := testPopulation()
		mod(&p)
		if _, err := p.Sample(rand.New(rand.NewPCG(1, 2))); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	if _, err := testPopulation().Sample(nil); err == nil {
		t.Error("nil rng accepted")
	}
	d := testPopulation().Describe()
	for _, s := range []string{"along-velocity", "v0 220 km/s", "v_esc 544 km/s", "flux-weighted false", "gaussian"} {
		if !strings.Contains(d, s) {
			t.Errorf("description %q lacks %q", d, s)
		}
	}
}

// Amplitude given as a step: every wall of the population gives the
// reporting clock exactly that step, whatever its speed.
func TestPopulationStepAmplitude(t *testing.T) {
	p := testPopulation()
	p.Amplitude = AmplitudeSpec{Mode: AmplitudeStep, Step: 30e-12}
	walls, err := p.Sample(rand.New(rand.NewPCG(3, 3)))
	if err != nil {
		t.Fatal(err)
	}
	origin := func(float64) [3]float64 { return [3]float64{} }
	for _, w := range walls {
		c, err := w.Cross("ref", "rb", origin)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(c.Step()-30e-12) > 1e-12*30e-12 {
			t.Errorf("wall %d (v = %g m/s): step %g s, want 30 ps", w.ID, w.Speed, c.Step())
		}
	}
}

// Explicit events: the given arrivals, normalised, no random draws.
func TestPopulationExplicit(t *testing.T) {
	p := testPopulation()
	p.Halo = Halo{} // not needed for explicit walls
	p.Orientation = 0
	p.Explicit = []EventSpec{{T0: 100, N: [3]float64{0, 0, 2}, Speed: 3e5}, {T0: 50, N: [3]float64{1, 1, 0}, Speed: 2e5}}
	walls, err := p.Sample(rand.New(rand.NewPCG(0, 0)))
	if err != nil {
		t.Fatal(err)
	}
	if len(walls) != 2 || walls[0].T0 != 100 || walls[0].N != [3]float64{0, 0, 1} || walls[1].ID != 2 || walls[1].Speed != 2e5 {
		t.Fatalf("explicit walls %+v", walls)
	}
	if walls[0].ClockMotion {
		t.Error("clock motion set without Population.ClockMotion")
	}
	p.ClockMotion = true
	if cm, err := p.Sample(rand.New(rand.NewPCG(0, 0))); err != nil || !cm[0].ClockMotion || !cm[1].ClockMotion {
		t.Errorf("Population.ClockMotion not passed to the walls (%v)", err)
	}
	p.ClockMotion = false
	if math.Abs(vnorm(walls[1].N)-1) > 1e-15 {
		t.Errorf("direction not normalised: %v", walls[1].N)
	}
	if !strings.Contains(p.Describe(), "2 explicit walls") {
		t.Errorf("description %q", p.Describe())
	}
	p.Explicit = []EventSpec{{T0: 1, Speed: 3e5}}
	if _, err := p.Sample(rand.New(rand.NewPCG(0, 0))); err == nil {
		t.Error("zero direction accepted")
	}
	p.Explicit = []EventSpec{{T0: 1, N: [3]float64{1, 0, 0}, Speed: -3}}
	if _, err := p.Sample(rand.New(rand.NewPCG(0, 0))); err == nil {
		t.Error("negative speed accepted")
	}
}

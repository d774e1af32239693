package estimate

import (
	"fmt"
	"math"
	"math/rand/v2"

	"wallcross/inject"
)

// GPS carrier frequencies, Hz: L1 = 154·10.23 MHz, L2 = 120·10.23 MHz
// (IS-GPS-200 §3.3.1.1).
const (
	FreqL1 = 1575.42e6
	FreqL2 = 1227.60e6
)

// Ionosphere-free combination coefficients X_IF = AlphaL1·X₁ − AlphaL2·X₂
// (dimensionless; AlphaL1 − AlphaL2 = 1 keeps the geometry, and the
// 1/f² ionospheric term cancels).
const (
	AlphaL1 = FreqL1 * FreqL1 / (FreqL1*FreqL1 - FreqL2*FreqL2) // 2.5457…
	AlphaL2 = FreqL2 * FreqL2 / (FreqL1*FreqL1 - FreqL2*FreqL2) // 1.5457…
)

const speedOfLight = inject.SpeedOfLight

// Truth holds the true clock biases the observations are built from.
type Truth struct {
	// Clocks names the columns of Bias (satellite and station ids, any order).
	Clocks []string
	// Bias is the row-major matrix [Epochs × len(Clocks)] of each clock's
	// own bias (reading minus true time, s), including its wall response,
	// at t_k = k·Interval; NaN = clock not available at that epoch.
	Bias []float64
}

// ObsConfig configures Simulate. Zero values mean the stated defaults.
type ObsConfig struct {
	Interval float64 // epoch interval, s (required)
	Epochs   int     // number of epochs (required)
	// ElevationMask is the lowest elevation of a link, rad (default 10°).
	ElevationMask float64
	// CodeNoise and PhaseNoise are the white-noise standard deviations of
	// the ionosphere-free code and phase at zenith, m (0 = noise-free).
	CodeNoise, PhaseNoise float64
	// ElevationNoise scales the noise by 1/sin(e) when set (common practice).
	ElevationNoise bool
	// Troposphere adds the slant tropospheric delay (TroposphereDelay) with
	// zenith wet delay ZenithWet (m; default 0.1 m when Troposphere is set).
	Troposphere bool
	ZenithWet   float64
	// Walls lists the refractive walls whose link delay enters the
	// observations (none = link delay off). RayBending adds each wall's
	// second-order bending term to the delay.
	Walls      []inject.IndexWall
	RayBending bool
	// SlipProbability is the probability per link and epoch of a cycle
	// slip (integer jumps of −3…3 cycles on L1 and L2, not both zero).
	SlipProbability float64
	// OutlierProbability is the probability per observation of a code
	// outlier: an extra error of ±(20…50)·CodeNoise (at least ±10…25 m).
	OutlierProbability float64
	// LinkRecordMin is the smallest |delay| (s) of a link written as a
	// LinkRecord; 0 keeps every link with a non-zero delay.
	LinkRecordMin float64
}

// Observations are the simulated ionosphere-free observations, stored
// epoch by epoch: the links of epoch k are the indices Start[k] … Start[k+1]−1.
type Observations struct {
	Interval   float64  // s
	Epochs     int      // number of epochs
	Satellites []string // satellite ids (index = Sat)
	Stations   []string // station ids (index = Sta)
	Start      []int    // len Epochs+1

	Sat, Sta []int16 // link ends
	// CodeOC and PhaseOC are the ionosphere-free pseudorange and carrier
	// phase minus Computed, m (the observable is Computed + CodeOC). They
	// are stored apart from the ~2e7 m range so that link delays far below
	// the float64 resolution of a range (3.7e-9 m ≈ 1e-17 s) survive.
	CodeOC   []float64
	PhaseOC  []float64 // includes the arc's ambiguity
	Computed []float64 // known model: geometric range + troposphere, m
	Elev     []float64 // elevation at the station, rad

	// Truth diagnostics (not used by Solve).
	WallDelay []float64 // total wall link delay on the link, s
	Slip      []bool    // a cycle slip occurred at this observation
	Outlier   []bool    // the code observation carries an outlier

	// Links lists the links with a wall delay (see ObsConfig.LinkRecordMin).
	Links []LinkRecord
}

// Len returns the number of observations.
func (o *Observations) Len() int { return len(o.Sat) }

// LinkRecord is one row of links.csv.
type LinkRecord struct {
	T            float64 // reception time, s since the run start
	Station      string
	Satellite    string
	ElevationDeg float64 // elevation at the station, degrees
	CosIncidence float64 // cosine of the angle between the line of sight and the normal of the wall with the largest delay
	Delay        float64 // total link delay of all walls, s (bending included when enabled)
	Bending      float64 // second-order bending part, s (reported whether or not added)
	Direction    float64 // change of apparent direction of the largest-delay wall, rad
}

// linkState is the per-link arc bookkeeping.
type linkState struct {
	lastEpoch int     // last epoch the link was observed, −1 none
	amb       float64 // current IF ambiguity, m
}

// Simulate builds the observations of every link above the elevation mask
// at every epoch. The draws use rng in a fixed order (epoch, station,
// satellite), so a seed gives the same observations every run.
func Simulate(net *Network, truth *Truth, cfg ObsConfig, rng *rand.Rand) (*Observations, error) {
	if err := net.validate(); err != nil {
		return nil, err
	}
	if !(cfg.Interval > 0) || math.IsInf(cfg.Interval, 0) {
		return nil, fmt.Errorf("estimate: epoch interval %g s must be positive", cfg.Interval)
	}
	if cfg.Epochs < 1 {
		return nil, fmt.Errorf("estimate: %d epochs, want at least 1", cfg.Epochs)
	}
	if rng == nil {
		return nil, fmt.Errorf("estimate: nil random generator")
	}
	if !(cfg.SlipProbability >= 0 && cfg.SlipProbability <= 1) {
		return nil, fmt.Errorf("estimate: slip probability %g outside [0, 1]", cfg.SlipProbability)
	}
	if !(cfg.OutlierProbability >= 0 && cfg.OutlierProbability <= 1) {
		return nil, fmt.Errorf("estimate: outlier probability %g outside [0, 1]", cfg.OutlierProbability)
	}
	if cfg.CodeNoise < 0 || cfg.PhaseNoise < 0 || math.IsNaN(cfg.CodeNoise) || math.IsNaN(cfg.PhaseNoise) {
		return nil, fmt.Errorf("estimate: noise levels %g m (code), %g m (phase) must be non-negative", cfg.CodeNoise, cfg.PhaseNoise)
	}
	mask := cfg.ElevationMask
	if mask == 0 {
		mask = 10 * math.Pi / 180
	}
	if !(mask > -math.Pi/2 && mask < math.Pi/2) {
		return nil, fmt.Errorf("estimate: elevation mask %g rad outside (−π/2, π/2)", mask)
	}
	zwd := cfg.ZenithWet
	if cfg.Troposphere && zwd == 0 {
		zwd = 0.1
	}
	for i := range cfg.Walls {
		if err := cfg.Walls[i].Wall.Validate(); err != nil {
			return nil, err
		}
	}
	ns, nr := len(net.Satellites), len(net.Stations)
	colSat, colSta, err := truthColumns(net, truth, cfg.Epochs)
	if err != nil {
		return nil, err
	}
	nc := len(truth.Clocks)
	toCel := net.rotation()

	type staGeo struct{ lat, lon, h float64 }
	geo := make([]staGeo, nr)
	for j, s := range net.Stations {
		lat, lon, h := Geodetic(s.ECEF)
		geo[j] = staGeo{lat, lon, h}
	}
	obs := &Observations{Interval: cfg.Interval, Epochs: cfg.Epochs, Start: make([]int, cfg.Epochs+1)}
	for _, s := range net.Satellites {
		obs.Satellites = append(obs.Satellites, s.ID)
	}
	for _, s := range net.Stations {
		obs.Stations = append(obs.Stations, s.ID)
	}
	links := make([]linkState, ns*nr)
	for i := range links {
		links[i].lastEpoch = -1
	}
	satNow := make([][3]float64, ns)
	lambda1, lambda2 := speedOfLight/FreqL1, speedOfLight/FreqL2
	for k := range cfg.Epochs {
		obs.Start[k] = len(obs.Sat)
		tr := float64(k) * cfg.Interval
		for i, s := range net.Satellites {
			satNow[i] = s.Pos(tr)
		}
		for j, st := range net.Stations {
			bR := truth.Bias[k*nc+colSta[j]]
			if math.IsNaN(bR) {
				continue
			}
			rr := toCel(tr, st.ECEF)
			u := toCel(tr, up(geo[j].lat, geo[j].lon))
			for i, sat := range net.Satellites {
				// quick rejection with the satellite at tr (direction error < 0.02°)
				d0 := sub3(satNow[i], rr)
				if dot3(d0, u) < math.Sin(mask-0.01)*norm3(d0) {
					continue
				}
				bS := truth.Bias[k*nc+colSat[i]]
				if math.IsNaN(bS) {
					continue
				}
				tau, err := inject.LightTime(sat.Pos, constTraj(rr), tr)
				if err != nil {
					return nil, fmt.Errorf("estimate: link %s→%s at t=%g s: %w", sat.ID, st.ID, tr, err)
				}
				te := tr - tau
				re := sat.Pos(te)
				los := sub3(re, rr)
				rho := norm3(los)
				elev := math.Asin(dot3(los, u) / rho)
				if elev < mask {
					continue
				}
				// wall link delay
				var delay, bend, bestDelay, bestCos, bestDir float64
				for w := range cfg.Walls {
					ld := cfg.Walls[w].Link(re, te, rr, tr)
					dw := ld.Delay
					if cfg.RayBending {
						dw += ld.Bending
					}
					delay += dw
					bend += ld.Bending
					if math.Abs(dw) >= math.Abs(bestDelay) {
						bestDelay, bestCos, bestDir = dw, ld.CosIncidence, ld.DirectionChange
					}
				}
				trop := 0.0
				if cfg.Troposphere {
					trop = TroposphereDelay(elev, geo[j].lat, geo[j].h, zwd)
				}
				sig := 1.0
				if cfg.ElevationNoise {
					sig = 1 / math.Sin(elev)
				}
				clk := speedOfLight * (bR - bS)
				code := clk + speedOfLight*delay // observed minus computed (ρ + T)
				phase := code
				if cfg.CodeNoise > 0 {
					code += cfg.CodeNoise * sig * rng.NormFloat64()
				}
				if cfg.PhaseNoise > 0 {
					phase += cfg.PhaseNoise * sig * rng.NormFloat64()
				}
				outlier := false
				if cfg.OutlierProbability > 0 && rng.Float64() < cfg.OutlierProbability {
					size := math.Max(cfg.CodeNoise, 0.5) * (20 + 30*rng.Float64())
					if rng.IntN(2) == 0 {
						size = -size
					}
					code += size
					outlier = true
				}
				ls := &links[i*nr+j]
				if ls.lastEpoch != k-1 || k == 0 {
					// new arc: integer L1/L2 ambiguities (±1000 cycles, kept small so
					// that PhaseOC keeps the float64 resolution of CodeOC) in the IF
					// combination
					n1 := float64(rng.IntN(2001) - 1000)
					n2 := float64(rng.IntN(2001) - 1000)
					ls.amb = AlphaL1*lambda1*n1 - AlphaL2*lambda2*n2
				}
				slip := false
				if cfg.SlipProbability > 0 && ls.lastEpoch == k-1 && rng.Float64() < cfg.SlipProbability {
					var n1, n2 int
					for n1 == 0 && n2 == 0 {
						n1, n2 = rng.IntN(7)-3, rng.IntN(7)-3
					}
					ls.amb += AlphaL1*lambda1*float64(n1) - AlphaL2*lambda2*float64(n2)
					slip = true
				}
				ls.lastEpoch = k
				phase += ls.amb
				obs.Sat = append(obs.Sat, int16(i))
				obs.Sta = append(obs.Sta, int16(j))
				obs.CodeOC = append(obs.CodeOC, code)
				obs.PhaseOC = append(obs.PhaseOC, phase)
				obs.Computed = append(obs.Computed, rho+trop)
				obs.Elev = append(obs.Elev, elev)
				obs.WallDelay = append(obs.WallDelay, delay)
				obs.Slip = append(obs.Slip, slip)
				obs.Outlier = append(obs.Outlier, outlier)
				if len(cfg.Walls) > 0 && delay != 0 && math.Abs(delay) >= cfg.LinkRecordMin {
					obs.Links = append(obs.Links, LinkRecord{T: tr, Station: st.ID, Satellite: sat.ID,
						ElevationDeg: elev * 180 / math.Pi, CosIncidence: bestCos, Delay: delay, Bending: bend, Direction: bestDir})
				}
			}
		}
	}
	obs.Start[cfg.Epochs] = len(obs.Sat)
	return obs, nil
}

// truthColumns maps every satellite and station to its truth column.
func truthColumns(net *Network, truth *Truth, epochs int) (colSat, colSta []int, err error) {
	if truth == nil {
		return nil, nil, fmt.Errorf("estimate: no clock truth")
	}
	nc := len(truth.Clocks)
	if len(truth.Bias) != epochs*nc {
		return nil, nil, fmt.Errorf("estimate: clock truth has %d values, want %d epochs × %d clocks", len(truth.Bias), epochs, nc)
	}
	idx := make(map[string]int, nc)
	for j, id := range truth.Clocks {
		idx[id] = j
	}
	for _, s := range net.Satellites {
		j, ok := idx[s.ID]
		if !ok {
			return nil, nil, fmt.Errorf("estimate: satellite %q has no clock truth", s.ID)
		}
		colSat = append(colSat, j)
	}
	for _, s := range net.Stations {
		j, ok := idx[s.ID]
		if !ok {
			return nil, nil, fmt.Errorf("estimate: station %q has no clock truth", s.ID)
		}
		colSta = append(colSta, j)
	}
	return colSat, colSta, nil
}

func constTraj(r [3]float64) inject.Trajectory { return func(float64) [3]float64 { return r } }

func sub3(a, b [3]float64) [3]float64 { return [3]float64{a[0] - b[0], a[1] - b[1], a[2] - b[2]} }
func dot3(a, b [3]float64) float64    { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }
func norm3(a [3]float64) float64      { return math.Sqrt(dot3(a, a)) }

package campaign

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"

	"wallcross/scenarios"
)

// Cell is one point of the campaign grid.
type Cell struct {
	Index     int
	Thickness float64 // m
	Speed     float64 // m/s
	Step      float64 // bias step of a unit-sensitivity clock, s (0 when LambdaEff is the axis)
	LambdaEff float64 // GeV (0 when Step is the axis)
}

// Trial is one unit of work: an injection in a cell, or a background trial.
type Trial struct {
	ID         int  // global trial id, 0-based
	Background bool // no wall injected
	Cell       Cell // the grid cell (zero for background trials)
	Rep        int  // repetition within the cell, or background index
}

// Plan is the list of a campaign's trials.
type Plan struct {
	Campaign *scenarios.Campaign
	Cells    []Cell
	Trials   int // total: injections + background
}

// NewPlan expands the campaign grid. Cells are ordered thickness-major,
// then speed, then amplitude, as listed in the file.
func NewPlan(c *scenarios.Campaign) *Plan {
	p := &Plan{Campaign: c}
	for _, d := range c.Grid.Thickness {
		for _, v := range c.Grid.Speed {
			for _, s := range c.Grid.Step {
				p.Cells = append(p.Cells, Cell{Index: len(p.Cells), Thickness: d.Metres(), Speed: v.MetresPerSecond(), Step: s.Seconds()})
			}
			for _, l := range c.Grid.LambdaEff {
				p.Cells = append(p.Cells, Cell{Index: len(p.Cells), Thickness: d.Metres(), Speed: v.MetresPerSecond(), LambdaEff: l.GeV()})
			}
		}
	}
	p.Trials = len(p.Cells)*c.Trials + c.BackgroundTrials
	return p
}

// Injections returns the number of injection trials.
func (p *Plan) Injections() int { return len(p.Cells) * p.Campaign.Trials }

// Trial returns trial id k.
func (p *Plan) Trial(k int) Trial {
	n := p.Injections()
	if k >= n {
		return Trial{ID: k, Background: true, Rep: k - n}
	}
	return Trial{ID: k, Cell: p.Cells[k/p.Campaign.Trials], Rep: k % p.Campaign.Trials}
}

// Rand returns trial k's random generator: PCG keyed by the campaign seed
// and splitmix64(k) (detection.md §3.2: the stream belongs to the work
// unit, never to a worker).
func Rand(seed uint64, k int) *rand.Rand {
	return rand.New(rand.NewPCG(seed, splitmix64(uint64(k))))
}

// SubSeed derives a 64-bit seed for one purpose within trial k.
func SubSeed(seed uint64, k int, purpose uint64) uint64 {
	return splitmix64(seed ^ splitmix64(uint64(k)+0x9e3779b97f4a7c15*purpose))
}

// splitmix64 is Steele, Lea & Flood's SplitMix64 finaliser (OOPSLA 2014),
// a bijective 64-bit mixer.
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// Shard is shard I of N: the trials with id mod N = I.
type Shard struct{ I, N int }

func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.I, s.N) }

// Owns reports whether trial k belongs to the shard.
func (s Shard) Owns(k int) bool { return k%s.N == s.I }

// ParseShard reads "I/N" (0 ≤ I < N).
func ParseShard(s string) (Shard, error) {
	a, b, ok := strings.Cut(s, "/")
	if !ok {
		return Shard{}, fmt.Errorf("campaign: shard %q: want I/N, e.g. 0/8", s)
	}
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if err1 != nil || err2 != nil || n < 1 || i < 0 || i >= n {
		return Shard{}, fmt.Errorf("campaign: shard %q: want I/N with 0 ≤ I < N", s)
	}
	return Shard{I: i, N: n}, nil
}

// ShardFromEnv reads the Slurm array variables SLURM_ARRAY_TASK_ID and
// SLURM_ARRAY_TASK_COUNT (both or neither: one alone is an error, never a
// partial sharding), adding offset to the task id (for arrays split
// because of MaxArraySize). ok is false when neither is set.
func ShardFromEnv(getenv func(string) string, offset, count int) (s Shard, ok bool, err error) {
	id, cnt := getenv("SLURM_ARRAY_TASK_ID"), getenv("SLURM_ARRAY_TASK_COUNT")
	if id == "" && cnt == "" {
		return Shard{}, false, nil
	}
	if id == "" || cnt == "" {
		return Shard{}, false, fmt.Errorf("campaign: only one of SLURM_ARRAY_TASK_ID (%q) and SLURM_ARRAY_TASK_COUNT (%q) is set; refusing to run partially sharded", id, cnt)
	}
	i, err1 := strconv.Atoi(id)
	n, err2 := strconv.Atoi(cnt)
	if err1 != nil || err2 != nil {
		return Shard{}, false, fmt.Errorf("campaign: bad Slurm array variables SLURM_ARRAY_TASK_ID=%q SLURM_ARRAY_TASK_COUNT=%q", id, cnt)
	}
	if count > 0 {
		n = count // total shard count across several arrays
	}
	s = Shard{I: i + offset, N: n}
	if s.I < 0 || s.I >= s.N {
		return Shard{}, false, fmt.Errorf("campaign: shard %d/%d from SLURM_ARRAY_TASK_ID=%s + offset %d is out of range", s.I, s.N, id, offset)
	}
	return s, true, nil
}

// Outcome is what one trial gave.
type Outcome struct {
	ID int
	// Matched: a candidate was matched to the injection (injections only).
	Matched bool
	// Stat is the statistic of the matched candidate (NaN if none).
	Stat float64
	// Loudest is the largest statistic of any candidate that is not
	// matched to the injection (NaN if none): the background of the trial.
	Loudest float64
	// TErr is matched t0 − true t0, s; DirErr the direction error, deg
	// (NaN when unknown).
	TErr, DirErr float64
	// Step is the largest |bias step| any clock received, s (NaN for
	// background trials).
	Step float64
	// InGap marks an injection that fell in a data gap (counted apart).
	InGap bool
	// SNROpt is the injection's optimal network SNR, sqrt(sᵀC⁻¹s) of its
	// signal under the noise model the reference search fits to the trial
	// (search.NoiseModel.SignalSNR); NaN for background trials.
	SNROpt float64
}

var outcomeHeader = []string{"trial", "matched", "stat", "loudest", "t_err_s", "dir_err_deg", "step_s", "in_gap", "snr_opt"}

func ff(v float64) string {
	if math.IsNaN(v) {
		return "NaN"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

func (o Outcome) strings() []string {
	return []string{strconv.Itoa(o.ID), strconv.FormatBool(o.Matched), ff(o.Stat), ff(o.Loudest), ff(o.TErr), ff(o.DirErr), ff(o.Step), strconv.FormatBool(o.InGap), ff(o.SNROpt)}
}

func parseOutcome(rec []string) (Outcome, error) {
	if len(rec) != len(outcomeHeader) {
		return Outcome{}, fmt.Errorf("want %d fields, got %d", len(outcomeHeader), len(rec))
	}
	var o Outcome
	var err error
	if o.ID, err = strconv.Atoi(rec[0]); err != nil {
		return o, fmt.Errorf("bad trial id %q", rec[0])
	}
	if o.Matched, err = strconv.ParseBool(rec[1]); err != nil {
		return o, fmt.Errorf("bad matched %q", rec[1])
	}
	fs := []*float64{&o.Stat, &o.Loudest, &o.TErr, &o.DirErr, &o.Step}
	for i, p := range fs {
		if *p, err = strconv.ParseFloat(rec[2+i], 64); err != nil {
			return o, fmt.Errorf("bad %s %q", outcomeHeader[2+i], rec[2+i])
		}
	}
	if o.InGap, err = strconv.ParseBool(rec[7]); err != nil {
		return o, fmt.Errorf("bad in_gap %q", rec[7])
	}
	if o.SNROpt, err = strconv.ParseFloat(rec[8], 64); err != nil {
		return o, fmt.Errorf("bad snr_opt %q", rec[8])
	}
	return o, nil
}

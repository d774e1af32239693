package campaign

import (
	"bufio"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"

	"wallcross/internal/atomicfile"
	"wallcross/sim/score"
)

// Shards finds the shard directories under each of dirs: a dir is either
// a shard directory itself or holds shard-* directories.
func Shards(dirs []string) ([]string, error) {
	var out []string
	for _, d := range dirs {
		if _, err := os.Stat(filepath.Join(d, manifestName)); err == nil && strings.HasPrefix(filepath.Base(d), "shard-") {
			out = append(out, d)
			continue
		}
		ents, err := os.ReadDir(d)
		if err != nil {
			return nil, fmt.Errorf("campaign: %w", err)
		}
		n := 0
		for _, e := range ents {
			if e.IsDir() && strings.HasPrefix(e.Name(), "shard-") {
				out = append(out, filepath.Join(d, e.Name()))
				n++
			}
		}
		if n == 0 {
			return nil, fmt.Errorf("campaign: %s holds no shard directories (shard-IIII-of-NNNN)", d)
		}
	}
	sort.Strings(out)
	return out, nil
}

// Pooled is every trial outcome of a campaign with its settings.
type Pooled struct {
	Hash     string
	Campaign string
	Pipeline string
	Settings Settings
	Outcomes []Outcome // by trial id
	Shards   []ShardManifest
}

// Load reads and checks shards for merging: all of one campaign (same
// hash and settings), every index 0..N−1 present exactly once, every
// trial present exactly once, and every results file matching its
// manifest's checksum and trial list.
func Load(shardDirs []string) (*Pooled, error) {
	if len(shardDirs) == 0 {
		return nil, fmt.Errorf("campaign: no shards to merge")
	}
	p := &Pooled{}
	seen := map[int]string{}
	byTrial := map[int]string{}
	var n int
	for _, d := range shardDirs {
		m, err := readShardManifest(d)
		if err != nil {
			if os.IsNotExist(err) {
				if _, jerr := os.Stat(filepath.Join(d, journalName)); jerr == nil {
					return nil, fmt.Errorf("campaign: shard %s is unfinished (journal only): rerun it before merging", d)
				}
				return nil, fmt.Errorf("campaign: %s has no %s: not a finished shard", d, manifestName)
			}
			return nil, err
		}
		if p.Hash == "" {
			p.Hash, p.Campaign, p.Settings, p.Pipeline, n = m.CampaignHash, m.Campaign, m.Settings, m.Pipeline, m.Shards
		}
		if m.CampaignHash != p.Hash {
			return nil, fmt.Errorf("campaign: shard %s belongs to another campaign (hash %.12s…, expected %.12s… from %s)", d, m.CampaignHash, p.Hash, shardDirs[0])
		}
		if m.Shards != n {
			return nil, fmt.Errorf("campaign: shard %s is %d of %d, but %s is of %d shards", d, m.Shard, m.Shards, shardDirs[0], n)
		}
		if !reflect.DeepEqual(m.Settings, p.Settings) || m.Pipeline != p.Pipeline {
			return nil, fmt.Errorf("campaign: shard %s was run with other settings or pipeline than %s", d, shardDirs[0])
		}
		if prev, dup := seen[m.Shard]; dup {
			return nil, fmt.Errorf("campaign: shard %d/%d appears twice: %s and %s", m.Shard, m.Shards, prev, d)
		}
		seen[m.Shard] = d
		rpath := filepath.Join(d, resultsName)
		sum, err := atomicfile.SumFile(rpath)
		if err != nil {
			return nil, fmt.Errorf("campaign: shard %s: %w", d, err)
		}
		if sum != m.ResultsSHA {
			return nil, fmt.Errorf("campaign: shard %s: %s does not match its manifest checksum (modified?)", d, resultsName)
		}
		outs, err := readOutcomes(rpath)
		if err != nil {
			return nil, err
		}
		if len(outs) != len(m.Trials) {
			return nil, fmt.Errorf("campaign: shard %s: %d results for %d trials in its manifest", d, len(outs), len(m.Trials))
		}
		for i, o := range outs {
			if o.ID != m.Trials[i] || o.ID%n != m.Shard {
				return nil, fmt.Errorf("campaign: shard %s: result for trial %d does not belong to shard %d/%d", d, o.ID, m.Shard, n)
			}
			if prev, dup := byTrial[o.ID]; dup {
				return nil, fmt.Errorf("campaign: trial %d appears in %s and %s", o.ID, prev, d)
			}
			byTrial[o.ID] = d
		}
		p.Outcomes = append(p.Outcomes, outs...)
		p.Shards = append(p.Shards, *m)
	}
	var missing []string
	for i := 0; i < n; i++ {
		if _, ok := seen[i]; !ok {
			missing = append(missing, fmt.Sprintf("%d/%d", i, n))
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("campaign: missing shards %s (a lost shard is never merged as a pass)", strings.Join(missing, ", "))
	}
	if len(p.Outcomes) != p.Settings.Trials {
		return nil, fmt.Errorf("campaign: %d trial results for %d trials", len(p.Outcomes), p.Settings.Trials)
	}
	sort.Slice(p.Outcomes, func(i, j int) bool { return p.Outcomes[i].ID < p.Outcomes[j].ID })
	sort.Slice(p.Shards, func(i, j int) bool { return p.Shards[i].Shard < p.Shards[j].Shard })
	return p, nil
}

// Summary is the campaign report (summary.json).
type Summary struct {
	Campaign   string  `json:"campaign"`
	Hash       string  `json:"campaign_hash"`
	Pipeline   string  `json:"pipeline"`
	Background string  `json:"background"` // which background was used
	NBack      int     `json:"background_trials"`
	Threshold  float64 `json:"threshold"`
	// ThresholdFrom says whether the threshold was fixed or set by the
	// background at the target false-alarm probability.
	ThresholdFrom string         `json:"threshold_from"`
	TargetFAP     float64        `json:"target_false_alarm"`
	FAP           float64        `json:"false_alarm_measured"` // fraction of background trials with a candidate above threshold
	FAPInterval   score.Interval `json:"false_alarm_cp95"`
	FAPerDay      float64        `json:"false_alarms_per_day"`
	Injections    int            `json:"injections"`
	InGap         int            `json:"injections_in_gaps"`
	Found         int            `json:"found"`
	Fits          []Fit          `json:"fits"`
	MedianDirErr  float64        `json:"median_direction_error_deg"`
	// SNRBins is the efficiency against the injections' optimal network
	// SNR (Outcome.SNROpt), injections in gaps left out; SNR10 pools every
	// injection with SNROpt ≥ 10.
	SNRBins []SNRBin `json:"efficiency_by_optimal_snr"`
	SNR10   SNRBin   `json:"efficiency_optimal_snr_10_up"`
}

// SNRBin is the efficiency of the injections with optimal SNR in [Lo, Hi).
type SNRBin struct {
	Lo    float64        `json:"snr_lo"`
	Hi    float64        `json:"snr_hi"` // +Inf: open bin
	N     int            `json:"n"`
	Found int            `json:"found"`
	Eff   float64        `json:"eff"`
	CP    score.Interval `json:"cp95"`
}

// snrEdges are the optimal-SNR bin edges of Summary.SNRBins.
var snrEdges = []float64{0, 2, 4, 6, 8, 10, 15, 20, 30, math.Inf(1)}

// snrBin counts the injections with lo ≤ SNROpt < hi.
func snrBin(outs []Outcome, threshold, lo, hi float64) (SNRBin, error) {
	b := SNRBin{Lo: lo, Hi: hi, Eff: math.NaN(), CP: score.Interval{Low: math.NaN(), High: math.NaN()}}
	for _, o := range outs {
		if o.InGap || math.IsNaN(o.SNROpt) || o.SNROpt < lo || o.SNROpt >= hi {
			continue
		}
		b.N++
		if o.Matched && o.Stat > threshold {
			b.Found++
		}
	}
	if b.N > 0 {
		b.Eff = float64(b.Found) / float64(b.N)
		iv, err := score.ClopperPearson(b.Found, b.N, 0.95)
		if err != nil {
			return b, err
		}
		b.CP = iv
	}
	return b, nil
}

// Fit is the sigmoid of one thickness (in the bias step, s).
type Fit struct {
	Thickness float64        `json:"thickness_m"`
	H50       float64        `json:"h50_step_s"`
	H50Int    score.Interval `json:"h50_interval"`
	H90       float64        `json:"h90_step_s"`
	H90Int    score.Interval `json:"h90_interval"`
	Err       string         `json:"error,omitempty"`
}

// Tables computes the threshold, the efficiency rows and the summary from
// the pooled outcomes.
func (p *Pooled) Tables() ([]score.EffRow, *Summary, error) {
	st := p.Settings
	s := &Summary{Campaign: p.Campaign, Hash: p.Hash, Pipeline: p.Pipeline, Background: st.Background, TargetFAP: st.FalseAlarm}
	nInj := len(st.Cells) * st.PerCell
	var loud []float64
	for _, o := range p.Outcomes[nInj:] {
		l := o.Loudest
		if math.IsNaN(l) {
			l = math.Inf(-1)
		}
		loud = append(loud, l)
	}
	s.NBack = len(loud)
	sort.Sort(sort.Reverse(sort.Float64Slice(loud)))
	switch {
	case st.Threshold != 0:
		s.Threshold, s.ThresholdFrom = st.Threshold, "fixed"
	case len(loud) == 0:
		return nil, nil, fmt.Errorf("campaign: no background trials to set the threshold")
	default:
		// The (m+1)-th loudest background value with m = ⌊FAP·B⌋: at
		// most m background trials exceed it.
		m := int(math.Floor(st.FalseAlarm * float64(len(loud))))
		if m >= len(loud) {
			m = len(loud) - 1
		}
		s.Threshold, s.ThresholdFrom = loud[m], "background"
		if math.IsInf(s.Threshold, -1) {
			s.Threshold = 0 // no candidate at all in enough background trials
		}
	}
	above := 0
	for _, l := range loud {
		if l > s.Threshold {
			above++
		}
	}
	if len(loud) > 0 {
		s.FAP = float64(above) / float64(len(loud))
		iv, err := score.ClopperPearson(above, len(loud), 0.95)
		if err != nil {
			return nil, nil, err
		}
		s.FAPInterval = iv
		if st.SpanDays > 0 {
			s.FAPerDay = float64(above) / (float64(len(loud)) * st.SpanDays)
		}
	}
	var rows []score.EffRow
	var dirErrs []float64
	for ci, c := range st.Cells {
		n, found := 0, 0
		for _, o := range p.Outcomes[ci*st.PerCell : (ci+1)*st.PerCell] {
			s.Injections++
			if o.InGap {
				s.InGap++
				continue
			}
			n++
			if o.Matched && o.Stat > s.Threshold {
				found++
				if !math.IsNaN(o.DirErr) {
					dirErrs = append(dirErrs, o.DirErr)
				}
			}
		}
		s.Found += found
		r, err := score.NewEffRow(c.Thickness, c.Speed, c.LambdaEff, c.Step, n, found)
		if err != nil {
			return nil, nil, err
		}
		rows = append(rows, r)
	}
	inj := p.Outcomes[:nInj]
	for i := range len(snrEdges) - 1 {
		b, err := snrBin(inj, s.Threshold, snrEdges[i], snrEdges[i+1])
		if err != nil {
			return nil, nil, err
		}
		s.SNRBins = append(s.SNRBins, b)
	}
	b10, err := snrBin(inj, s.Threshold, 10, math.Inf(1))
	if err != nil {
		return nil, nil, err
	}
	s.SNR10 = b10
	if len(dirErrs) > 0 {
		sort.Float64s(dirErrs)
		s.MedianDirErr = median(dirErrs)
	} else {
		s.MedianDirErr = math.NaN()
	}
	// Sigmoid per thickness in the bias step.
	byD := map[float64][]score.BinPoint{}
	var ds []float64
	for _, r := range rows {
		if _, ok := byD[r.Thickness]; !ok {
			ds = append(ds, r.Thickness)
		}
		byD[r.Thickness] = append(byD[r.Thickness], score.BinPoint{S: r.Step, N: r.N, Found: r.Found})
	}
	sort.Float64s(ds)
	for _, d := range ds {
		f := Fit{Thickness: d}
		g, err := score.FitSigmoid(byD[d], 0.9)
		if err != nil {
			f.Err = err.Error()
			f.H50, f.H90 = math.NaN(), math.NaN()
		} else {
			f.H50, f.H50Int, f.H90, f.H90Int = g.H50, g.H50Int, g.H90, g.H90Int
		}
		s.Fits = append(s.Fits, f)
	}
	return rows, s, nil
}

func median(x []float64) float64 {
	n := len(x)
	if n%2 == 1 {
		return x[n/2]
	}
	return (x[n/2-1] + x[n/2]) / 2
}

// WriteMerged writes efficiency.csv, efficiency_snr.csv (efficiency per
// optimal-SNR bin), summary.json and background.csv into dir.
func WriteMerged(dir string, p *Pooled) (*Summary, error) {
	rows, s, err := p.Tables()
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	if err := score.WriteEfficiencyFile(filepath.Join(dir, "efficiency.csv"), rows); err != nil {
		return nil, err
	}
	nInj := len(p.Settings.Cells) * p.Settings.PerCell
	if _, _, err := atomicfile.Write(filepath.Join(dir, "background.csv"), func(w *bufio.Writer) error {
		fmt.Fprintln(w, "trial,loudest_stat")
		for _, o := range p.Outcomes[nInj:] {
			fmt.Fprintf(w, "%d,%s\n", o.ID, ff(o.Loudest))
		}
		return nil
	}); err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	if _, _, err := atomicfile.Write(filepath.Join(dir, "efficiency_snr.csv"), func(w *bufio.Writer) error {
		fmt.Fprintln(w, "snr_lo,snr_hi,n,found,eff,cp_low,cp_high")
		for _, b := range s.SNRBins {
			fmt.Fprintf(w, "%s,%s,%d,%d,%s,%s,%s\n", ff(b.Lo), ff(b.Hi), b.N, b.Found, ff(b.Eff), ff(b.CP.Low), ff(b.CP.High))
		}
		return nil
	}); err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	if _, _, err := atomicfile.Write(filepath.Join(dir, "summary.json"), func(w *bufio.Writer) error {
		b, err := json.MarshalIndent(jsonSafe(s), "", "  ")
		if err != nil {
			return err
		}
		_, err = w.Write(append(b, '\n'))
		return err
	}); err != nil {
		return nil, fmt.Errorf("campaign: %w", err)
	}
	if err := score.PlotEfficiency(filepath.Join(dir, "efficiency.png"), rows, nil); err != nil {
		return nil, err
	}
	return s, nil
}

// jsonSafe replaces NaN and ±Inf (which JSON cannot hold) by nulls.
func jsonSafe(s *Summary) any { return sanitize(reflect.ValueOf(*s)) }

// sanitize returns v as plain maps, slices and values, with non-finite
// floats as nil.
func sanitize(v reflect.Value) any {
	if m, ok := v.Interface().(json.Marshaler); ok {
		// A type with its own JSON form (score.Interval: {low, high},
		// null for infinite ends) keeps it.
		if b, err := m.MarshalJSON(); err == nil {
			var out any
			if json.Unmarshal(b, &out) == nil {
				return out
			}
		}
	}
	switch v.Kind() {
	case reflect.Float64, reflect.Float32:
		f := v.Float()
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return nil
		}
		return f
	case reflect.Struct:
		m := map[string]any{}
		t := v.Type()
		for i := 0; i < v.NumField(); i++ {
			f := t.Field(i)
			if !f.IsExported() {
				continue
			}
			name := f.Name
			if tag := f.Tag.Get("json"); tag != "" {
				name = strings.Split(tag, ",")[0]
				if strings.Contains(tag, "omitempty") && v.Field(i).IsZero() {
					continue
				}
			}
			m[name] = sanitize(v.Field(i))
		}
		return m
	case reflect.Slice:
		out := make([]any, v.Len())
		for i := range out {
			out[i] = sanitize(v.Index(i))
		}
		return out
	}
	return v.Interface()
}

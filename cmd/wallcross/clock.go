package main

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"wallcross/internal/atomicfile"
	"wallcross/noise"
	"wallcross/scenarios"
	"wallcross/sim"
)

func newClockCmd() *command {
	fs := newFlagSet("clock")
	family := fs.String("family", "", "clock family preset `NAME` (listed in the help text)")
	hs := fs.String("h", "", "power-law levels `KEY=VAL,...` with keys h+2,h+1,h0,h-1,h-2 (S_y = Σ h_α f^α, h_α in Hz^(-α-1)); added to or replacing the preset's")
	drift := fs.String("drift", "", "linear frequency drift `RATE`, e.g. 1e-14/d or 1e-19/s (replaces the preset's)")
	freqOff := fs.Float64("freq-offset", 0, "fractional frequency offset y0 (dimensionless)")
	phaseOff := fs.String("phase-offset", "0s", "phase offset at t = 0 `DURATION`, e.g. 10ns")
	noPeriodic := fs.Bool("no-periodic", false, "drop the preset's periodic terms")
	span := fs.String("span", "1d", "length of the series `DURATION` (samples at 0, step, … < span)")
	step := fs.String("step", "30s", "sample interval `DURATION`")
	seed := fs.Uint64("seed", 1, "run seed (the noise stream is the one 'wallcross simulate' derives for this clock id in trial 0)")
	id := fs.String("id", "clock", "clock id, the name of the phase column")
	out := fs.String("out", "", "output `FILE.csv` (wide CSV: t_s, then the clock id; phase in seconds)")
	return &command{
		Name:  "clock",
		Usage: "clock (--family NAME | --h KEY=VAL,...) [--drift RATE] --span D --step S [--seed N] --out FILE.csv",
		Short: "generate the phase of one clock from a power-law model",
		Long: `Clock writes the phase (time error) x(t) in seconds of one simulated clock as a
wide CSV (DESIGN.md §5: column t_s = seconds since the first sample, then
the clock id). The model is a clock-family preset and/or explicit power-law
levels h_α of the one-sided fractional-frequency PSD S_y(f) = Σ h_α f^α for
f ≤ 1/(2·step), plus offsets, linear drift and the preset's periodic terms.

White and random-walk FM are summed exactly, flicker PM and FM come from the
Kasdin–Walter filter; see package noise. The same --seed and --id give the
same bytes.

Families (ADEV levels and their sources: 'go doc wallcross/noise Family'):
  ` + strings.Join(noise.Families(), ", ") + `

Example:
  wallcross clock --family gps-iif-rb --span 1d --step 30s --seed 7 --out g01.csv
  wallcross clock --h h0=2e-24,h-1=1e-30 --drift 1e-14/d --step 1s --span 1h --out q.csv`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) > 0 {
				return usageErrorf("clock takes no positional arguments, got %q", args[0])
			}
			if *out == "" {
				return usageErrorf("--out FILE.csv is required")
			}
			if *family == "" && *hs == "" {
				return usageErrorf("need --family NAME or --h KEY=VAL,...")
			}
			var m noise.ClockModel
			if *family != "" {
				var err error
				if m, err = noise.Preset(*family); err != nil {
					return usageErrorf("%v", err)
				}
			}
			if *hs != "" {
				set, err := parseHSet(*hs)
				if err != nil {
					return usageErrorf("--h: %v", err)
				}
				for t, v := range set {
					m.H[t] = v
				}
			}
			if *drift != "" {
				d, err := scenarios.ParseQuantity(*drift, scenarios.DimRate)
				if err != nil {
					return usageErrorf("--drift: %v", err)
				}
				m.Drift = d
			}
			if *noPeriodic {
				m.Periodic = nil
			}
			m.FreqOffset = *freqOff
			po, err := scenarios.ParseQuantity(*phaseOff, scenarios.DimTime)
			if err != nil {
				return usageErrorf("--phase-offset: %v", err)
			}
			m.PhaseOffset = po
			tau0, err := scenarios.ParseQuantity(*step, scenarios.DimTime)
			if err != nil || !(tau0 > 0) {
				return usageErrorf("--step: want a positive duration, got %q", *step)
			}
			T, err := scenarios.ParseQuantity(*span, scenarios.DimTime)
			if err != nil || !(T >= 0) {
				return usageErrorf("--span: want a positive duration, got %q", *span)
			}
			// samples at t = 0, τ0, 2τ0, … < span (a day at 30 s is 2880 epochs)
			nf := math.Ceil(T/tau0 - 1e-9)
			if nf < 2 {
				return usageErrorf("--span %s must hold at least two --step %s samples", *span, *step)
			}
			const maxSamples = 1 << 28
			if nf > maxSamples {
				return usageErrorf("--span %s / --step %s gives %.3g samples, more than %d", *span, *step, nf, maxSamples)
			}
			if strings.ContainsAny(*id, ",\"\n\r") || *id == "" || *id == "t_s" {
				return usageErrorf("--id %q: want a non-empty CSV column name other than t_s", *id)
			}
			if err := m.Validate(); err != nil {
				return usageErrorf("%v", err)
			}
			n := int(nf)
			x := m.Phase(sim.SeedStream(*seed, 0, *id, "noise"), n, tau0)
			_, _, err = atomicfile.Write(*out, func(w *bufio.Writer) error { return writeWideCSV(w, tau0, *id, x) })
			if err != nil {
				return err
			}
			fmt.Fprintf(stderr, "wallcross clock: wrote %s (%d samples at %g s, seed %d)\n", *out, n, tau0, *seed)
			return nil
		},
	}
}

// parseHSet parses "h0=1e-24,h-1=2e-30".
func parseHSet(s string) (map[noise.Term]float64, error) {
	out := map[noise.Term]float64{}
	for _, kv := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(kv, "=")
		if !ok {
			return nil, fmt.Errorf("want KEY=VAL, got %q", kv)
		}
		t, err := noise.ParseTerm(k)
		if err != nil {
			return nil, err
		}
		f, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil || f < 0 || math.IsInf(f, 0) || math.IsNaN(f) {
			return nil, fmt.Errorf("%s = %q: want a finite number ≥ 0", k, v)
		}
		out[t] = f
	}
	return out, nil
}

// writeWideCSV writes t_s and one phase column. When the step is a whole
// number of nanoseconds, t_s is printed exactly from integer nanoseconds
// (0.1 s steps give 0.3, not 0.30000000000000004).
func writeWideCSV(w io.Writer, tau0 float64, id string, x []float64) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "t_s,%s\n", id)
	stepNs := int64(math.Round(tau0 * 1e9))
	exactNs := stepNs > 0 && math.Abs(float64(stepNs)/1e9-tau0) <= 1e-15*tau0
	var buf []byte
	for k, v := range x {
		buf = buf[:0]
		if exactNs {
			buf = appendNsSeconds(buf, int64(k)*stepNs)
		} else {
			buf = strconv.AppendFloat(buf, float64(k)*tau0, 'g', -1, 64)
		}
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return err
		}
	}
	return bw.Flush()
}

// appendNsSeconds appends t (ns ≥ 0) as decimal seconds without trailing zeros.
func appendNsSeconds(buf []byte, t int64) []byte {
	buf = strconv.AppendInt(buf, t/1_000_000_000, 10)
	frac := t % 1_000_000_000
	if frac == 0 {
		return buf
	}
	d := []byte(fmt.Sprintf(".%09d", frac))
	for d[len(d)-1] == '0' {
		d = d[:len(d)-1]
	}
	return append(buf, d...)
}

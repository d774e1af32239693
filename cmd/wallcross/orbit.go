package main

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"time"

	"wallcross/orbits"
	"wallcross/scenarios"
)

func newOrbitCmd() *command {
	fs := newFlagSet("orbit")
	out := fs.String("out", "", "output SP3-d `FILE` (required)")
	start := fs.String("start", "", "first epoch, ISO 8601 on GPS time, e.g. 2021-04-28T18:00:00 (default: earliest reference epoch of the file, rounded down to the step)")
	span := fs.String("span", "", "covered `DURATION`, e.g. 6h, 90m, 1d (default: to the latest reference epoch)")
	step := fs.String("step", "5m", "epoch interval `DURATION`")
	systems := fs.String("systems", "", "system letters to include, e.g. GEC (default: every supported system in the file)")
	against := fs.String("against", "", "precise orbit `FILE` (SP3-c/d, plain or gzip) to compare the broadcast orbits with")
	unhealthy := fs.Bool("keep-unhealthy", false, "also use ephemerides whose health word is non-zero")
	galMsg := fs.String("galileo", "inav", "Galileo message to use: inav or fnav (they are never mixed)")
	extend := fs.String("extend", "0s", "let a record serve epochs up to this `DURATION` beyond its fit interval (bridges gaps; lower accuracy)")
	return &command{
		Name:  "orbit",
		Usage: "orbit NAVFILE --out FILE.sp3 [--start T --span D --step S] [--systems GEC...] [--against PRECISE.sp3]",
		Short: "broadcast ephemerides to SP3, optionally compared with precise orbits",
		Long: `Orbit reads a RINEX navigation file (2.x, 3.02-3.05 or 4.00, plain or gzip),
propagates every satellite's broadcast ephemeris on a regular grid of GPS-time
epochs and writes the positions (km) and broadcast clock polynomials (µs,
af0-af2 or -tauN+gammaN*dt, without the periodic relativistic term, as in IGS
SP3 clocks) as an SP3-d file. At each epoch the record with the nearest
reference time inside its fit interval is used (healthy records only unless
--keep-unhealthy; Galileo I/NAV unless --galileo fnav); an epoch no record
covers is written as missing. Fit intervals: GPS from the record (normally
±2 h), QZSS from its flag, Galileo and BeiDou ±1 h, GLONASS ±15 min;
--extend widens them (useful to bridge the gaps of a station-collected file
when metre accuracy is not needed).

Supported records: GPS and QZSS LNAV, Galileo I/NAV and F/NAV, BeiDou D1/D2
(including the GEO rotation) and GLONASS FDMA (RK4 with J2 and the luni-solar
terms, 60 s steps, |t - tb| <= 15 min). SBAS, NavIC and other RINEX 4 message
types are counted and reported on stderr.

With --against, the broadcast orbits are compared with the precise file at its
epochs (inside --start/--span when given) and stdout receives, per system and
per satellite: the number of satellite-epochs, the 3D RMS, the radial,
along-track and cross-track RMS, the mean radial difference, the maximum 3D
difference (metres) and the broadcast-clock RMS in ns after removing, per
epoch and system, the mean over satellites. No antenna-offset correction is
applied (broadcast orbits refer to the antenna phase centre, SP3 to the
centre of mass), so a negative radial mean of about a metre is expected.

Durations accept Go forms (30s, 5m, 6h, 1h30m), a day suffix (1d) or a
quantity with a unit (300 s, 2 h).`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("want exactly one NAVFILE, got %d arguments", len(args))
			}
			if *out == "" {
				return usageErrorf("--out FILE.sp3 is required")
			}
			var o orbits.SP3Options
			var err error
			if o.Step, err = parseCLIDuration(*step); err != nil || !(o.Step > 0) {
				return usageErrorf("bad --step %q: want a positive duration such as 5m or 300s", *step)
			}
			if *start != "" {
				if o.Start, err = orbits.ParseTime(*start); err != nil {
					return usageErrorf("bad --start: %v", err)
				}
			}
			if *span != "" {
				if o.Span, err = parseCLIDuration(*span); err != nil || o.Span < 0 {
					return usageErrorf("bad --span %q: want a duration such as 6h", *span)
				}
				if *start == "" {
					return usageErrorf("--span needs --start")
				}
			}
			for _, c := range *systems {
				if !strings.ContainsRune("GRECJ", c) {
					return usageErrorf("bad --systems %q: letters must be among G R E C J", *systems)
				}
			}
			sel := orbits.SelectOptions{KeepUnhealthy: *unhealthy}
			if sel.Extend, err = parseCLIDuration(*extend); err != nil || sel.Extend < 0 {
				return usageErrorf("bad --extend %q: want a non-negative duration such as 1h", *extend)
			}
			switch strings.ToLower(*galMsg) {
			case "inav":
				sel.GalileoMessage = "INAV"
			case "fnav":
				sel.GalileoMessage = "FNAV"
			default:
				return usageErrorf("bad --galileo %q: want inav or fnav", *galMsg)
			}

			nav, err := orbits.ReadNav(args[0])
			if err != nil {
				return err
			}
			fmt.Fprintf(stderr, "read %s: RINEX %.2f, %d ephemeris records of %d satellites\n", args[0], nav.Version, len(nav.Records), len(nav.Sats()))
			if len(nav.Unsupported) > 0 {
				fmt.Fprintf(stderr, "skipped unsupported records: %s\n", countList(nav.Unsupported))
			}
			if len(nav.Other) > 0 {
				fmt.Fprintf(stderr, "skipped non-ephemeris records: %s\n", countList(nav.Other))
			}
			sp3, err := orbits.NavSP3(nav, *systems, sel, o)
			if err != nil {
				return err
			}
			if len(sp3.Sats) == 0 {
				return fmt.Errorf("no satellite has a valid ephemeris between %v and %v GPST", o.Start, o.Start.Add(o.Span))
			}
			if err := orbits.WriteSP3File(*out, sp3); err != nil {
				return err
			}
			last := sp3.Epochs[len(sp3.Epochs)-1]
			fmt.Fprintf(stderr, "wrote %s: %d satellites, %d epochs %v to %v GPST every %g s\n", *out, len(sp3.Sats), len(sp3.Epochs), sp3.Epochs[0], last, o.Step)

			if *against == "" {
				return nil
			}
			precise, err := orbits.ReadSP3File(*against)
			if err != nil {
				return err
			}
			co := orbits.CompareOptions{Systems: *systems, Select: sel}
			if *start != "" {
				co.From, co.To = sp3.Epochs[0], last
			}
			res, err := orbits.Compare(nav, precise, co)
			if err != nil {
				return err
			}
			if len(res.Systems) == 0 {
				return fmt.Errorf("no common satellite-epochs between %s and %s", args[0], *against)
			}
			writeComparison(stdout, res, args[0], *against)
			return nil
		},
	}
}

// parseCLIDuration reads a duration in seconds: Go syntax (5m, 6h, 1h30m),
// a day count (1d, 1.5d) or a quantity with a time unit (300 s, 2 h).
func parseCLIDuration(s string) (float64, error) {
	s = strings.TrimSpace(s)
	if d, err := time.ParseDuration(s); err == nil {
		return d.Seconds(), nil
	}
	v, err := scenarios.ParseQuantity(s, scenarios.DimTime)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("bad duration %q", s)
	}
	return v, nil
}

func countList(m map[string]int) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	parts := make([]string, len(keys))
	for i, k := range keys {
		parts[i] = fmt.Sprintf("%s %d", k, m[k])
	}
	return strings.Join(parts, ", ")
}

func writeComparison(w io.Writer, res *orbits.Comparison, nav, precise string) {
	fmt.Fprintf(w, "# broadcast %s minus precise %s\n", nav, precise)
	fmt.Fprintln(w, "# lengths in m, clock in ns after removing the per-epoch system mean; no antenna-offset correction")
	header := fmt.Sprintf("%-6s %10s %9s %9s %9s %9s %10s %9s %9s", "name", "sat-epochs", "3D_rms", "radial", "along", "cross", "radial_avg", "max_3D", "clock_ns")
	row := func(s orbits.OrbitStats) {
		clk := "-"
		if s.ClockN > 0 {
			clk = fmt.Sprintf("%.3f", s.ClockRMS*1e9)
		}
		fmt.Fprintf(w, "%-6s %10d %9.3f %9.3f %9.3f %9.3f %10.3f %9.3f %9s\n", s.Name, s.N, s.RMS3D, s.RMSR, s.RMSA, s.RMSC, s.MeanR, s.Max3D, clk)
	}
	fmt.Fprintln(w, "# per system")
	fmt.Fprintln(w, header)
	for _, s := range res.Systems {
		row(s)
	}
	fmt.Fprintln(w, "# per satellite")
	fmt.Fprintln(w, header)
	for _, s := range res.Sats {
		row(s)
	}
	if res.NoEphemeris > 0 {
		fmt.Fprintf(w, "# %d precise satellite-epochs had no valid broadcast ephemeris and were left out\n", res.NoEphemeris)
	}
}

package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"wallcross/inject"
	"wallcross/orbits"
	"wallcross/scenarios"
	"wallcross/sim"
	"wallcross/sim/overlay"
)

func newOverlayCmd() *command {
	fs := newFlagSet("overlay")
	sp3Path := fs.String("sp3", "", "precise orbits of the satellites (SP3-c/d, plain or gzip) `FILE`")
	stationsPath := fs.String("stations", "", "station positions `FILE` (CSV with id,x_m,y_m,z_m), overriding the clock header")
	familiesPath := fs.String("families", "", "clock families `FILE` (CSV with clock,family); defaults per system otherwise")
	events := fs.StringArray("event", nil, "a wall `SPEC` (repeatable), e.g. t0=30min,n=0:0:1,speed=300km/s,thickness=1e4km,step=1ns")
	scenarioPath := fs.String("scenario", "", "take the walls from the walls section of `FILE` (explicit events after the first clock epoch and/or a halo-model population over the file's span)")
	out := fs.String("out", "", "output `DIR`")
	seed := fs.Uint64("seed", 1, "run seed, recorded in the manifest")
	skip := fs.Bool("skip-unknown", false, "leave clocks without a position unchanged (with a warning) instead of failing")
	return &command{
		Name:  "overlay",
		Usage: "overlay CLOCKFILE --sp3 ORBITS.sp3 (--scenario FILE | --event SPEC...) --out DIR [flags]",
		Short: "inject walls into a real RINEX clock file",
		Long: `Overlay injects domain-wall crossings into a real clock product: a RINEX clock
file (3.04 or 2.00; AS and AR records) and the SP3 precise orbits of its
satellites. Each series receives its own crossing minus that of the
reference (the ANALYSIS CLK REF clocks of the header; several make an
equal-weight ensemble), exactly as in simulation. Station positions come
from the header's SOLN STA NAME / NUM records or --stations.

The perturbed file keeps every byte of the input except the bias values
of the records a wall touches, printed in the same format; with no wall
it is the input, byte for byte. Next to it go events.csv, crossings.csv
(times in seconds after the clock file's first epoch) and manifest.json
naming the inputs with their SHA-256.

The walls come from --scenario FILE, a YAML file with a walls section as
in a scenario (profile, thickness, amplitude and coupling, explicit events
with t0 after the clock file's first epoch, and/or a population drawn
from the halo model over the file's span with --seed or the file's seed;
other sections of a full scenario are ignored), and/or from --event.
A wall SPEC is a comma-separated list of key=value:
  t0=VALUE         when the centre plane passes the geocentre: a GPS-time
                   epoch (2021-04-28T20:00:00) or a duration after the first
                   clock epoch (30min)
  n=X:Y:Z          direction of motion, celestial frame (normalised)
  speed=300km/s    normal speed (default 300 km/s)
  thickness=1e4km  wall thickness d (default 1e4 km)
  profile=NAME     gaussian (default), kink, tophat, linear-kink
and one amplitude (default lambda=1e11GeV):
  step=1ns         bias step of a unit-sensitivity clock
  peak=1e-12       peak fractional frequency
  lambda=1e11GeV   Λ_eff with ρ_DM = 0.4 GeV/cm^3, T = 1 yr, v̄ = 300 km/s
Every clock has unit effective sensitivity (Γ = 1/Λ_eff²).

Clock families (recorded in the manifest) default per system: G gps-iif-rb,
E galileo-phm, R glonass-cs, C beidou3-rb, J rb, stations hmaser.`,
		Flags: fs,
		Run: func(args []string, stdout, stderr io.Writer) error {
			if len(args) != 1 {
				return usageErrorf("want one CLOCKFILE, got %d arguments", len(args))
			}
			if *sp3Path == "" {
				return usageErrorf("missing --sp3 FILE")
			}
			if *out == "" {
				return usageErrorf("missing --out DIR")
			}
			clkPath := args[0]
			rc, err := orbits.OpenFile(clkPath)
			if err != nil {
				return err
			}
			data, err := io.ReadAll(rc)
			rc.Close()
			if err != nil {
				return fmt.Errorf("%s: %w", clkPath, err)
			}
			cf, err := overlay.ParseClockFile(clkPath, data)
			if err != nil {
				return err
			}
			sp3, err := orbits.ReadSP3File(*sp3Path)
			if err != nil {
				return err
			}
			var opt overlay.Options
			opt.SkipUnknown = *skip
			inputs := map[string]string{"clock": clkPath, "sp3": *sp3Path}
			if *stationsPath != "" {
				opt.Stations, err = readStationTable(*stationsPath)
				if err != nil {
					return err
				}
				inputs["stations"] = *stationsPath
			}
			if *familiesPath != "" {
				opt.Families, err = readFamilyTable(*familiesPath)
				if err != nil {
					return err
				}
				inputs["families"] = *familiesPath
			}
			if len(cf.Records) == 0 {
				return fmt.Errorf("%s: no AS or AR clock records", clkPath)
			}
			origin := cf.Records[0].Epoch
			for _, r := range cf.Records {
				if r.Epoch < origin {
					origin = r.Epoch
				}
			}
			last := origin
			for _, r := range cf.Records {
				if r.Epoch > last {
					last = r.Epoch
				}
			}
			var walls []inject.Wall
			runSeed := *seed
			if *scenarioPath != "" {
				wf, err := scenarios.LoadWalls(*scenarioPath)
				if err != nil {
					return err
				}
				if !fs.Changed("seed") {
					runSeed = wf.Seed
				}
				if walls, err = sim.Walls(wf.Walls, runSeed, 0, origin, last.Sub(origin)+1); err != nil {
					return err
				}
				inputs["scenario"] = *scenarioPath
			}
			for i, spec := range *events {
				w, err := parseWallSpec(spec, len(walls)+i, origin)
				if err != nil {
					return usageErrorf("--event %q: %v", spec, err)
				}
				walls = append(walls, w)
			}
			fmt.Fprintf(stderr, "overlay: %d records, %d walls\n", len(cf.Records), len(walls))
			res, err := overlay.Apply(cf, sp3, walls, opt)
			if err != nil {
				return err
			}
			for _, w := range res.Warnings {
				fmt.Fprintln(stderr, "warning:", w)
			}
			m, err := overlay.WriteDir(*out, res, inputs, clkPath, runSeed)
			if err != nil {
				return err
			}
			fmt.Fprintf(stdout, "%d of %d records changed by %d walls; wrote %s:\n", m.Changed, len(cf.Records), len(walls), *out)
			for name := range m.Files {
				fmt.Fprintf(stdout, "  %s\n", name)
			}
			fmt.Fprintln(stdout, "  manifest.json")
			return nil
		},
	}
}

// parseWallSpec reads one --event value into a wall.
func parseWallSpec(spec string, id int, origin orbits.Time) (inject.Wall, error) {
	w := inject.Wall{ID: id, Speed: 3e5, Thickness: 1e7, Profile: inject.ProfileGaussian,
		Coupling: inject.Coupling{Mode: inject.CouplingEff, LambdaEff: 1e11}}
	amp := inject.AmplitudeSpec{Mode: inject.AmplitudeDensity, RhoDM: 0.4 * inject.GeVPerCm3,
		VBar: 3e5, MeanInterval: scenarios.JulianYear}
	haveT0, haveN := false, false
	for _, kv := range strings.Split(spec, ",") {
		k, v, ok := strings.Cut(strings.TrimSpace(kv), "=")
		if !ok {
			return w, fmt.Errorf("%q is not key=value", kv)
		}
		var err error
		switch k {
		case "t0":
			if t, perr := orbits.ParseTime(v); perr == nil {
				w.T0 = t.Sub(origin)
			} else {
				w.T0, err = scenarios.ParseQuantity(v, scenarios.DimTime)
			}
			haveT0 = true
		case "n":
			parts := strings.Split(v, ":")
			if len(parts) != 3 {
				return w, fmt.Errorf("n=%s: want X:Y:Z", v)
			}
			var s float64
			for i, p := range parts {
				w.N[i], err = strconv.ParseFloat(p, 64)
				if err != nil {
					return w, fmt.Errorf("n=%s: bad component %q", v, p)
				}
				s += w.N[i] * w.N[i]
			}
			if !(s > 0) || math.IsInf(s, 0) {
				return w, fmt.Errorf("n=%s: want a non-zero finite direction", v)
			}
			for i := range w.N {
				w.N[i] /= math.Sqrt(s)
			}
			haveN = true
		case "speed":
			w.Speed, err = scenarios.ParseQuantity(v, scenarios.DimSpeed)
		case "thickness":
			w.Thickness, err = scenarios.ParseQuantity(v, scenarios.DimLength)
		case "profile":
			w.Profile, err = inject.ParseProfile(v)
		case "step":
			amp = inject.AmplitudeSpec{Mode: inject.AmplitudeStep}
			amp.Step, err = scenarios.ParseQuantity(v, scenarios.DimTime)
		case "peak":
			amp = inject.AmplitudeSpec{Mode: inject.AmplitudePeak}
			amp.PeakDnu, err = strconv.ParseFloat(v, 64)
		case "lambda":
			var e float64
			e, err = scenarios.ParseQuantity(v, scenarios.DimEnergy)
			w.Coupling.LambdaEff = e / scenarios.GeV
		default:
			return w, fmt.Errorf("unknown key %q (want t0, n, speed, thickness, profile, step, peak, lambda)", k)
		}
		if err != nil {
			return w, fmt.Errorf("%s: %v", k, err)
		}
	}
	if !haveT0 || !haveN {
		return w, fmt.Errorf("t0 and n are required")
	}
	a2, err := amp.Resolve(w.Profile, w.Coupling, w.Thickness, w.Speed)
	if err != nil {
		return w, err
	}
	w.A2 = a2
	return w, w.Validate()
}

// readStationTable reads id,x_m,y_m,z_m (other columns ignored).
func readStationTable(path string) (map[string][3]float64, error) {
	out := map[string][3]float64{}
	err := readCSVTable(path, []string{"id", "x_m", "y_m", "z_m"}, func(line int, rec []string) error {
		var p [3]float64
		for k := 0; k < 3; k++ {
			v, err := strconv.ParseFloat(rec[k+1], 64)
			if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
				return fmt.Errorf("%s:%d: bad coordinate %q (m)", path, line, rec[k+1])
			}
			p[k] = v
		}
		out[rec[0]] = p
		return nil
	})
	return out, err
}

// readFamilyTable reads clock,family.
func readFamilyTable(path string) (map[string]string, error) {
	out := map[string]string{}
	err := readCSVTable(path, []string{"clock", "family"}, func(line int, rec []string) error {
		if _, err := inject.SpeciesOf(rec[1]); err != nil {
			return fmt.Errorf("%s:%d: unknown clock family %q for %s (known: %s)", path, line, rec[1], rec[0], strings.Join(inject.Families(), ", "))
		}
		out[rec[0]] = rec[1]
		return nil
	})
	return out, err
}

// readCSVTable reads a CSV file with a header naming at least cols, and
// calls row with those columns in order.
func readCSVTable(path string, cols []string, row func(line int, rec []string) error) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.FieldsPerRecord = -1
	head, err := r.Read()
	if err != nil {
		return fmt.Errorf("%s:1: want a header with %s: %v", path, strings.Join(cols, ","), err)
	}
	idx := make([]int, len(cols))
	for i, c := range cols {
		idx[i] = -1
		for j, h := range head {
			if strings.TrimSpace(h) == c {
				idx[i] = j
			}
		}
		if idx[i] < 0 {
			return fmt.Errorf("%s:1: header lacks column %q (have %s)", path, c, strings.Join(head, ","))
		}
	}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			return nil
		}
		line, _ := r.FieldPos(0)
		if err != nil {
			return fmt.Errorf("%s:%d: %v", path, line, err)
		}
		sel := make([]string, len(cols))
		for i, j := range idx {
			if j >= len(rec) {
				return fmt.Errorf("%s:%d: missing column %q", path, line, cols[i])
			}
			sel[i] = strings.TrimSpace(rec[j])
		}
		if err := row(line, sel); err != nil {
			return err
		}
	}
}

package overlay

import (
	"bytes"
	"math"
	"os"
	"strings"
	"testing"

	"wallcross/inject"
	"wallcross/internal/extdata"
	"wallcross/orbits"
	"wallcross/sim/search"
)

// Set A of ../shared/extdata (README.txt there): CODE MGEX final products
// for 2021-04-28, a RINEX clock 3.04 file with 30 s satellite clocks
// 19:30-20:30 GPST and its 5-min SP3 orbit 18:00-24:00.
const (
	setAClk = "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_30S_CLK.CLK"
	setASP3 = "set_A_2021-118_gps/COD0MGXFIN_20211180000_01D_05M_ORB.SP3"
)

func loadSetA(t *testing.T) (*ClockFile, *orbits.SP3) {
	t.Helper()
	data, err := os.ReadFile(extdata.Path(t, setAClk))
	if err != nil {
		t.Fatal(err)
	}
	cf, err := ParseClockFile(setAClk, data)
	if err != nil {
		t.Fatal(err)
	}
	sp3, err := orbits.ReadSP3File(extdata.Path(t, setASP3))
	if err != nil {
		t.Fatal(err)
	}
	return cf, sp3
}

func TestParseSetA(t *testing.T) {
	cf, _ := loadSetA(t)
	// Counts measured on the file: 15 899 AS/AR records (grep -c), 136
	// receivers, one reference WAB200CHE (ANALYSIS CLK REF line).
	if len(cf.Records) != 15899 {
		t.Errorf("%d records, want 15899", len(cf.Records))
	}
	if len(cf.Refs) != 1 || cf.Refs[0] != "WAB200CHE" {
		t.Errorf("refs %v, want [WAB200CHE]", cf.Refs)
	}
	// SOLN STA NAME / NUM of WAB200CHE: 4327318171 566956021 4636425977 mm.
	if p := cf.Stations["WAB200CHE"]; p != [3]float64{4327318.171, 566956.021, 4636425.977} {
		t.Errorf("WAB200CHE at %v m", p)
	}
	r := cf.Records[0]
	if r.Type != "AR" || r.Name != "WAB200CHE" || r.Bias != 0.217267716775e-06 || r.Epoch != orbits.FromCalendar(2021, 4, 28, 19, 30, 0) {
		t.Errorf("first record %+v", r)
	}
}

// TestNoWallIsIdentity: with no wall the output is the input, byte for byte.
func TestNoWallIsIdentity(t *testing.T) {
	cf, sp3 := loadSetA(t)
	res, err := Apply(cf, sp3, nil, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(res.Data, cf.Data) || res.Changed != 0 {
		t.Errorf("no-wall overlay changed %d records", res.Changed)
	}
}

func strongWall(t0 float64) inject.Wall {
	// A Gaussian wall 1e4 km thick at 300 km/s with a 1 ns step for a
	// unit-sensitivity clock; tilted so that every clock crosses at a
	// different time.
	n := [3]float64{0.3, -0.4, 0.866}
	l := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
	for k := range n {
		n[k] /= l
	}
	w := inject.Wall{ID: 1, T0: t0, N: n, Speed: 3e5, Thickness: 1e7, Profile: inject.ProfileGaussian,
		Coupling: inject.Coupling{Mode: inject.CouplingEff, LambdaEff: 1e11}}
	a2, err := inject.AmplitudeSpec{Mode: inject.AmplitudeStep, Step: 1e-9}.Resolve(w.Profile, w.Coupling, w.Thickness, w.Speed)
	if err != nil {
		panic(err)
	}
	w.A2 = a2
	return w
}

// TestWallChangesOnlyBiases: output − input equals the injected model at
// every record to the printed precision, and every other byte is kept.
func TestWallChangesOnlyBiases(t *testing.T) {
	cf, sp3 := loadSetA(t)
	res, err := Apply(cf, sp3, []inject.Wall{strongWall(1800)}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Changed < 500 {
		t.Errorf("only %d records changed by a 1 ns wall in mid-file (each series changes between its own crossing and the reference's)", res.Changed)
	}
	out, err := ParseClockFile("out", res.Data)
	if err != nil {
		t.Fatal(err)
	}
	inBiasByte := make([]bool, len(cf.Data))
	for k, r := range cf.Records {
		for i := r.Start; i < r.End; i++ {
			inBiasByte[i] = true
		}
		o := out.Records[k]
		if o.Start != r.Start || o.Name != r.Name || o.Epoch != r.Epoch {
			t.Fatalf("record %d moved", k)
		}
		got := o.Bias - r.Bias
		want := res.Delta[k]
		// Rounding to the printed 12 digits: within half a unit of the
		// last digit of the new value.
		tol := printedStep(string(res.Data[o.Start:o.End])) * (1 + 1e-9)
		if math.Abs(got-want) > tol {
			t.Fatalf("%s:%d %s: output − input = %.15e s, injected %.15e s (tolerance %.1e s)", setAClk, r.Line, r.Name, got, want, tol)
		}
	}
	for i := range cf.Data {
		if !inBiasByte[i] && cf.Data[i] != res.Data[i] {
			t.Fatalf("byte %d outside any bias value changed: %q → %q", i, cf.Data[i], res.Data[i])
		}
	}
	// The reference receiver (single ANALYSIS CLK REF) stays unchanged:
	// its own crossing minus itself.
	for k, r := range cf.Records {
		if r.Name == "WAB200CHE" && res.Delta[k] != 0 {
			t.Fatalf("reference clock changed by %g s", res.Delta[k])
		}
	}
}

func TestInconsistentInputs(t *testing.T) {
	cf, _ := loadSetA(t)
	// Set B's SP3 is 2023-03-14: a different day.
	other, err := orbits.ReadSP3File(extdata.Path(t, "set_B_2023-073_multi/COD0OPSRAP_20230730000_01D_05M_ORB.SP3"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = Apply(cf, other, []inject.Wall{strongWall(1800)}, Options{})
	if err == nil || !strings.Contains(err.Error(), "must cover the clock epochs") {
		t.Errorf("different-day SP3: error %v", err)
	}
	// GRG's SP3 of the same day has GPS and GLONASS only: Galileo,
	// BeiDou and QZSS satellites lack orbits.
	grg, err := orbits.ReadSP3File(extdata.Path(t, "set_A_2021-118_gps/grg21553.sp3"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = Apply(cf, grg, []inject.Wall{strongWall(1800)}, Options{})
	if err == nil || !strings.Contains(err.Error(), "E01 (not in the SP3 file)") {
		t.Errorf("missing satellites: error %v", err)
	}
	res, err := Apply(cf, grg, []inject.Wall{strongWall(1800)}, Options{SkipUnknown: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Warnings) == 0 || !strings.Contains(strings.Join(res.Warnings, "\n"), "left unchanged: E01") {
		t.Errorf("skip option: warnings %v", res.Warnings)
	}
}

func TestParseErrors(t *testing.T) {
	good := "     3.04           C                    M                      RINEX VERSION / TYPE\n" +
		"WAB200CHE 14014M002                           0.000000000000E+00 ANALYSIS CLK REF    \n" +
		"                                                                 END OF HEADER       \n"
	for _, tc := range []struct{ name, data, want string }{
		{"not clock", "hello\n", "not a RINEX clock file"},
		{"version", strings.Replace(good, "3.04", "9.99", 1), "version 9.99 not supported"},
		{"no end", good[:strings.Index(good, "     ")+170], "no END OF HEADER"},
		{"bad record", good + "AS G05       2021 04 28 19 30  0.000000  2    0.1234X6789012E-03\n", `x:4: bad bias value`},
		{"bad type", good + "XX G05       2021 04 28 19 30  0.000000  2    0.123456789012E-03\n", `x:4: unknown record type "XX"`},
		{"bad epoch", good + "AS G05       2021 13 28 19 30  0.000000  2    0.123456789012E-03\n", `x:4: epoch out of range`},
		{"short", good + "AS G05       2021 04 28 19 30  0.000000  2    0.1234\n", `x:4: line too short`},
	} {
		_, err := ParseClockFile("x", []byte(tc.data))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want %q", tc.name, err, tc.want)
		}
	}
}

func TestFormatLike(t *testing.T) {
	for _, tc := range []struct {
		old  string
		v    float64
		want string
	}{
		{"  0.217267716775E-06", 0.217267716775e-06, "  0.217267716775E-06"},
		{" -0.243088894647E-03", -0.243088894647e-03, " -0.243088894647E-03"},
		{"  0.217267716775E-06", 0.2172677167754e-06 + 1e-9, "  0.218267716775E-06"},
		{"  0.000000000000E+00", 0, "  0.000000000000E+00"},
		{"  0.999999999999E-06", 0.9999999999999e-06, "  0.100000000000E-05"},
		{"  1.234567E+01", -12.3456789, " -1.234568E+01"},
	} {
		got, err := formatLike(tc.old, tc.v)
		if err != nil || got != tc.want {
			t.Errorf("formatLike(%q, %g) = %q, %v; want %q", tc.old, tc.v, got, err, tc.want)
		}
	}
}

// TestSearchFindsOverlaidWall: the reference pipeline, run on the real set
// A clocks with a strong overlaid wall, finds it at the right time and
// direction, while the same search on the untouched file reports nothing
// that loud.
func TestSearchFindsOverlaidWall(t *testing.T) {
	if testing.Short() {
		t.Skip("search over 250 real clocks")
	}
	cf, sp3 := loadSetA(t)
	w := strongWall(1800)
	w.A2 *= 0.3 // 0.3 ns step: strong but far from saturating
	res, err := Apply(cf, sp3, []inject.Wall{w}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	cfg := search.Config{MaxDirections: 200, Speeds: []float64{250e3, 330e3}, Thicknesses: []float64{0, 1e7}, Workers: 2}
	if raceEnabled {
		// The race detector slows the scan ~10×: a coarser bank (still
		// finer than the 20° test) keeps the test short.
		cfg.MaxDirections, cfg.Speeds, cfg.Thicknesses = 80, []float64{300e3}, []float64{0}
	}
	quiet := loudest(t, cf, sp3, cfg)
	out, err := ParseClockFile("overlaid", res.Data)
	if err != nil {
		t.Fatal(err)
	}
	net, err := Network(out, sp3, nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := search.Search(net, cfg)
	if err != nil {
		t.Fatal(err)
	}
	var best search.Candidate
	for _, c := range r.Candidates {
		if c.Stat > best.Stat {
			best = c
		}
	}
	ang := math.Acos(math.Min(1, best.N[0]*w.N[0]+best.N[1]*w.N[1]+best.N[2]*w.N[2])) * 180 / math.Pi
	t.Logf("untouched file: loudest stat %.1f; overlaid: stat %.1f at t0 %.0f s (true 1800 s), direction error %.1f deg, amplitude %.3g s", quiet, best.Stat, best.T0, ang, best.Amplitude)
	if best.Stat < 3*quiet || best.Stat < 20 {
		t.Errorf("overlaid wall found with stat %.1f; untouched file's loudest is %.1f", best.Stat, quiet)
	}
	if math.Abs(best.T0-1800) > 120 || ang > 20 {
		t.Errorf("overlaid wall found at t0 %.0f s, %.1f deg off; want 1800 s within 120 s and 20 deg", best.T0, ang)
	}
}

func loudest(t *testing.T, cf *ClockFile, sp3 *orbits.SP3, cfg search.Config) float64 {
	t.Helper()
	net, err := Network(cf, sp3, nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := search.Search(net, cfg)
	if err != nil {
		t.Fatal(err)
	}
	m := 0.0
	for _, s := range r.Stat {
		m = math.Max(m, s)
	}
	return m
}

// printedStep returns half a unit of the last printed digit of a value
// printed like s (the rounding bound of that format).
func printedStep(s string) float64 {
	t := strings.TrimSpace(s)
	ei := strings.IndexAny(t, "EeDd")
	dot := strings.IndexByte(t, '.')
	if ei < 0 || dot < 0 {
		return math.NaN()
	}
	digits := ei - dot - 1
	v, err := parseFortranFloat(t)
	if err != nil || v == 0 {
		return 0.5 * math.Pow(10, -float64(digits))
	}
	e := math.Floor(math.Log10(math.Abs(v))) + 1 // 0.ddd form exponent
	if !strings.HasPrefix(strings.TrimLeft(t, "+-"), "0.") {
		e--
	}
	return 0.5 * math.Pow(10, e-float64(digits))
}

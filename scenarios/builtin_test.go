package scenarios

import "testing"

func TestBuiltinsDecode(t *testing.T) {
	bs, err := Builtins()
	if err != nil {
		t.Fatal(err)
	}
	names := map[string]bool{}
	for _, b := range bs {
		names[b.Name] = true
	}
	for _, want := range []string{"check-single-wall", "demo"} {
		if !names[want] {
			t.Errorf("built-in scenario %q missing; have %v", want, names)
		}
	}
}

// TestCheckSingleWall pins the values outside checks rely on.
func TestCheckSingleWall(t *testing.T) {
	s, err := Resolve("check-single-wall")
	if err != nil {
		t.Fatal(err)
	}
	if got := s.Time.Start.Time.Format("2006-01-02T15:04:05"); got != "2026-01-01T00:00:00" {
		t.Errorf("start = %s", got)
	}
	if s.Time.Span.Seconds() != 7200 || s.Time.Step.Seconds() != 30 {
		t.Errorf("span, step = %g s, %g s; want 7200 s, 30 s", s.Time.Span.Seconds(), s.Time.Step.Seconds())
	}
	if len(s.Stations) != 8 || s.Reference.Clock == "" || !s.Noise.Off {
		t.Errorf("stations %d, reference %q, noise off %v", len(s.Stations), s.Reference.Clock, s.Noise.Off)
	}
	w := s.Walls
	if len(w.Events) != 1 || w.Events[0].T0.Seconds() != 3600 || w.Events[0].Speed.MetresPerSecond() != 3e5 {
		t.Fatalf("events = %+v", w.Events)
	}
	if w.Thickness.Metres() != 1e7 || w.TypicalSpeed.MetresPerSecond() != 3e5 || w.Sensitivity != "unit" {
		t.Errorf("walls = %+v", w)
	}
	if g := w.RhoDM.GeVPerCm3(); g < 0.4*(1-1e-15) || g > 0.4*(1+1e-15) {
		t.Errorf("rho_dm = %g GeV/cm^3", g)
	}
	if g := w.LambdaEff.GeV(); g < 1e11*(1-1e-15) || g > 1e11*(1+1e-15) {
		t.Errorf("lambda_eff = %g GeV", g)
	}
	if w.MeanInterval.Seconds() != JulianYear {
		t.Errorf("mean interval = %g s", w.MeanInterval.Seconds())
	}
}

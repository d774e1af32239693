package score

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"path/filepath"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Plot size, shared by all plots.
const plotW, plotH = 16 * vg.Centimeter, 11 * vg.Centimeter

// savePlot renders p in the format named by path's extension (.png or
// .svg) and writes it atomically.
func savePlot(p *plot.Plot, path string) error {
	ext := strings.ToLower(strings.TrimPrefix(filepath.Ext(path), "."))
	if ext != "png" && ext != "svg" {
		return fmt.Errorf("score: plot %s: unsupported format %q, want .png or .svg", path, ext)
	}
	wt, err := p.WriterTo(plotW, plotH, ext)
	if err != nil {
		return fmt.Errorf("score: plot %s: %w", path, err)
	}
	var b bytes.Buffer
	if _, err := wt.WriteTo(&b); err != nil {
		return fmt.Errorf("score: plot %s: %w", path, err)
	}
	return writeFileAtomic(path, b.Bytes())
}

// logTicks are gonum's log-axis ticks with labels written as 1e-11
// instead of the accumulated-rounding 9.999999999999999e-11.
type logTicks struct{}

func (logTicks) Ticks(min, max float64) []plot.Tick {
	ticks := plot.LogTicks{Prec: -1}.Ticks(min, max)
	for i := range ticks {
		if ticks[i].Label != "" {
			ticks[i].Label = fmt.Sprintf("%.0e", ticks[i].Value)
		}
	}
	return ticks
}

// fmtMetres writes a length in km for legends.
func fmtMetres(d float64) string { return fmt.Sprintf("d = %.3g km", d/1e3) }

// PlotEfficiency draws efficiency against the bias step (log axis), one
// colour per thickness: points with Clopper–Pearson bands (EfficiencyCL)
// and, where fits holds one, the fitted sigmoid. Rows without a step are
// skipped; rows of one thickness are pooled over speed.
func PlotEfficiency(path string, rows []EffRow, fits map[float64]Sigmoid) error {
	pooled, err := poolSpeeds(rows)
	if err != nil {
		return err
	}
	p := plot.New()
	p.Title.Text = "Detection efficiency"
	p.X.Label.Text = "bias step (s)"
	p.Y.Label.Text = fmt.Sprintf("efficiency (band: Clopper–Pearson %.0f %%)", EfficiencyCL*100)
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = logTicks{}
	p.Y.Min, p.Y.Max = 0, 1.05
	p.Legend.Top, p.Legend.Left = true, true
	groups := groupByThickness(pooled)
	drawn := 0
	xmin, xmax := math.Inf(1), math.Inf(-1)
	for i, g := range groups {
		var pts []EffRow
		for _, r := range g {
			if r.Step > 0 && r.N > 0 {
				pts = append(pts, r)
			}
		}
		if len(pts) == 0 {
			continue
		}
		sort.Slice(pts, func(a, b int) bool { return pts[a].Step < pts[b].Step })
		xmin, xmax = math.Min(xmin, pts[0].Step), math.Max(xmax, pts[len(pts)-1].Step)
		col := plotutil.Color(i)
		xy := make(plotter.XYs, len(pts))
		band := make(plotter.XYs, 0, 2*len(pts))
		for j, r := range pts {
			xy[j] = plotter.XY{X: r.Step, Y: r.Eff}
			band = append(band, plotter.XY{X: r.Step, Y: r.CP.Low})
		}
		for j := len(pts) - 1; j >= 0; j-- {
			band = append(band, plotter.XY{X: pts[j].Step, Y: pts[j].CP.High})
		}
		if len(pts) > 1 {
			poly, err := plotter.NewPolygon(band)
			if err != nil {
				return fmt.Errorf("score: plot: %w", err)
			}
			r, gr, b, _ := col.RGBA()
			poly.Color = color.NRGBA{uint8(r >> 8), uint8(gr >> 8), uint8(b >> 8), 60}
			poly.LineStyle.Width = 0
			p.Add(poly)
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return fmt.Errorf("score: plot: %w", err)
		}
		sc.GlyphStyle.Color = col
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(sc)
		p.Legend.Add(fmtMetres(g[0].Thickness), sc)
		if fit, ok := fits[g[0].Thickness]; ok {
			lo, hi := math.Log10(pts[0].Step), math.Log10(pts[len(pts)-1].Step)
			line := make(plotter.XYs, 0, 101)
			for k := 0; k <= 100; k++ {
				s := math.Pow(10, lo+(hi-lo)*float64(k)/100)
				line = append(line, plotter.XY{X: s, Y: fit.Eval(s)})
			}
			l, err := plotter.NewLine(line)
			if err != nil {
				return fmt.Errorf("score: plot: %w", err)
			}
			l.Color = col
			p.Add(l)
		}
		drawn++
	}
	if drawn == 0 {
		return fmt.Errorf("score: plot %s: no cell has a step amplitude and injections", path)
	}
	// Explicit log range (a single point would give an empty range).
	p.X.Min, p.X.Max = xmin/2, xmax*2
	return savePlot(p, path)
}

func groupByThickness(rows []EffRow) [][]EffRow {
	SortEff(rows)
	var out [][]EffRow
	for i, r := range rows {
		if i == 0 || r.Thickness != rows[i-1].Thickness {
			out = append(out, nil)
		}
		out[len(out)-1] = append(out[len(out)-1], r)
	}
	return out
}

// PlotROC draws efficiency against false alarms per day.
func PlotROC(path string, roc []ROCPoint) error {
	var xy plotter.XYs
	for _, r := range roc {
		if !math.IsNaN(r.Efficiency) && !math.IsNaN(r.FalsePerDay) && !math.IsInf(r.FalsePerDay, 0) {
			xy = append(xy, plotter.XY{X: r.FalsePerDay, Y: r.Efficiency})
		}
	}
	if len(xy) == 0 {
		return fmt.Errorf("score: plot %s: no ROC point", path)
	}
	p := plot.New()
	p.Title.Text = "ROC"
	p.X.Label.Text = "false alarms per day"
	p.Y.Label.Text = "efficiency"
	p.X.Min, p.Y.Min, p.Y.Max = 0, 0, 1.05
	l, s, err := plotter.NewLinePoints(xy)
	if err != nil {
		return fmt.Errorf("score: plot: %w", err)
	}
	l.Color, s.Color = plotutil.Color(0), plotutil.Color(0)
	p.Add(l, s)
	return savePlot(p, path)
}

// PlotReach draws the exclusion curves Λ_eff(d) on log-log axes, one per
// mean interval T (smaller Λ_eff is excluded). Thicknesses where no T
// gives a limit are shaded grey; a limit-less thickness of one T is marked
// with a cross of that curve's colour at the bottom of the plot, and a
// grid-edge point (a lower bound on the limit) with a triangle.
func PlotReach(path string, pts []ReachPoint, span float64) error {
	var Ts []float64
	byT := map[float64][]ReachPoint{}
	dset := map[float64]bool{}
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, q := range pts {
		if _, ok := byT[q.MeanInterval]; !ok {
			Ts = append(Ts, q.MeanInterval)
		}
		byT[q.MeanInterval] = append(byT[q.MeanInterval], q)
		dset[q.Thickness] = true
		if !math.IsNaN(q.Lambda) {
			ymin, ymax = math.Min(ymin, q.Lambda), math.Max(ymax, q.Lambda)
		}
	}
	if len(dset) == 0 {
		return fmt.Errorf("score: plot %s: no reach points", path)
	}
	if math.IsInf(ymin, 1) {
		ymin, ymax = 1, 10
	}
	ymin, ymax = ymin/3, ymax*3
	ds := make([]float64, 0, len(dset))
	for d := range dset {
		ds = append(ds, d)
	}
	sort.Float64s(ds)
	sort.Float64s(Ts)
	p := plot.New()
	p.Title.Text = fmt.Sprintf("Exclusion (Λ_eff below the curves), T_obs = %s", fmtDuration(span))
	p.X.Label.Text = "wall thickness d (m)"
	p.Y.Label.Text = "Λ_eff (GeV)"
	p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
	p.X.Tick.Marker, p.Y.Tick.Marker = logTicks{}, logTicks{}
	p.Y.Min, p.Y.Max = ymin, ymax
	p.X.Min, p.X.Max = ds[0]/2, ds[len(ds)-1]*2
	p.Legend.Top = true
	// Shade thicknesses with no limit for any T.
	var shaded bool
	for i, d := range ds {
		hasLimit := false
		for _, T := range Ts {
			for _, q := range byT[T] {
				if q.Thickness == d && !math.IsNaN(q.Lambda) {
					hasLimit = true
				}
			}
		}
		if hasLimit {
			continue
		}
		lo, hi := d/math.Sqrt(3), d*math.Sqrt(3)
		if i > 0 {
			lo = math.Sqrt(d * ds[i-1])
		}
		if i+1 < len(ds) {
			hi = math.Sqrt(d * ds[i+1])
		}
		poly, err := plotter.NewPolygon(plotter.XYs{{X: lo, Y: ymin}, {X: hi, Y: ymin}, {X: hi, Y: ymax}, {X: lo, Y: ymax}})
		if err != nil {
			return fmt.Errorf("score: plot: %w", err)
		}
		poly.Color = color.Gray{Y: 220}
		poly.LineStyle.Width = 0
		p.Add(poly)
		if !shaded {
			p.Legend.Add("no limit", poly)
			shaded = true
		}
	}
	edgeLegend := false
	for i, T := range Ts {
		col := plotutil.Color(i)
		var line, miss, edge plotter.XYs
		status := ""
		for _, q := range byT[T] {
			if q.Status == ReachGridEdge {
				edge = append(edge, plotter.XY{X: q.Thickness, Y: q.Lambda})
			}
			if math.IsNaN(q.Lambda) {
				miss = append(miss, plotter.XY{X: q.Thickness, Y: ymin * 1.15})
				if q.Status == ReachNotPossible {
					status = " (no limit possible: T > T_obs/−ln(1−CL))"
				}
				continue
			}
			line = append(line, plotter.XY{X: q.Thickness, Y: q.Lambda})
		}
		label := "T = " + fmtDuration(T) + status
		if len(line) > 0 {
			l, s, err := plotter.NewLinePoints(line)
			if err != nil {
				return fmt.Errorf("score: plot: %w", err)
			}
			l.Color, s.Color = col, col
			p.Add(l, s)
			p.Legend.Add(label, l, s)
		}
		if len(edge) > 0 {
			s, err := plotter.NewScatter(edge)
			if err != nil {
				return fmt.Errorf("score: plot: %w", err)
			}
			s.GlyphStyle.Shape = draw.TriangleGlyph{}
			s.GlyphStyle.Color = col
			s.GlyphStyle.Radius = vg.Points(4)
			p.Add(s)
			if !edgeLegend {
				p.Legend.Add("grid edge: limit is at least this", s)
				edgeLegend = true
			}
		}
		if len(miss) > 0 {
			s, err := plotter.NewScatter(miss)
			if err != nil {
				return fmt.Errorf("score: plot: %w", err)
			}
			s.GlyphStyle.Shape = draw.CrossGlyph{}
			s.GlyphStyle.Color = col
			p.Add(s)
			if len(line) == 0 {
				p.Legend.Add(label, s)
			}
		}
	}
	return savePlot(p, path)
}

// fmtDuration writes a duration in s with a readable unit.
func fmtDuration(s float64) string {
	switch {
	case s >= 365.25*86400:
		return fmt.Sprintf("%.3g yr", s/(365.25*86400))
	case s >= 86400:
		return fmt.Sprintf("%.3g d", s/86400)
	case s >= 3600:
		return fmt.Sprintf("%.3g h", s/3600)
	default:
		return fmt.Sprintf("%.3g s", s)
	}
}

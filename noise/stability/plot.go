package stability

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Curve is one labelled stability curve for Plot.
type Curve struct {
	Label   string
	Results []Result
}

// errPoints adapts a Result slice to plotter.XYer and plotter.YErrorer.
type errPoints []Result

func (e errPoints) Len() int                    { return len(e) }
func (e errPoints) XY(i int) (float64, float64) { return e[i].Tau, e[i].Value }
func (e errPoints) YError(i int) (float64, float64) {
	lo, hi := e[i].Value-e[i].CILow, e[i].CIHigh-e[i].Value
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return 0, 0
	}
	return lo, hi
}

// ModelCurve is a model σ(τ) drawn as a dashed line (F evaluated on a log
// grid spanning the data).
type ModelCurve struct {
	Label string
	F     func(tau float64) float64
}

// Plot draws σ(τ) curves on log-log axes with their confidence intervals as
// error bars, and any model curves. ylabel names the quantity ("σy(τ)", or
// "σx(τ) [s]" for TDEV).
func Plot(title, ylabel string, curves []Curve, models ...ModelCurve) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = "τ [s]"
	p.Y.Label.Text = ylabel
	p.X.Scale = plot.LogScale{}
	p.Y.Scale = plot.LogScale{}
	p.X.Tick.Marker = decadeTicks{}
	p.Y.Tick.Marker = decadeTicks{}
	p.Add(plotter.NewGrid())
	p.Legend.Top = false
	p.Legend.Left = true
	tmin, tmax := math.Inf(1), math.Inf(-1)
	for ci, c := range curves {
		var pts errPoints
		for _, r := range c.Results {
			if r.Value > 0 && r.Tau > 0 && !math.IsInf(r.Value, 0) {
				pts = append(pts, r)
				tmin, tmax = math.Min(tmin, r.Tau), math.Max(tmax, r.Tau)
			}
		}
		if len(pts) == 0 {
			continue
		}
		col := plotColor(ci)
		line, sc, err := plotter.NewLinePoints(pts)
		if err != nil {
			return nil, fmt.Errorf("stability: plot %s: %w", c.Label, err)
		}
		line.Color = col
		sc.Color = col
		sc.Shape = draw.CircleGlyph{}
		bars, err := plotter.NewYErrorBars(pts)
		if err != nil {
			return nil, fmt.Errorf("stability: plot %s: %w", c.Label, err)
		}
		bars.Color = col
		p.Add(line, sc, bars)
		p.Legend.Add(c.Label, line, sc)
	}
	if math.IsInf(tmin, 1) {
		return nil, fmt.Errorf("stability: plot: no positive values to draw")
	}
	for mi, mc := range models {
		if mc.F == nil {
			continue
		}
		var xy plotter.XYs
		lo, hi := math.Log10(tmin), math.Log10(tmax)
		if hi == lo {
			lo, hi = lo-0.5, hi+0.5
		}
		for i := 0; i <= 100; i++ {
			t := math.Pow(10, lo+(hi-lo)*float64(i)/100)
			if v := mc.F(t); v > 0 && !math.IsInf(v, 0) {
				xy = append(xy, plotter.XY{X: t, Y: v})
			}
		}
		if len(xy) > 1 {
			l, err := plotter.NewLine(xy)
			if err != nil {
				return nil, fmt.Errorf("stability: plot model: %w", err)
			}
			l.Color = color.Gray{Y: uint8(80 + 60*(mi%2))}
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(3 + 2*float64(mi%3))}
			p.Add(l)
			p.Legend.Add(mc.Label, l)
		}
	}
	return p, nil
}

// decadeTicks labels the decades of a log axis as 1, 10, 100, 1000 and
// 1e4, 1e-13 (instead of the float noise of plot.LogTicks), adding 2× and
// 5× labels on short axes.
type decadeTicks struct{}

func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.LogTicks{Prec: -1}.Ticks(min, max)
	labelled := 0
	for _, t := range ts {
		if t.Label != "" {
			labelled++
		}
	}
	for i := range ts {
		v := ts[i].Value
		e := math.Floor(math.Log10(v) + 1e-9)
		mant := math.Round(v / math.Pow(10, e))
		// label the decades, and 2 and 5 times them when the axis spans
		// less than two decades
		if ts[i].Label == "" && !(labelled < 3 && (mant == 2 || mant == 5)) {
			continue
		}
		switch {
		case e >= 0 && e <= 3:
			ts[i].Label = strconv.FormatFloat(mant*math.Pow(10, e), 'f', 0, 64)
		case mant == 1:
			ts[i].Label = "1e" + strconv.Itoa(int(e))
		default:
			ts[i].Label = strconv.Itoa(int(mant)) + "e" + strconv.Itoa(int(e))
		}
	}
	return ts
}

func plotColor(i int) color.Color {
	// a fixed colour-blind-safe cycle (Okabe & Ito 2008 palette, from memory)
	pal := []color.RGBA{
		{0, 114, 178, 255}, {213, 94, 0, 255}, {0, 158, 115, 255}, {204, 121, 167, 255},
		{230, 159, 0, 255}, {86, 180, 233, 255}, {0, 0, 0, 255},
	}
	return pal[i%len(pal)]
}

// WritePlot renders p as format "png" or "svg" (16 cm × 11 cm) to w.
func WritePlot(w io.Writer, p *plot.Plot, format string) error {
	format = strings.ToLower(format)
	if format != "png" && format != "svg" {
		return fmt.Errorf("stability: plot format %q: want png or svg", format)
	}
	wt, err := p.WriterTo(16*vg.Centimeter, 11*vg.Centimeter, format)
	if err != nil {
		return fmt.Errorf("stability: plot: %w", err)
	}
	_, err = wt.WriteTo(w)
	return err
}

package main

import (
	"image/color"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

// transferPlot draws an answer's transfer curve (synth.Curve) with the goal
// points and the straight line through the ends that linearity is
// measured against. It returns nil when the answer has no curve.
func transferPlot(p *synth.Problem, sol synth.Solution) (*plot.Plot, error) {
	c, ok := synth.Curve(p, sol.Options)
	if !ok {
		return nil, nil
	}
	curve := make(plotter.XYs, len(c.Points))
	for i, pt := range c.Points {
		curve[i] = plotter.XY{X: pt.Celsius, Y: pt.Value}
	}
	pl := plot.New()
	pl.Title.Text = "transfer curve of rank " + strconv.Itoa(sol.Rank)
	pl.X.Label.Text = "temperature, °C"
	pl.Y.Label.Text = c.Node
	if c.Codes {
		pl.Y.Label.Text = c.Node + ", ADC codes"
	} else {
		pl.Y.Tick.Marker = engTicks{units.Volt}
	}
	pl.Add(plotter.NewGrid())
	if err := addCurveLines(pl, curve); err != nil {
		return nil, err
	}
	if len(c.Goals) > 0 {
		goals := make(plotter.XYs, len(c.Goals))
		for i, g := range c.Goals {
			goals[i] = plotter.XY{X: g.Celsius, Y: g.Value}
		}
		sc, err := plotter.NewScatter(goals)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle.Shape = draw.CrossGlyph{}
		sc.GlyphStyle.Radius = vg.Points(5)
		sc.GlyphStyle.Color = color.RGBA{R: 200, G: 30, B: 30, A: 255}
		pl.Add(sc)
		pl.Legend.Add("goal", sc)
	}
	pl.Legend.Top = true
	return pl, nil
}

// addCurveLines draws the curve and the dashed line through its ends.
func addCurveLines(pl *plot.Plot, curve plotter.XYs) error {
	ln, err := plotter.NewLine(curve)
	if err != nil {
		return err
	}
	ln.LineStyle.Color = color.RGBA{R: 40, G: 90, B: 160, A: 255}
	ln.LineStyle.Width = vg.Points(1.5)
	pl.Add(ln)
	pl.Legend.Add("this design", ln)
	ends, err := plotter.NewLine(plotter.XYs{curve[0], curve[len(curve)-1]})
	if err != nil {
		return err
	}
	ends.LineStyle.Color = color.RGBA{R: 120, G: 120, B: 120, A: 255}
	ends.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	pl.Add(ends)
	pl.Legend.Add("line through the ends", ends)
	return nil
}

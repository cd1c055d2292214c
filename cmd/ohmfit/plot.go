package main

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// engTicks labels an axis in engineering units ("200 µW", "1.5 mV").
type engTicks struct{ unit units.Unit }

// Ticks places gonum's default ticks and relabels the major ones.
func (e engTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := safeTicks(lo, hi)
	// Four significant digits, or more when a narrow range would give two
	// ticks the same label.
	for sig := 4; sig <= 9; sig++ {
		seen := map[string]bool{}
		clash := false
		for i := range ts {
			if ts[i].Label == "" {
				continue
			}
			ts[i].Label = engLabel(ts[i].Value, e.unit, sig)
			clash = clash || seen[ts[i].Label]
			seen[ts[i].Label] = true
		}
		if !clash {
			break
		}
	}
	return ts
}

// engLabel writes v with its unit at sig significant digits.
func engLabel(v float64, u units.Unit, sig int) string {
	if sig <= 4 {
		return units.FormatUnit(v, u)
	}
	return units.FormatUnitSig(v, u, sig)
}

// percentTicks labels an axis of fractions as percentages.
type percentTicks struct{}

// Ticks places gonum's default ticks and writes them as percentages.
func (percentTicks) Ticks(lo, hi float64) []plot.Tick {
	ts := safeTicks(lo, hi)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = strings.TrimSuffix(strings.TrimRight(fmt.Sprintf("%.4f", 100*ts[i].Value), "0"), ".") + "%"
		}
	}
	return ts
}

// glyphs by part count: 1 circle, 2 triangle, 3 square, more: cross.
var glyphs = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}, draw.CrossGlyph{}}

// plotPareto draws the answers' error against power, one marker shape per
// part count, the Pareto front as a line and the chosen answer ringed.
func plotPareto(w io.Writer, path string, p *synth.Problem, sols []synth.Solution, chosen int) error {
	pl, err := paretoPlot(p, sols, chosen)
	if err != nil {
		return err
	}
	plots := []*plot.Plot{pl}
	height := 4.5 * vg.Inch
	// A template with a temperature sweep also gets the chosen answer's
	// transfer curve against its goals.
	if chosen >= 1 && chosen <= len(sols) {
		if tc, err := transferPlot(p, sols[chosen-1]); err != nil {
			return err
		} else if tc != nil {
			plots = append(plots, tc)
			height = 9 * vg.Inch
		}
	}
	return savePlots(w, path, plots, 7*vg.Inch, height)
}

// paretoPlot is the error-against-power plot of plotPareto.
func paretoPlot(p *synth.Problem, sols []synth.Solution, chosen int) (*plot.Plot, error) {
	pl := plot.New()
	pl.Title.Text = "error against power"
	if p.Spec.Template.Name != "" {
		pl.Title.Text = p.Spec.Template.Name + ": error against power"
	}
	pl.X.Label.Text = "power dissipated in the resistors, worst condition"
	pl.Y.Label.Text = "largest goal error"
	pl.X.Tick.Marker = engTicks{units.Watt}
	pl.Y.Tick.Marker = percentTicks{}
	pl.Add(plotter.NewGrid())
	pts := paretoPoints(sols)
	byCount := map[int]plotter.XYs{}
	var counts []int
	for _, q := range pts {
		if _, ok := byCount[q.parts]; !ok {
			counts = append(counts, q.parts)
		}
		byCount[q.parts] = append(byCount[q.parts], plotter.XY{X: q.power, Y: q.err})
	}
	sort.Ints(counts)
	for i, n := range counts {
		sc, err := plotter.NewScatter(byCount[n])
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle.Shape = glyphs[min(i, len(glyphs)-1)]
		sc.GlyphStyle.Radius = vg.Points(3)
		sc.GlyphStyle.Color = color.RGBA{R: 40, G: 90, B: 160, A: 255}
		pl.Add(sc)
		pl.Legend.Add(counted(n, "part", "parts"), sc)
	}
	// The error-power staircase: by rising power, each point with a lower
	// error than every point of lower or equal power.
	sorted := append([]paretoPoint(nil), pts...)
	sort.Slice(sorted, func(a, b int) bool {
		if sorted[a].power != sorted[b].power {
			return sorted[a].power < sorted[b].power
		}
		return sorted[a].err < sorted[b].err
	})
	var front plotter.XYs
	best := math.Inf(1)
	for _, q := range sorted {
		if q.err < best {
			front = append(front, plotter.XY{X: q.power, Y: q.err})
			best = q.err
		}
	}
	if len(front) > 1 {
		ln, err := plotter.NewLine(front)
		if err != nil {
			return nil, err
		}
		ln.LineStyle.Color = color.RGBA{R: 120, G: 120, B: 120, A: 255}
		ln.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		pl.Add(ln)
		pl.Legend.Add(wordPowerFront, ln)
	}
	for _, q := range pts {
		if q.rank != chosen {
			continue
		}
		ring, err := plotter.NewScatter(plotter.XYs{{X: q.power, Y: q.err}})
		if err != nil {
			return nil, err
		}
		ring.GlyphStyle.Shape = draw.RingGlyph{}
		ring.GlyphStyle.Radius = vg.Points(7)
		ring.GlyphStyle.Color = color.RGBA{R: 200, G: 30, B: 30, A: 255}
		pl.Add(ring)
		pl.Legend.Add(fmt.Sprintf("rank %d (chosen)", chosen), ring)
	}
	pl.Legend.Top = true
	return pl, nil
}

// maxHistConditions is the most conditions a target gets one histogram
// each in; beyond it, its conditions share one spread panel, so that the
// picture (and the memory that draws it) does not grow with a sweep's
// length. An 801-point sweep drew 801 panels, 1.8 GB of pixels, before.
const maxHistConditions = 4

// plotHistograms draws one Monte Carlo histogram per target and condition,
// with the target's limits as vertical lines; a target read in more than
// maxHistConditions conditions gets one spread panel instead (spreadPlot).
func plotHistograms(w io.Writer, path string, t *constraints.Template, rep *variation.Report) error {
	var plots []*plot.Plot
	perTarget := map[int][]variation.Goal{}
	for _, g := range rep.Goals {
		perTarget[g.Target] = append(perTarget[g.Target], g)
	}
	spread := map[int]bool{}
	for _, g := range rep.Goals {
		if gs := perTarget[g.Target]; len(gs) > maxHistConditions {
			if !spread[g.Target] {
				spread[g.Target] = true
				pl, err := spreadPlot(t, gs, rep.Samples)
				if err != nil {
					return err
				}
				if pl != nil {
					plots = append(plots, pl)
				}
			}
			continue
		}
		var vals plotter.Values
		for _, v := range g.Samples {
			if !math.IsNaN(v) {
				vals = append(vals, v)
			}
		}
		if len(vals) == 0 {
			continue
		}
		tg := t.Targets[g.Target]
		u := tg.Kind.Unit()
		pl := plot.New()
		pl.Title.Text = fmt.Sprintf("%s, %s: %s, yield %s", g.Label, g.CondName, counted(len(vals), "sample", "samples"), yieldText(g.MonteCarlo.Yield))
		pl.X.Label.Text = axisLabel(g.Label, tg.Kind)
		pl.Y.Label.Text = "samples"
		pl.X.Tick.Marker = engTicks{u}
		h, err := plotter.NewHist(vals, 50)
		if err != nil {
			return err
		}
		h.FillColor = color.RGBA{R: 120, G: 160, B: 210, A: 255}
		pl.Add(h)
		top := 0.0
		for _, b := range h.Bins {
			top = math.Max(top, b.Weight)
		}
		lo, hi := tg.Band()
		for _, x := range []float64{lo, hi} {
			if math.IsInf(x, 0) {
				continue
			}
			if err := addLimitLine(pl, plotter.XYs{{X: x, Y: 0}, {X: x, Y: top * 1.05}}); err != nil {
				return err
			}
		}
		plots = append(plots, pl)
	}
	if len(plots) == 0 {
		return fmt.Errorf("no Monte Carlo samples to draw (is --samples 0?)")
	}
	return savePlots(w, path, plots, panelWidth, vg.Length(len(plots))*panelHeight)
}

// The size of one panel of check --plot.
const (
	panelWidth  = 7 * vg.Inch
	panelHeight = 3 * vg.Inch
)

// legendRoom raises the top of pl's y axis so that the legend, drawn in
// the top corner of a panel of the given size, sits above every data
// point instead of over the lines (a limit at the top edge hid under it).
// Only the panel's height matters: the title and the x axis take the
// same room whatever the y range.
func legendRoom(pl *plot.Plot, width, height vg.Length) {
	dc := pl.DataCanvas(draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: width, Y: height}}})
	h := dc.Max.Y - dc.Min.Y
	free := h - pl.Legend.Rectangle(dc).Size().Y - vg.Points(6)
	if free < h/3 || pl.Y.Max <= pl.Y.Min {
		return // a legend taller than two thirds of the panel: leave the axis alone
	}
	pl.Y.Max = pl.Y.Min + (pl.Y.Max-pl.Y.Min)*float64(h/free)
}

// spreadPlot draws one target over many conditions: its nominal value,
// the Monte Carlo 0.135 %…99.865 % points (or, with too few samples, the
// lowest and highest of the run's samples) and the worst-case range per
// condition, against the condition's temperature where every one has one
// (else its place in the list), with the target's limits as horizontal
// lines. It returns nil when no condition has samples.
func spreadPlot(t *constraints.Template, gs []variation.Goal, samples int) (*plot.Plot, error) {
	byTemp := true
	for _, g := range gs {
		if g.Condition < 0 || g.Condition >= len(t.Conditions) || !t.Conditions[g.Condition].HasTemperature {
			byTemp = false
		}
	}
	var nom, lo, hi, wlo, whi plotter.XYs
	minYield, drawn := 1.0, 0
	for i, g := range gs {
		if g.MonteCarlo.Failed >= len(g.Samples) && len(g.Samples) > 0 || math.IsNaN(g.MonteCarlo.Mean) {
			continue
		}
		x := float64(i + 1)
		if byTemp {
			x = t.Conditions[g.Condition].Temperature
		}
		nom = append(nom, plotter.XY{X: x, Y: g.Nominal})
		lo = append(lo, plotter.XY{X: x, Y: g.MonteCarlo.Low})
		hi = append(hi, plotter.XY{X: x, Y: g.MonteCarlo.High})
		wlo = append(wlo, plotter.XY{X: x, Y: g.WorstMin})
		whi = append(whi, plotter.XY{X: x, Y: g.WorstMax})
		minYield = math.Min(minYield, g.MonteCarlo.Yield)
		drawn++
	}
	if drawn == 0 {
		return nil, nil
	}
	tg := t.Targets[gs[0].Target]
	u := tg.Kind.Unit()
	pl := plot.New()
	pl.Title.Text = fmt.Sprintf("%s over %d conditions: lowest yield %s", gs[0].Label, drawn, yieldText(minYield))
	pl.Y.Label.Text = axisLabel(gs[0].Label, tg.Kind)
	pl.Y.Tick.Marker = engTicks{u}
	pl.X.Label.Text = "condition (place in the list)"
	if byTemp {
		pl.X.Label.Text = "temperature (°C)"
	}
	add := func(name string, pts plotter.XYs, c color.RGBA, dashed bool) error {
		ln, err := plotter.NewLine(pts)
		if err != nil {
			return err
		}
		ln.LineStyle.Color = c
		ln.LineStyle.Width = vg.Points(1.2)
		if dashed {
			ln.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		}
		pl.Add(ln)
		if name != "" {
			pl.Legend.Add(name, ln)
		}
		return nil
	}
	blue, grey := color.RGBA{R: 40, G: 90, B: 170, A: 255}, color.RGBA{R: 120, G: 120, B: 120, A: 255}
	tlo, thi := "0.135 %", "99.865 %"
	if !variation.TailsEstimated(samples) {
		tlo, thi = "lowest", "highest" // too few samples to estimate the points (tailWords)
	}
	for _, l := range []struct {
		name   string
		pts    plotter.XYs
		c      color.RGBA
		dashed bool
	}{
		{"nominal", nom, color.RGBA{A: 255}, false},
		{"Monte Carlo " + tlo, lo, blue, false},
		{"Monte Carlo " + thi, hi, blue, false},
		{"worst case", wlo, grey, true},
		{"", whi, grey, true},
	} {
		if err := add(l.name, l.pts, l.c, l.dashed); err != nil {
			return nil, err
		}
	}
	x0, x1 := nom[0].X, nom[len(nom)-1].X
	if x1 == x0 {
		x1 = x0 + 1
	}
	bandLo, bandHi := tg.Band()
	for _, y := range []float64{bandLo, bandHi} {
		if math.IsInf(y, 0) {
			continue
		}
		if err := addLimitLine(pl, plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}}); err != nil {
			return nil, err
		}
	}
	pl.Legend.Top = true
	legendRoom(pl, panelWidth, panelHeight)
	return pl, nil
}

// addLimitLine draws a target's limit through pts, in the one style every
// panel gives its limits.
func addLimitLine(pl *plot.Plot, pts plotter.XYs) error {
	ln, err := plotter.NewLine(pts)
	if err != nil {
		return err
	}
	ln.LineStyle.Color = color.RGBA{R: 200, G: 30, B: 30, A: 255}
	ln.LineStyle.Width = vg.Points(1.5)
	pl.Add(ln)
	return nil
}

// savePlots draws the plots one above the other and writes SVG or PNG,
// chosen by path's extension.
func savePlots(w io.Writer, path string, plots []*plot.Plot, width, height vg.Length) error {
	grid := make([][]*plot.Plot, len(plots))
	for i, p := range plots {
		fixAxes(p)
		grid[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(12), PadTop: vg.Points(6), PadBottom: vg.Points(6), PadLeft: vg.Points(6), PadRight: vg.Points(12)}
	if strings.HasSuffix(strings.ToLower(path), ".png") {
		c := vgimg.NewWith(vgimg.UseWH(width, height), vgimg.UseDPI(110))
		dc := draw.New(c)
		dc.SetColor(color.White)
		dc.Fill(dc.Rectangle.Path())
		for i, cv := range plot.Align(grid, tiles, dc) {
			grid[i][0].Draw(cv[0])
		}
		_, err := vgimg.PngCanvas{Canvas: c}.WriteTo(w)
		return err
	}
	c := vgsvg.New(width, height)
	dc := draw.New(c)
	for i, cv := range plot.Align(grid, tiles, dc) {
		grid[i][0].Draw(cv[0])
	}
	_, err := c.WriteTo(w)
	return err
}

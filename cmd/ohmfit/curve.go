package main

import (
	"image/color"
	"math"
	"slices"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

// transferPlot draws an answer's transfer curve over the template's
// temperature range — the voltage (or ADC code) of the node its goals read,
// solved every half degree with each sensor at that temperature — with the
// goal points and the straight line through the ends that linearity is
// measured against. It returns nil when the template has no temperatures or
// no node-voltage target.
func transferPlot(p *synth.Problem, sol synth.Solution) (*plot.Plot, error) {
	t := p.Spec.Template
	node, scale, unit, ok := curveNode(t)
	if !ok {
		return nil, nil
	}
	var temps []float64
	var condAt []int
	for ci, c := range t.Conditions {
		if c.HasTemperature {
			temps = append(temps, c.Temperature)
			condAt = append(condAt, ci)
		}
	}
	if len(temps) < 2 {
		return nil, nil
	}
	lo, hi := slices.Min(temps), slices.Max(temps)
	ni, _ := p.Spec.Network.NodeIndex(node)
	s := p.Spec.Network.NewSolver()
	read := func(celsius float64) (float64, bool) {
		// Values of the condition nearest in temperature, sensors at celsius.
		best := 0
		for k, tc := range temps {
			if math.Abs(tc-celsius) < math.Abs(temps[best]-celsius) {
				best = k
			}
		}
		vals, err := t.ValuesAt(condAt[best], celsius)
		if err != nil {
			return 0, false
		}
		for i, v := range vals {
			s.SetValue(i, v)
		}
		for k, i := range p.Spec.Free {
			s.SetValue(i, sol.Options[k].Value)
		}
		if s.Solve() != nil {
			return 0, false
		}
		return s.Voltage(ni) * scale, true
	}
	var curve plotter.XYs
	for c := lo; c <= hi+1e-9; c += 0.5 {
		if v, ok := read(c); ok {
			curve = append(curve, plotter.XY{X: c, Y: v})
		}
	}
	if len(curve) < 2 {
		return nil, nil
	}
	pl := plot.New()
	pl.Title.Text = "transfer curve of rank " + strconv.Itoa(sol.Rank)
	pl.X.Label.Text = "temperature, °C"
	pl.Y.Label.Text = node
	if scale != 1 {
		pl.Y.Label.Text = node + ", ADC codes"
	} else {
		pl.Y.Tick.Marker = engTicks{unit}
	}
	pl.Add(plotter.NewGrid())
	ln, err := plotter.NewLine(curve)
	if err != nil {
		return nil, err
	}
	ln.LineStyle.Color = color.RGBA{R: 40, G: 90, B: 160, A: 255}
	ln.LineStyle.Width = vg.Points(1.5)
	pl.Add(ln)
	pl.Legend.Add("this design", ln)
	ends, err := plotter.NewLine(plotter.XYs{curve[0], curve[len(curve)-1]})
	if err != nil {
		return nil, err
	}
	ends.LineStyle.Color = color.RGBA{R: 120, G: 120, B: 120, A: 255}
	ends.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	pl.Add(ends)
	pl.Legend.Add("line through the ends", ends)
	var goals plotter.XYs
	for _, tg := range t.Targets {
		if !tg.HasEquals || len(tg.Nodes) != 1 || tg.Nodes[0] != node || (tg.Kind != constraints.Voltage && tg.Kind != constraints.Code) {
			continue
		}
		for _, w := range tg.When {
			if ci, ok := t.ConditionIndex(w); ok && t.Conditions[ci].HasTemperature {
				g := tg.Equals
				if tg.Kind == constraints.Voltage {
					g *= scale
				} else if scale == 1 {
					continue
				}
				goals = append(goals, plotter.XY{X: t.Conditions[ci].Temperature, Y: g})
			}
		}
	}
	if len(goals) > 0 {
		sort.Slice(goals, func(i, j int) bool { return goals[i].X < goals[j].X })
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

// curveNode picks the node a transfer curve shows: that of the first code,
// voltage, linearity or sensitivity target on a single node. A code target
// makes the curve read in ADC codes.
func curveNode(t *constraints.Template) (node string, scale float64, unit units.Unit, ok bool) {
	for _, tg := range t.Targets {
		if len(tg.Nodes) != 1 {
			continue
		}
		switch tg.Kind {
		case constraints.Code:
			for _, a := range t.ADCs {
				if a.Name == tg.ADC {
					return a.Node, 1 / a.Step(), units.NoUnit, true
				}
			}
		case constraints.Voltage, constraints.Linearity, constraints.Sensitivity:
			return tg.Nodes[0], 1, units.Volt, true
		}
	}
	return "", 0, 0, false
}

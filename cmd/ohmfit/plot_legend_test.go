package main

import (
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth/variation"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// legendTemplate is a valued thermistor divider read over a 41-point
// sweep, with its upper limit just above the highest reading: the limit
// line runs along the top edge of the spread panel, where the legend is.
const legendTemplate = `ohmfit: 1
name: Legend headroom
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.0}
  - {name: Rtop, type: resistor, from: vcc, to: sense, value: 10k}
  - {name: RT1, type: ntc, from: sense, to: gnd, r25: 10k, beta: 3400}
sweep: {temperature: {from: -20, to: 60, step: 2}}
targets:
  - {voltage: sense, min: 0.5, max: 2.6}
`

// TestSpreadLegendAboveData draws the spread panel at its real size and
// checks, through gonum's own layout (Plot.DataCanvas, Plot.Transforms,
// Legend.Rectangle), that every line point and the limit lines sit below
// the legend box, so that no line hides under it.
func TestSpreadLegendAboveData(t *testing.T) {
	tp, err := constraints.Parse("legend.yaml", []byte(legendTemplate))
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	d, err := variation.NewDesign(cp, nil, "", constraints.Ambient{})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := variation.Check(d, &variation.Settings{Samples: 200, KeepSamples: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Goals) <= maxHistConditions {
		t.Fatalf("%d goals: want a target read in more than %d conditions", len(rep.Goals), maxHistConditions)
	}
	pl, err := spreadPlot(tp, rep.Goals, rep.Samples)
	if err != nil || pl == nil {
		t.Fatalf("spreadPlot: %v, %v", pl, err)
	}
	dc := pl.DataCanvas(draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: panelWidth, Y: panelHeight}}})
	_, y := pl.Transforms(&dc)
	legendBottom := pl.Legend.Rectangle(dc).Min.Y
	top := 2.6 // the limit line
	for _, g := range rep.Goals {
		for _, v := range []float64{g.Nominal, g.MonteCarlo.High, g.WorstMax} {
			top = max(top, v)
		}
	}
	if y(top) >= legendBottom {
		t.Errorf("highest line at %v, legend from %v down: the legend covers it", y(top), legendBottom)
	}
}

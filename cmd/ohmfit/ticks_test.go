package main

import (
	"fmt"
	"io"
	"math"
	"testing"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

// checkTicks checks the promises of the tick code for one data range: a
// drawable range, at least two labelled ticks, every tick finite, and both
// tickers (engineering units and percentages) label without panicking.
func checkTicks(t *testing.T, lo, hi float64) {
	t.Helper()
	a, b := drawableRange(lo, hi)
	if !(a < b) || math.IsInf(b-a, 0) || math.IsNaN(b-a) {
		t.Fatalf("drawableRange(%g, %g) = %g, %g: not a finite, non-empty range", lo, hi, a, b)
	}
	// The range covers the data wherever the data are finite and not beyond
	// the quarter of the float64 range that stays drawable.
	for _, x := range []float64{lo, hi} {
		if !math.IsNaN(x) && math.Abs(x) <= math.MaxFloat64/4 && (x < a || x > b) {
			t.Fatalf("drawableRange(%g, %g) = %g, %g leaves out %g", lo, hi, a, b, x)
		}
	}
	for _, m := range []plot.Ticker{engTicks{units.Watt}, percentTicks{}, engTicks{units.Volt}} {
		ts := m.Ticks(lo, hi)
		labelled := 0
		for _, tk := range ts {
			if math.IsNaN(tk.Value) || math.IsInf(tk.Value, 0) {
				t.Fatalf("%T.Ticks(%g, %g): tick at %g", m, lo, hi, tk.Value)
			}
			if tk.Label != "" {
				labelled++
			}
		}
		if labelled < 2 {
			t.Fatalf("%T.Ticks(%g, %g): %d labelled ticks, want at least 2: %v", m, lo, hi, labelled, ts)
		}
	}
}

// TestTicksExtreme covers the ranges that made gonum's tick code panic
// ("illegal range"): one answer with a huge power or error, where ±1 does
// not widen the range, and others at the ends of float64.
func TestTicksExtreme(t *testing.T) {
	cases := [][2]float64{
		{1e21, 1e21},                        // a 1e9 A source into 1k: one point
		{5.5e300, 5.5e300},                  // error of a 1e-300 goal
		{0, 0},                              // no spread at all
		{1e-300, 1e-300},                    // tiny
		{5e-324, 5e-324},                    // subnormal
		{-1e21, -1e21},                      // negative
		{1, math.Nextafter(1, 2)},           // one bit apart
		{-math.MaxFloat64, math.MaxFloat64}, // the whole line
		{math.MaxFloat64, math.MaxFloat64},
		{math.Inf(1), math.Inf(-1)}, // gonum's "no data"
		{math.NaN(), 3},
		{3, 1}, // reversed
	}
	for _, c := range cases {
		t.Run(fmt.Sprint(c[0], " ", c[1]), func(t *testing.T) {
			checkTicks(t, c[0], c[1])
		})
	}
}

// TestPlotSinglePoint draws a plot of one point at each extreme value, as
// --plot does for a single answer: it must draw, not panic.
func TestPlotSinglePoint(t *testing.T) {
	for _, v := range []float64{1e21, 1e-300, 0, -4.2e200, math.MaxFloat64 / 8} {
		t.Run(fmt.Sprint(v), func(t *testing.T) {
			pl := plot.New()
			pl.X.Tick.Marker = engTicks{units.Watt}
			pl.Y.Tick.Marker = percentTicks{}
			sc, err := plotter.NewScatter(plotter.XYs{{X: v, Y: v}})
			if err != nil {
				t.Fatal(err)
			}
			pl.Add(sc)
			if err := savePlots(io.Discard, "p.svg", []*plot.Plot{pl}, 4*vg.Inch, 3*vg.Inch); err != nil {
				t.Errorf("%g: %v", v, err)
			}
		})
	}
}

// FuzzTicks places ticks on arbitrary ranges.
func FuzzTicks(f *testing.F) {
	for _, c := range [][2]float64{{1e21, 1e21}, {0, 0}, {5e-324, 1e-323}, {-math.MaxFloat64, math.MaxFloat64}, {1, 1.0000000000000002}, {0.001, 0.2}} {
		f.Add(c[0], c[1])
	}
	f.Fuzz(func(t *testing.T, lo, hi float64) {
		checkTicks(t, lo, hi)
	})
}

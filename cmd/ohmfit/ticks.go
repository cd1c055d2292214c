package main

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// minSpan is the narrowest axis span drawn, relative to the largest
// magnitude on the axis: a narrower one (a single point, or points equal to
// the last few bits) is widened around its middle so that the ticks have
// room (see widen). It is far above float64's resolution (2.2e-16) and far below any
// difference a reader could see.
const minSpan = 1e-9

// widen is the half-width, relative to the magnitude, that a too narrow
// range is given: wide enough that four-digit tick labels differ.
const widen = 0.05

// drawableRange returns an axis range the tick and drawing code can use for
// any finite data: lo < hi, both finite, with hi − lo at least minSpan of
// their magnitude and itself finite. Non-finite ends (no data) become a unit
// range around the other end or around zero.
func drawableRange(lo, hi float64) (float64, float64) {
	finite := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch {
	case !finite(lo) && !finite(hi):
		lo, hi = 0, 0
	case !finite(lo):
		lo = hi
	case !finite(hi):
		hi = lo
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	const limit = math.MaxFloat64 / 4
	mag := math.Max(math.Abs(lo), math.Abs(hi))
	if hi-lo >= minSpan*mag && hi-lo > 0 && mag <= limit {
		return lo, hi
	}
	// Too narrow (or too wide to measure): widen around the middle.
	// Halving first keeps the middle and the span from overflowing near
	// ±MaxFloat64.
	mid := lo/2 + hi/2
	half := math.Max(hi/2-lo/2, widen*mag)
	if half < math.SmallestNonzeroFloat64*(1<<60) {
		// Data at or near zero (or subnormal): a unit range.
		half = 1
	}
	// The span must stay finite for the axis to place points: keep the
	// range within a quarter of the largest float64 either side of zero.
	a, b := math.Max(math.Min(lo, mid-half), -limit), math.Min(math.Max(hi, mid+half), limit)
	if !(a < b) {
		// Everything sits beyond ±limit: a range just inside it.
		if mid > 0 {
			a, b = limit*(1-minSpan), limit
		} else {
			a, b = -limit, -limit*(1-minSpan)
		}
	}
	lo, hi = a, b
	return lo, hi
}

// safeTicks is gonum's default tick placement on a drawable range; gonum's
// own panics on an empty range ("illegal range"), which a single answer or
// an extreme value gives.
func safeTicks(lo, hi float64) []plot.Tick {
	lo, hi = drawableRange(lo, hi)
	ts := plot.DefaultTicks{}.Ticks(lo, hi)
	var kept []plot.Tick
	labelled := 0
	for _, t := range ts {
		if math.IsNaN(t.Value) || math.IsInf(t.Value, 0) {
			continue
		}
		if t.Label != "" {
			labelled++
		}
		kept = append(kept, t)
	}
	if labelled < 2 {
		// A range the default placement cannot split: label its ends.
		return []plot.Tick{{Value: lo, Label: strconv.FormatFloat(lo, 'g', 4, 64)}, {Value: hi, Label: strconv.FormatFloat(hi, 'g', 4, 64)}}
	}
	return kept
}

// fixAxes gives each axis of pl a drawable range (see drawableRange), once
// every plotter has been added: gonum widens an empty range by ±1, which
// does nothing at 1e21 and leaves the axis without a span.
func fixAxes(pl *plot.Plot) {
	pl.X.Min, pl.X.Max = drawableRange(pl.X.Min, pl.X.Max)
	pl.Y.Min, pl.Y.Max = drawableRange(pl.Y.Min, pl.Y.Max)
}

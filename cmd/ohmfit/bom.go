package main

import (
	"encoding/csv"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// bomHeader is the first line of a bill of materials.
var bomHeader = []string{"designators", "type", "value", "code", "series", "tolerance", "tolerance_from", "tcr_ppm_per_c", "model", "package", "power_rating_w", "quantity"}

// writeBOM writes the design's bill of materials (variation.BOM) as CSV: one
// line per item, designators grouped. A cell that does not apply (a
// sensor's TCR and rating, a resistor's model) is empty; "-" is a resistor
// value in no series.
func writeBOM(w io.Writer, d *variation.Design, rep *variation.Report) error {
	return writeBOMLines(w, variation.BOM(d, rep))
}

// writeBOMLines writes bill-of-materials lines as writeBOM does (a board's
// BOM is the merged lines of its networks).
func writeBOMLines(w io.Writer, lines []variation.BOMLine) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(bomHeader); err != nil {
		return err
	}
	for _, l := range lines {
		series, tcr, rated := "", "", ""
		if l.Type == variation.TypeResistor {
			series = l.Series
			if series == "" {
				series = "-"
			}
			rated = strconv.FormatFloat(l.RatedWatts, 'g', 4, 64)
		}
		if l.HasTCR {
			tcr = strconv.FormatFloat(l.TCR*1e6, 'g', 4, 64)
		}
		row := []string{strings.Join(l.Designators, ", "), l.Type,
			units.FormatUnit(l.Value, units.Ohm), l.Code, series,
			bomTolerance(l), l.TolFrom, tcr, l.Model,
			l.Package, rated, strconv.Itoa(l.Quantity())}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// bomTolerance is a BOM line's tolerance column: "-" where the line has
// none (a stand-in).
func bomTolerance(l variation.BOMLine) string {
	if math.IsNaN(l.Tolerance) {
		return "-"
	}
	return units.FormatUnit(l.Tolerance, units.Percent)
}

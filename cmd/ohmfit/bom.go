package main

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// bomHeader is the first line of a bill of materials.
var bomHeader = []string{"designators", "value", "code", "series", "tolerance", "tcr_ppm_per_c", "package", "power_rating_w", "quantity"}

// writeBOM writes one CSV line per distinct resistor (same value, series,
// tolerance, TCR and package), with its designators grouped, in the order
// the parts first appear. Sources are not parts to buy here and are left
// out.
func writeBOM(w io.Writer, d *variation.Design, rep *variation.Report) error {
	rated := map[string]variation.Rating{}
	for _, r := range rep.Ratings {
		rated[r.Part] = r
	}
	type line struct {
		key   string
		names []string
		cells []string
	}
	var lines []*line
	byKey := map[string]*line{}
	for _, v := range rep.Parts {
		if v.Kind != solver.Resistor {
			continue
		}
		r := rated[v.Name]
		code, err := eseries.Code(v.Nominal)
		if err != nil {
			code = ""
		}
		series := v.Series
		if series == "" {
			series = "-"
		}
		cells := []string{
			eseries.FormatUnit(v.Nominal, eseries.Ohm), code, series,
			eseries.FormatUnit(v.Tol, eseries.Percent),
			strconv.FormatFloat(v.TCR*1e6, 'g', 4, 64),
			r.Package, strconv.FormatFloat(r.Rated, 'g', 4, 64),
		}
		key := strings.Join(cells, "\x00")
		l, ok := byKey[key]
		if !ok {
			l = &line{key: key, cells: cells}
			byKey[key] = l
			lines = append(lines, l)
		}
		l.names = append(l.names, v.Name)
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(bomHeader); err != nil {
		return err
	}
	for _, l := range lines {
		row := append([]string{strings.Join(l.names, ", ")}, l.cells...)
		row = append(row, strconv.Itoa(len(l.names)))
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

package board

import (
	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// Designator is the board-wide name of a network's part: the network's
// prefix, a hyphen and the part's name in its template ("U3-R1").
func Designator(prefix, part string) string { return prefix + "-" + part }

// Checked is the real-parts view of a board's answer: each chosen design
// checked as `ohmfit check` checks it (worst case, no Monte Carlo), and the
// board's bill of materials.
type Checked struct {
	// Reports holds each network's check, in board order. Their Cautions
	// name the parts by their template names.
	Reports []*variation.Report
	// BOM is every network's bill of materials (variation.BOM: the chosen
	// parts and the template's fixed resistors), designators prefixed
	// (Designator), merged into one line per item to order
	// (variation.MergeBOM).
	BOM []variation.BOMLine
}

// Check checks every chosen design with real parts and builds the board's
// bill of materials.
func (r *Result) Check() (*Checked, error) {
	c := &Checked{}
	var lines []variation.BOMLine
	for _, nr := range r.Networks {
		n := nr.Network
		// The same check and BOM as fit --bom's (variation.AnswerBOM).
		d, rep, err := variation.CheckAnswer(n.Problem.Spec, nr.Choice().Options, "", constraints.Ambient{}, &variation.Settings{Samples: -1})
		if err != nil {
			return nil, errorf(err, "%s: %s", n.Name(), constraints.Message(err))
		}
		c.Reports = append(c.Reports, rep)
		for _, l := range variation.BOM(d, rep) {
			for i, name := range l.Designators {
				l.Designators[i] = Designator(n.Spec.Prefix, name)
			}
			lines = append(lines, l)
		}
	}
	c.BOM = variation.MergeBOM(lines)
	return c, nil
}

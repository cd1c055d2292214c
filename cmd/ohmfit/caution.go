package main

import (
	"fmt"
	"io"
	"math"

	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// largestPackage is the most power any package in the table carries at the
// usual derating: a resistor above it needs more than a single common part.
func largestPackage() (ratings.Package, float64) {
	best := ratings.Packages[0]
	for _, p := range ratings.Packages {
		if p.Derated() > best.Derated() {
			best = p
		}
	}
	return best, best.Derated()
}

// hazards collects the cautions a network's solution calls for: any node
// above the 60 V DC limit of ES1 (IEC 62368-1), and any resistor
// dissipating more than the largest common package carries at half its
// rating. Each is said once, for its worst condition.
type hazards struct {
	volts      float64
	voltsWhere string
	watts      float64
	wattsPart  string
	across     float64 // largest voltage across one resistor
	acrossPart string
}

// observe notes one condition's solution.
func (h *hazards) observe(cond string, nodes []solver.NodeVoltage, parts []solver.PartResult) {
	for _, n := range nodes {
		if v := math.Abs(n.Volts); v > h.volts {
			h.volts, h.voltsWhere = v, fmt.Sprintf("node %s in condition %q", n.Name, cond)
		}
	}
	for _, p := range parts {
		if p.Kind != solver.Resistor {
			continue
		}
		if p.Watts > h.watts {
			h.watts, h.wattsPart = p.Watts, fmt.Sprintf("%s (condition %q)", p.Name, cond)
		}
		if v := math.Abs(p.Volts); v > h.across {
			h.across, h.acrossPart = v, fmt.Sprintf("%s (condition %q)", p.Name, cond)
		}
	}
}

// write prints the cautions, if any, to w (stderr: they must not mix with
// a machine-readable result).
func (h *hazards) write(w io.Writer) {
	if h.volts > ratings.ES1VoltsDC {
		cautionLine(w, ratings.HazardCaution(h.voltsWhere, h.volts))
	}
	maxV := 0.0
	for _, p := range ratings.Packages {
		maxV = math.Max(maxV, p.Volts)
	}
	if h.across > maxV {
		cautionLine(w, fmt.Sprintf("%s has %s across it, above the working voltage of every package in the table (%s at most); "+
			"use a high-voltage resistor or several in series, each within its rating, and run `ohmfit check` on the design.",
			h.acrossPart, eseries.FormatUnit(h.across, eseries.Volt), eseries.FormatUnit(maxV, eseries.Volt)))
	}
	if pkg, max := largestPackage(); h.watts > max {
		cautionLine(w, fmt.Sprintf("%s dissipates %s, more than a %s carries at half its rating; "+
			"no single common chip or leaded resistor is enough. Use a power resistor rated for it with its "+
			"derating curve, or spread the power, and run `ohmfit check` on the design.",
			h.wattsPart, eseries.FormatUnit(h.watts, eseries.Watt), pkg.Name))
	}
}

// solutionHazards solves an answer in every visible condition and collects
// its cautions.
func solutionHazards(p *synth.Problem, sol synth.Solution) *hazards {
	h := &hazards{}
	t := p.Template
	for ci, c := range t.Conditions {
		if c.Hidden {
			continue
		}
		circ, err := t.ConditionCircuit(ci)
		if err != nil {
			continue
		}
		for k, i := range p.Free {
			circ.Parts[i].Value = sol.Options[k].Value
		}
		if s, err := solver.Analyze(circ); err == nil {
			h.observe(c.Name, s.Nodes, s.Parts)
		}
	}
	return h
}

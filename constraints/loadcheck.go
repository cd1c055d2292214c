package constraints

import (
	"slices"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"gopkg.in/yaml.v3"
)

// crossCheck resolves names between sections once all are read.
func (d *decoder) crossCheck() {
	t := d.t
	d.expandCurves()
	d.checkSensors()
	if len(d.errs) == 0 {
		d.checkSensorRanges()
	}
	if len(d.errs) > 0 {
		return
	}
	d.checkNodes()
	var names []string
	for _, p := range t.Parts {
		names = append(names, p.Name)
	}
	d.checkNames(names)
	d.applySettings(names)
	if len(d.errs) == 0 {
		// Last, so that no check above counts them as the user's parts
		// (an ADC's node is connected only by what the user wires to it).
		d.addADCLoads()
	}
}

// checkNodes checks that the ground node and every node a target names are
// connected, that no ratio divides by ground, and that no node dangles.
func (d *decoder) checkNodes() {
	t := d.t
	var nodes []string
	for _, p := range t.Parts {
		for _, n := range []string{p.From, p.To, p.Plus, p.Minus, p.Out} {
			if n != "" && !slices.Contains(nodes, n) {
				nodes = append(nodes, n)
			}
		}
	}
	if !slices.Contains(nodes, t.Ground) {
		at, key := d.partsNode, "parts"
		if d.groundNode != nil {
			at, key = d.groundNode, "ground"
		}
		d.errorf(at, key, "no part connects to the ground node %q%s", t.Ground, suggest(t.Ground, nodes))
	}
	d.unknownNames(d.nodeRefs, nodes, "target names node %q, which no part connects%s")
	for _, r := range d.ratioRefs {
		if r.name == t.Ground {
			d.errorf(r.n, r.key, "ratio: %q is the ground node, always at 0 V, so the ratio is undefined; for a node's voltage to ground write {voltage: NODE}", r.name)
		}
	}
	d.checkDangling(nodes)
}

// checkNames checks the parts targets name (names: every part's), the
// conditions `when` names and the free parts choose overrides.
func (d *decoder) checkNames(names []string) {
	t := d.t
	d.unknownNames(d.partRefs, names, "target names part %q, which is not in parts%s")
	var conds []string
	for _, c := range t.Conditions {
		conds = append(conds, c.Name)
	}
	d.unknownNames(d.condRefs, conds, "when names condition %q, which is not in conditions%s")
	var free []string
	for _, p := range t.Parts {
		if p.Free {
			free = append(free, p.Name)
		}
	}
	for _, r := range d.overrideRefs {
		i, ok := t.Part(r.name)
		switch {
		case !ok:
			d.errorf(r.n, r.key, "choose: overrides: no part named %q%s", r.name, suggest(r.name, free))
		case !t.Parts[i].Free:
			d.errorf(r.n, r.key, "choose: overrides: part %q is a %s with a value; overrides apply to resistors ohmfit chooses", r.name, t.Parts[i].Kind)
		}
	}
}

// unknownNames reports each ref whose name is not among known, with format
// taking the name and a suggestion of the nearest known one.
func (d *decoder) unknownNames(refs []nameRef, known []string, format string) {
	for _, r := range refs {
		if !slices.Contains(known, r.name) {
			d.errorf(r.n, r.key, format, r.name, suggest(r.name, known))
		}
	}
}

// applySettings reads each condition's settings, now that the parts they
// set are known (names: every part's), and adds them to their conditions.
func (d *decoder) applySettings(names []string) {
	t := d.t
	for _, s := range d.setRefs {
		i, ok := t.Part(s.part)
		if !ok {
			d.errorf(s.key, s.path, "%s: no part named %q%s", s.ctx, s.part, suggest(s.part, names))
			continue
		}
		p := t.Parts[i]
		var v float64
		switch {
		case p.Free:
			d.errorf(s.key, s.path, "%s: part %q has no value (ohmfit chooses it), so a condition cannot set it", s.ctx, s.part)
			continue
		case p.Kind == solver.OpAmp:
			d.errorf(s.key, s.path, "%s: part %q is an op-amp, which has no value to set", s.ctx, s.part)
			continue
		case p.Sensor != nil:
			d.errorf(s.key, s.path, "%s: part %q is a %s; its value follows the condition's temperature, so set temperature instead", s.ctx, s.part, p.SensorType)
			continue
		case p.Kind == solver.Resistor:
			v, ok = d.positiveOr(s.val, s.path, label(s.ctx, s.part), units.Ohm, zeroResistor)
		case p.Kind == solver.VoltageSource:
			v, ok = d.value(s.val, s.path, label(s.ctx, s.part), units.Volt)
		default:
			v, ok = d.value(s.val, s.path, label(s.ctx, s.part), units.Amp)
		}
		if ok {
			c := &t.Conditions[s.cond]
			c.Set = append(c.Set, Setting{Part: s.part, Value: v})
		}
	}
}

// checkDangling reports a node that only one part touches and no target
// reads: the part then carries no current and does nothing, which is almost
// always a misspelt node name.
func (d *decoder) checkDangling(nodes []string) {
	t := d.t
	// Terminals per node, and the part of the last one seen.
	terminals := map[string]int{}
	owner := map[string]int{}
	for i, p := range t.Parts {
		ends := []string{p.From, p.To}
		if p.Kind == solver.OpAmp {
			ends = []string{p.Plus, p.Minus, p.Out}
		}
		for _, n := range ends {
			terminals[n]++
			owner[n] = i
		}
	}
	read := map[string]bool{t.Ground: true}
	for _, r := range d.nodeRefs {
		read[r.name] = true
	}
	// Nodes with a DC path to ground; a dangling end of a group without one
	// is left to the network check, whose message about the group is the
	// more useful.
	grounded := map[string]bool{t.Ground: true}
	for changed := true; changed; {
		changed = false
		for _, p := range t.Parts {
			a, b := p.From, p.To
			switch p.Kind {
			case solver.CurrentSource:
				continue
			case solver.OpAmp:
				a, b = p.Out, t.Ground
			}
			if grounded[a] != grounded[b] {
				grounded[a], grounded[b] = true, true
				changed = true
			}
		}
	}
	for _, n := range nodes {
		// Only a resistor with one end in the air: a lone current source or
		// op-amp input gets the network check's more specific message.
		if read[n] || !grounded[n] || terminals[n] != 1 || t.Parts[owner[n]].Kind != solver.Resistor {
			continue
		}
		p := t.Parts[owner[n]]
		var others []string
		for _, m := range nodes {
			if m != n {
				others = append(others, m)
			}
		}
		d.errorf(&yaml.Node{Line: p.Pos.Line, Column: p.Pos.Col}, "parts",
			"part %q: node %q connects to nothing else, so %s carries no current%s; connect the node or correct its name",
			p.Name, n, p.Name, suggest(n, others))
		return
	}
}

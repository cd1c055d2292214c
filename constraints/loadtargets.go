package constraints

import (
	"fmt"
	"slices"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

var targetAllowed = append(slices.Clone(targetKeys), "equals", "tolerance", "min", "max", "when", "curve", "at")

func (d *decoder) target(n *yaml.Node, path string, i int) {
	ctx := fmt.Sprintf("target %d", i+1)
	if !d.expectMapping(n, path, ctx, "{voltage: fb, equals: 0.8}") {
		return
	}
	byName, order := d.fields(n, path, ctx, targetAllowed)
	tg := Target{Pos: Pos{n.Line, n.Column}}
	var q *entry
	for _, e := range order {
		k := slices.Index(targetKeys, e.name)
		if k < 0 {
			continue
		}
		if q != nil {
			d.errorf(e.key, joinKey(path, e.name), "%s: names both %s and %s; use one target per quantity", ctx, q.name, e.name)
			return
		}
		q = &e
		tg.Kind = TargetKind(k)
	}
	if q == nil {
		d.missingf(n, path, "%s: needs one of %s", ctx, strings.Join(targetKeys, ", "))
		return
	}
	qpath, qctx := joinKey(path, q.name), label(ctx, q.name)
	switch tg.Kind {
	case Voltage, Ratio, Resistance:
		single := tg.Kind == Voltage && q.val.Kind == yaml.ScalarNode
		if !single && (q.val.Kind != yaml.SequenceNode || len(q.val.Content) != 2) {
			want := "a list of two nodes [a, b]"
			if tg.Kind == Voltage {
				want = "a node name or " + want
			}
			d.errorf(q.val, qpath, "%s: expected %s, got %s", qctx, want, describe(q.val))
			return
		}
		items := q.val.Content
		if single {
			items = []*yaml.Node{q.val}
		}
		for j, it := range items {
			name, ok := d.name(it, qpath, qctx)
			if !ok {
				return
			}
			if j == 1 && name == tg.Nodes[0] {
				d.errorf(it, qpath, "%s: both nodes are %q; name two different nodes", qctx, name)
				return
			}
			tg.Nodes = append(tg.Nodes, name)
			d.nodeRefs = append(d.nodeRefs, nodeRef{name, it, qpath})
			if j == 1 && tg.Kind == Ratio {
				d.ratioRefs = append(d.ratioRefs, nodeRef{name, it, qpath})
			}
		}
	default:
		// One name: a part, an ADC or a node, by kind.
		name, ok := d.name(q.val, qpath, qctx)
		if !ok {
			return
		}
		switch tg.Kind {
		case Current, Power:
			tg.Part = name
			d.partRefs = append(d.partRefs, partRef{name, q.val, qpath})
		case Code, Resolution:
			tg.ADC = name
			d.adcRefs = append(d.adcRefs, partRef{name, q.val, qpath})
		case SelfHeating:
			tg.Part = name
			d.heatRefs = append(d.heatRefs, partRef{name, q.val, qpath})
		default: // Linearity, Sensitivity
			tg.Nodes = []string{name}
			d.nodeRefs = append(d.nodeRefs, nodeRef{name, q.val, qpath})
		}
	}
	if e, ok := byName["at"]; ok {
		if tg.Kind != Sensitivity && tg.Kind != Resolution {
			d.errorf(e.key, joinKey(path, "at"), "%s: at (a temperature) goes with sensitivity and resolution targets", ctx)
			return
		}
		if tg.At, ok = d.temperature(e.val, joinKey(path, "at"), label(ctx, "at")); !ok {
			return
		}
	} else if tg.Kind == Sensitivity || tg.Kind == Resolution {
		d.missingf(n, joinKey(path, "at"), "%s: %s needs at, the temperature it is taken at (e.g. at: 25)", ctx, tg.Kind)
		return
	}
	unit := tg.Kind.Unit()
	num := func(key string, has *bool, dst *float64) {
		if e, ok := byName[key]; ok {
			*dst, *has = d.value(e.val, joinKey(path, key), label(ctx, key), unit)
		}
	}
	num("equals", &tg.HasEquals, &tg.Equals)
	num("min", &tg.HasMin, &tg.Min)
	num("max", &tg.HasMax, &tg.Max)
	_, hasEq := byName["equals"]
	_, hasMin := byName["min"]
	_, hasMax := byName["max"]
	if e, ok := byName["curve"]; ok {
		cpath := joinKey(path, "curve")
		switch {
		case hasEq:
			d.errorf(e.key, cpath, "%s: give equals or curve, not both", ctx)
			return
		case tg.Kind.Derived():
			d.errorf(e.key, cpath, "%s: a %s target has one value over the sweep; curve goes with voltage, code and the like", ctx, tg.Kind)
			return
		case len(byName["when"].name) > 0:
			d.errorf(e.key, cpath, "%s: a curve sets its own conditions (one per temperature); leave when out", ctx)
			return
		}
		pts, ok := d.curve(e.val, cpath, label(ctx, "curve"), unit)
		if !ok {
			return
		}
		d.curveRefs = append(d.curveRefs, curveRef{target: len(d.t.Targets), points: pts, n: e.val, path: cpath})
		// Each point becomes a goal; a tolerance applies to every point.
		tg.HasEquals, tg.Equals, hasEq = true, pts[0].value, true
	}
	if !hasEq && !hasMin && !hasMax {
		d.missingf(n, path, "%s: %s has no equals, min or max to check", ctx, tg.Label())
	}
	if e, ok := byName["tolerance"]; ok {
		if !hasEq {
			d.errorf(e.key, joinKey(path, "tolerance"), "%s: tolerance needs equals (for a range use min and max)", ctx)
		} else {
			d.tolerance(e.val, joinKey(path, "tolerance"), label(ctx, "tolerance"), unit, &tg)
		}
	}
	if tg.HasMin && tg.HasMax && tg.Min > tg.Max {
		// Point at whichever bound comes second: that is where the clash shows.
		lo, hi := byName["min"], byName["max"]
		at, key := hi.val, "max"
		if lo.val.Line > hi.val.Line || (lo.val.Line == hi.val.Line && lo.val.Column > hi.val.Column) {
			at, key = lo.val, "min"
		}
		d.errorf(at, joinKey(path, key), "%s: min (%s) is above max (%s); swap them", ctx, units.Clip(lo.val.Value), units.Clip(hi.val.Value))
	}
	if tg.HasEquals && ((tg.HasMin && tg.Equals < tg.Min) || (tg.HasMax && tg.Equals > tg.Max)) {
		d.errorf(byName["equals"].val, joinKey(path, "equals"), "%s: equals (%s) lies outside min..max, so no design could meet it", ctx, units.Clip(byName["equals"].val.Value))
	}
	if e, ok := byName["when"]; ok {
		wpath := joinKey(path, "when")
		items := []*yaml.Node{e.val}
		if e.val.Kind == yaml.SequenceNode {
			items = e.val.Content
			if len(items) == 0 {
				d.errorf(e.val, wpath, "%s: when: the list is empty; leave it out to apply the target in every condition", ctx)
			}
		}
		for _, it := range items {
			if name, ok := d.name(it, wpath, label(ctx, "when")); ok {
				tg.When = append(tg.When, name)
				d.condRefs = append(d.condRefs, condRef{name, it, wpath})
			}
		}
	}
	d.t.Targets = append(d.t.Targets, tg)
}

// tolerance reads "1%" (relative to equals) or a plain value in the
// quantity's unit (absolute).
func (d *decoder) tolerance(n *yaml.Node, path, ctx string, unit units.Unit, tg *Target) {
	if n.Kind == yaml.ScalarNode && !isNull(n) {
		if q, err := units.Parse(n.Value); err == nil && q.Unit == units.Percent {
			tg.Tolerance, tg.TolRelative = q.Value, true
			if q.Value <= 0 {
				d.errorf(n, path, "%s: must be positive, got %s", ctx, units.Clip(n.Value))
			} else if tg.HasEquals && tg.Equals == 0 {
				d.errorf(n, path, "%s: a percentage of equals: 0 is zero; give an absolute tolerance such as 5m", ctx)
			}
			return
		}
	}
	if v, ok := d.positive(n, path, ctx, unit); ok {
		tg.Tolerance = v
	}
}

func (d *decoder) limits(n *yaml.Node) {
	if !d.expectMapping(n, "limits", "limits", "{supply_power_max: 1m}") {
		return
	}
	d.t.Limits.Pos = Pos{n.Line, n.Column}
	byName, _ := d.fields(n, "limits", "limits", []string{"supply_power_max", "max_package"})
	if e, ok := byName["supply_power_max"]; ok {
		d.t.Limits.SupplyPowerMax, _ = d.positive(e.val, "limits.supply_power_max", "limits: supply_power_max", units.Watt)
	}
	if e, ok := byName["max_package"]; ok {
		d.t.Limits.MaxPackage, _ = d.pkg(e.val, "limits.max_package", "limits: max_package")
	}
}

package constraints

import (
	"fmt"
	"slices"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

var targetAllowed = append(slices.Clone(targetKeys), "equals", "tolerance", "min", "max", "when", "curve", "at")

// target reads one entry of targets: the quantity and what it names, the
// temperature of a derivative, the goal and limits, and the conditions it
// applies in.
func (d *decoder) target(n *yaml.Node, path string, i int) {
	ctx := fmt.Sprintf("target %d", i+1)
	if !d.expectMapping(n, path, ctx, "{voltage: fb, equals: 0.8}") {
		return
	}
	byName, order := d.fields(n, path, ctx, targetAllowed)
	tg := Target{Pos: Pos{n.Line, n.Column}}
	q, ok := d.targetQuantity(n, path, ctx, order, &tg)
	if !ok || !d.targetSubject(q, path, ctx, &tg) || !d.targetAt(n, byName, path, ctx, &tg) ||
		!d.targetBounds(n, byName, path, ctx, &tg) {
		return
	}
	d.targetWhen(byName, path, ctx, &tg)
	d.t.Targets = append(d.t.Targets, tg)
}

// targetQuantity finds the one key that names the target's quantity
// (voltage, current, ...) and sets tg.Kind from it.
func (d *decoder) targetQuantity(n *yaml.Node, path, ctx string, order []entry, tg *Target) (*entry, bool) {
	var q *entry
	for _, e := range order {
		k := slices.Index(targetKeys, e.name)
		if k < 0 {
			continue
		}
		if q != nil {
			d.errorf(e.key, joinKey(path, e.name), "%s: names both %s and %s; use one target per quantity", ctx, q.name, e.name)
			return nil, false
		}
		q = &e
		tg.Kind = TargetKind(k)
	}
	if q == nil {
		d.missingf(n, path, "%s: needs one of %s", ctx, strings.Join(targetKeys, ", "))
		return nil, false
	}
	return q, true
}

// targetSubject reads what the quantity key names: one node or two for a
// voltage, two for a ratio or a resistance, else a part, an ADC or a node.
func (d *decoder) targetSubject(q *entry, path, ctx string, tg *Target) bool {
	qpath, qctx := joinKey(path, q.name), label(ctx, q.name)
	switch tg.Kind {
	case Voltage, Ratio, Resistance:
		return d.targetNodes(q, qpath, qctx, tg)
	}
	name, ok := d.name(q.val, qpath, qctx)
	if !ok {
		return false
	}
	switch tg.Kind {
	case Current, Power:
		tg.Part = name
		d.partRefs = append(d.partRefs, nameRef{name, q.val, qpath})
	case Code, Resolution:
		tg.ADC = name
		d.adcRefs = append(d.adcRefs, nameRef{name, q.val, qpath})
	case SelfHeating:
		tg.Part = name
		d.heatRefs = append(d.heatRefs, nameRef{name, q.val, qpath})
	default: // Linearity, Sensitivity
		tg.Nodes = []string{name}
		d.nodeRefs = append(d.nodeRefs, nameRef{name, q.val, qpath})
	}
	return true
}

// targetNodes reads the nodes of a voltage, ratio or resistance target.
func (d *decoder) targetNodes(q *entry, qpath, qctx string, tg *Target) bool {
	single := tg.Kind == Voltage && q.val.Kind == yaml.ScalarNode
	if !single && (q.val.Kind != yaml.SequenceNode || len(q.val.Content) != 2) {
		want := "a list of two nodes [a, b]"
		if tg.Kind == Voltage {
			want = "a node name or " + want
		}
		d.errorf(q.val, qpath, "%s: expected %s, got %s", qctx, want, describe(q.val))
		return false
	}
	items := q.val.Content
	if single {
		items = []*yaml.Node{q.val}
	}
	for j, it := range items {
		name, ok := d.name(it, qpath, qctx)
		if !ok {
			return false
		}
		if j == 1 && name == tg.Nodes[0] {
			d.errorf(it, qpath, "%s: both nodes are %q; name two different nodes", qctx, name)
			return false
		}
		tg.Nodes = append(tg.Nodes, name)
		d.nodeRefs = append(d.nodeRefs, nameRef{name, it, qpath})
		if j == 1 && tg.Kind == Ratio {
			d.ratioRefs = append(d.ratioRefs, nameRef{name, it, qpath})
		}
	}
	return true
}

// targetAt reads at, the temperature a sensitivity or resolution is taken
// at, which those two need and no other target takes.
func (d *decoder) targetAt(n *yaml.Node, byName map[string]entry, path, ctx string, tg *Target) bool {
	e, ok := byName["at"]
	derivative := tg.Kind == Sensitivity || tg.Kind == Resolution
	switch {
	case ok && !derivative:
		d.errorf(e.key, joinKey(path, "at"), "%s: at (a temperature) goes with sensitivity and resolution targets", ctx)
		return false
	case ok:
		tg.At, ok = d.temperature(e.val, joinKey(path, "at"), label(ctx, "at"))
		return ok
	case derivative:
		d.missingf(n, joinKey(path, "at"), "%s: %s needs at, the temperature it is taken at (e.g. at: 25)", ctx, tg.Kind)
		return false
	}
	return true
}

// targetBounds reads the goal (equals or a curve) and the hard limits
// (tolerance, min, max), and refuses bounds that no design could meet.
func (d *decoder) targetBounds(n *yaml.Node, byName map[string]entry, path, ctx string, tg *Target) bool {
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
		if !d.targetCurve(e, byName, path, ctx, tg, hasEq) {
			return false
		}
		hasEq = true
	}
	if !hasEq && !hasMin && !hasMax {
		d.missingf(n, path, "%s: %s has no equals, min or max to check", ctx, tg.Label())
	}
	if e, ok := byName["tolerance"]; ok {
		if !hasEq {
			d.errorf(e.key, joinKey(path, "tolerance"), "%s: tolerance needs equals (for a range use min and max)", ctx)
		} else {
			d.tolerance(e.val, joinKey(path, "tolerance"), label(ctx, "tolerance"), unit, tg)
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
	return true
}

// targetCurve reads a curve, a goal per temperature, in place of equals.
// Each point becomes a goal of its own after loading (curveRefs); the
// target holds the first, and a tolerance applies to every point.
func (d *decoder) targetCurve(e entry, byName map[string]entry, path, ctx string, tg *Target, hasEq bool) bool {
	cpath := joinKey(path, "curve")
	switch {
	case hasEq:
		d.errorf(e.key, cpath, "%s: give equals or curve, not both", ctx)
		return false
	case tg.Kind.Derived():
		d.errorf(e.key, cpath, "%s: a %s target has one value over the sweep; curve goes with voltage, code and the like", ctx, tg.Kind)
		return false
	case len(byName["when"].name) > 0:
		d.errorf(e.key, cpath, "%s: a curve sets its own conditions (one per temperature); leave when out", ctx)
		return false
	}
	pts, ok := d.curve(e.val, cpath, label(ctx, "curve"), tg.Kind.Unit())
	if !ok {
		return false
	}
	d.curveRefs = append(d.curveRefs, curveRef{target: len(d.t.Targets), points: pts, n: e.val, path: cpath})
	tg.HasEquals, tg.Equals = true, pts[0].value
	return true
}

// targetWhen reads when, the conditions the target applies in.
func (d *decoder) targetWhen(byName map[string]entry, path, ctx string, tg *Target) {
	e, ok := byName["when"]
	if !ok {
		return
	}
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
			d.condRefs = append(d.condRefs, nameRef{name, it, wpath})
		}
	}
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

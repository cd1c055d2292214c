package constraints

import (
	"fmt"
	"slices"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

func (d *decoder) conditions(n *yaml.Node) {
	seen := map[string]*yaml.Node{}
	for i, item := range n.Content {
		path := fmt.Sprintf("conditions[%d]", i)
		ctx := fmt.Sprintf("condition %d", i+1)
		if !d.expectMapping(item, path, ctx, "{name: vin-low, set: {Vin: 10}}") {
			continue
		}
		byName, _ := d.fields(item, path, ctx, []string{"name", "set", "temperature"})
		e, ok := byName["name"]
		if !ok {
			d.missingf(item, joinKey(path, "name"), "%s: missing key \"name\"", ctx)
			continue
		}
		name, ok := d.name(e.val, joinKey(path, "name"), label(ctx, "name"))
		if !ok {
			continue
		}
		if prev, dup := seen[name]; dup {
			d.errorf(e.val, joinKey(path, "name"), "condition name %q is already used on line %d", name, prev.Line)
			continue
		}
		seen[name] = e.val
		ctx = fmt.Sprintf("condition %q", name)
		ci := len(d.t.Conditions)
		cond := Condition{Name: name, Pos: Pos{item.Line, item.Column}, Temperature: ReferenceCelsius}
		if te, ok := byName["temperature"]; ok {
			if cond.Temperature, ok = d.temperature(te.val, joinKey(path, "temperature"), label(ctx, "temperature")); !ok {
				continue
			}
			cond.HasTemperature = true
		}
		d.t.Conditions = append(d.t.Conditions, cond)
		s, ok := byName["set"]
		if !ok || isNull(s.val) {
			continue
		}
		spath := joinKey(path, "set")
		if !d.expectMapping(s.val, spath, label(ctx, "set"), "{Vin: 10}") {
			continue
		}
		_, order := d.fields(s.val, spath, label(ctx, "set"), nil)
		for _, o := range order {
			d.setRefs = append(d.setRefs, setRef{cond: ci, ctx: label(ctx, "set"), part: o.name, key: o.key, val: o.val, path: joinKey(spath, o.name)})
		}
	}
}

func (d *decoder) rank(n *yaml.Node) {
	if !d.expectList(n, "rank", "rank") {
		return
	}
	var keys []RankKey
	for i, it := range n.Content {
		path := fmt.Sprintf("rank[%d]", i)
		k, ok := ParseRankKey(it.Value)
		ok = ok && it.Kind == yaml.ScalarNode
		switch {
		case !ok && it.Kind == yaml.ScalarNode && suggest(it.Value, rankNames) != "":
			d.errorf(it, path, "rank: unknown key %s%s", describe(it), suggest(it.Value, rankNames))
		case !ok:
			d.errorf(it, path, "rank: expected one of %s, got %s", strings.Join(rankNames, ", "), describe(it))
		case slices.Contains(keys, k):
			d.errorf(it, path, "rank: %s appears twice", units.Quote(it.Value))
		default:
			keys = append(keys, k)
		}
	}
	// Keys left out still break ties, in the default order.
	for _, k := range []RankKey{ByError, ByPower, ByParts} {
		if !slices.Contains(keys, k) {
			keys = append(keys, k)
		}
	}
	d.t.Rank = keys
}

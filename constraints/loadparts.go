package constraints

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"gopkg.in/yaml.v3"
)

var topKeys = []string{"ohmfit", "name", "ground", "parts", "targets", "limits", "choose", "conditions", "sweep", "rank", "ambient", "on_fraction"}

func (d *decoder) template(root *yaml.Node) {
	if root.Kind != yaml.MappingNode {
		d.errorf(root, "", "a template is a mapping of keys (ohmfit, parts, targets, ...), got %s", describe(root))
		return
	}
	// The version comes first: under another schema every other message
	// would be misleading.
	if !d.version(root) {
		return
	}
	byName, _ := d.fields(root, "", "", topKeys)
	t := d.t
	t.Ground = DefaultGround
	if e, ok := byName["name"]; ok && !isNull(e.val) {
		if e.val.Kind != yaml.ScalarNode {
			d.errorf(e.val, "name", "name: expected a line of text, got %s", describe(e.val))
		} else {
			t.Name = e.val.Value
		}
	}
	if e, ok := byName["ground"]; ok {
		if g, ok := d.name(e.val, "ground", "ground"); ok {
			t.Ground, d.groundNode = g, e.val
		}
	}
	if e, ok := byName["parts"]; ok {
		d.partsNode = e.key
		d.parts(e.val)
	} else {
		d.missingf(root, "parts", "missing key \"parts\": the network's resistors, sources and op-amps")
	}
	if e, ok := byName["targets"]; ok && !isNull(e.val) && d.expectList(e.val, "targets", "targets") {
		for i, item := range e.val.Content {
			d.target(item, fmt.Sprintf("targets[%d]", i), i)
		}
	}
	if e, ok := byName["limits"]; ok && !isNull(e.val) {
		d.limits(e.val)
	}
	t.Choose.Default = Choice{Series: defaultSeries, Min: defaultMin, Max: defaultMax, Combine: Single}
	if e, ok := byName["choose"]; ok && !isNull(e.val) {
		d.choose(e.val)
	}
	if e, ok := byName["conditions"]; ok && !isNull(e.val) && d.expectList(e.val, "conditions", "conditions") {
		d.conditions(e.val)
	}
	if e, ok := byName["sweep"]; ok && !isNull(e.val) {
		d.sweep(e.val)
	}
	if len(t.Conditions) == 0 {
		t.Conditions = []Condition{{Name: "nominal", Temperature: ReferenceCelsius}}
	}
	t.OnFraction = 1
	if e, ok := byName["on_fraction"]; ok {
		d.onFraction(e.val)
	}
	if e, ok := byName["ambient"]; ok && !isNull(e.val) {
		d.ambient(e.val)
	}
	if e, ok := byName["rank"]; ok && !isNull(e.val) {
		d.rank(e.val)
	} else {
		t.Rank = []RankKey{ByError, ByPower, ByParts}
	}
}

// version checks `ohmfit: 1`.
func (d *decoder) version(root *yaml.Node) bool {
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := root.Content[i], root.Content[i+1]
		if k.Kind != yaml.ScalarNode || k.Value != "ohmfit" {
			continue
		}
		if v.Kind == yaml.ScalarNode && v.Value == strconv.Itoa(SchemaVersion) {
			return true
		}
		if v.Kind == yaml.ScalarNode && v.ShortTag() == "!!int" {
			d.errorf(v, "ohmfit", "unsupported schema version %s; this ohmfit reads version %d", units.Clip(v.Value), SchemaVersion)
		} else {
			d.errorf(v, "ohmfit", "ohmfit: expected the schema version %d, got %s", SchemaVersion, describe(v))
		}
		return false
	}
	d.missingf(root, "ohmfit", "missing `ohmfit: %d` (the schema version) at the top of the template", SchemaVersion)
	return false
}

// partTypes maps each type name to its kind and keys; required keys are all
// but "value", which a resistor may leave out to be chosen.
var partTypes = []partType{
	{"resistor", solver.Resistor, []string{"name", "type", "from", "to", "value", "tolerance", "tcr", "package"}},
	{"voltage-source", solver.VoltageSource, []string{"name", "type", "plus", "minus", "volts", "tolerance"}},
	{"current-source", solver.CurrentSource, []string{"name", "type", "from", "to", "amps", "tolerance"}},
	{"opamp", solver.OpAmp, []string{"name", "type", "plus", "minus", "out"}},
	// Sensors are resistors whose value follows the temperature (sensorload.go).
	{"ntc", solver.Resistor, append([]string{"name", "type", "from", "to"}, sensorKeys["ntc"]...)},
	{"rtd", solver.Resistor, append([]string{"name", "type", "from", "to"}, sensorKeys["rtd"]...)},
}

// partType is one entry of partTypes.
type partType struct {
	name string
	kind solver.Kind
	keys []string
}

// partTypeNames lists the type names, as messages offer them.
func partTypeNames() []string {
	names := make([]string, len(partTypes))
	for i, p := range partTypes {
		names[i] = p.name
	}
	return append(names, "adc")
}

func (d *decoder) parts(n *yaml.Node) {
	if isNull(n) || (n.Kind == yaml.SequenceNode && len(n.Content) == 0) {
		d.errorf(n, "parts", "parts: the list is empty; a template needs at least one part")
		return
	}
	if !d.expectList(n, "parts", "parts") {
		return
	}
	seen := map[string]*yaml.Node{}
	for i, item := range n.Content {
		path := fmt.Sprintf("parts[%d]", i)
		if isADC(item) {
			a, nameNode, ok := d.adc(item, path, fmt.Sprintf("part %d", i+1))
			if !ok {
				continue
			}
			if prev, dup := seen[a.Name]; dup {
				d.errorf(nameNode, path+".name", "part name %q is already used on line %d", a.Name, prev.Line)
				continue
			}
			seen[a.Name] = nameNode
			d.t.ADCs = append(d.t.ADCs, a)
			continue
		}
		p, nameNode, ok := d.part(item, path, i)
		if !ok {
			continue
		}
		if prev, dup := seen[p.Name]; dup {
			d.errorf(nameNode, fmt.Sprintf("parts[%d].name", i), "part name %q is already used on line %d", p.Name, prev.Line)
			continue
		}
		seen[p.Name] = nameNode
		d.t.Parts = append(d.t.Parts, p)
	}
}

// optionalPartKeys may be left out of a part.
var optionalPartKeys = []string{"value", "tolerance", "tcr", "package"}

// part reads one entry of parts: its type first (which says what keys it
// takes), then its terminals, then its value and real-part keys. It
// returns the part and its name's node, for the duplicate check.
func (d *decoder) part(n *yaml.Node, path string, i int) (PartSpec, *yaml.Node, bool) {
	ctx := fmt.Sprintf("part %d", i+1)
	if !d.expectMapping(n, path, ctx, "{name: R1, type: resistor, from: a, to: b}") {
		return PartSpec{}, nil, false
	}
	pt, ctx, ok := d.partType(n, path, ctx)
	if !ok {
		return PartSpec{}, nil, false
	}
	nerr := len(d.errs)
	byName, _ := d.fields(n, path, ctx, pt.keys)
	for _, k := range pt.keys {
		if _, ok := byName[k]; !ok && !slices.Contains(optionalPartKeys, k) && !slices.Contains(sensorKeys[pt.name], k) {
			d.missingf(n, joinKey(path, k), "%s: missing key %q for a %s", ctx, k, pt.name)
		}
	}
	if len(d.errs) > nerr {
		return PartSpec{}, nil, false
	}
	p := PartSpec{Part: solver.Part{Kind: pt.kind}, Pos: Pos{n.Line, n.Column}}
	if !d.partTerminals(&p, pt, byName, path, ctx) {
		return PartSpec{}, nil, false
	}
	if _, sensor := sensorKeys[pt.name]; sensor {
		if !d.sensorModel(&p, pt.name, n, byName, path, ctx) || !d.realPart(&p, byName, path, ctx) {
			return PartSpec{}, nil, false
		}
		return p, byName["name"].val, true
	}
	if !d.partValue(&p, byName, path, ctx) {
		return p, byName["name"].val, false
	}
	if !d.realPart(&p, byName, path, ctx) {
		return PartSpec{}, nil, false
	}
	return p, byName["name"].val, true
}

// partType finds the part's type, which must be known before its other
// keys can be judged, and names the part in ctx by its name when it has
// one.
func (d *decoder) partType(n *yaml.Node, path, ctx string) (partType, string, bool) {
	var nameNode, typeNode *yaml.Node
	for j := 0; j+1 < len(n.Content); j += 2 {
		switch k := n.Content[j]; {
		case k.Kind != yaml.ScalarNode:
		case k.Value == "name" && nameNode == nil:
			nameNode = n.Content[j+1]
		case k.Value == "type" && typeNode == nil:
			typeNode = n.Content[j+1]
		}
	}
	if nameNode != nil && nameNode.Kind == yaml.ScalarNode && nameNode.Value != "" {
		ctx = "part " + units.Quote(nameNode.Value)
	}
	if typeNode == nil {
		d.missingf(n, joinKey(path, "type"), "%s: missing key \"type\" (one of %s)", ctx, strings.Join(partTypeNames(), ", "))
		return partType{}, ctx, false
	}
	ti := -1
	if typeNode.Kind == yaml.ScalarNode {
		ti = slices.IndexFunc(partTypes, func(p partType) bool { return p.name == typeNode.Value })
	}
	if ti < 0 {
		what := describe(typeNode)
		if s := suggest(typeNode.Value, partTypeNames()); s != "" && typeNode.Kind == yaml.ScalarNode {
			d.errorf(typeNode, joinKey(path, "type"), "%s: unknown part type %s%s", ctx, what, s)
		} else {
			d.errorf(typeNode, joinKey(path, "type"), "%s: unknown part type %s; types are %s", ctx, what, strings.Join(partTypeNames(), ", "))
		}
		return partType{}, ctx, false
	}
	return partTypes[ti], ctx, true
}

// partTerminals reads the part's name and the nodes it connects, and
// refuses a two-terminal part with both ends on one node.
func (d *decoder) partTerminals(p *PartSpec, pt partType, byName map[string]entry, path, ctx string) bool {
	ok := true
	str := func(key string, dst *string) {
		if v, good := d.name(byName[key].val, joinKey(path, key), label(ctx, key)); good {
			*dst = v
		} else {
			ok = false
		}
	}
	str("name", &p.Name)
	switch pt.kind {
	case solver.Resistor, solver.CurrentSource:
		str("from", &p.From)
		str("to", &p.To)
	case solver.VoltageSource:
		// The solver keeps a source's + and - terminals in From and To.
		str("plus", &p.From)
		str("minus", &p.To)
	case solver.OpAmp:
		str("plus", &p.Plus)
		str("minus", &p.Minus)
		str("out", &p.Out)
	}
	if !ok {
		return false
	}
	if pt.kind != solver.OpAmp && p.From == p.To {
		second := "to"
		if pt.kind == solver.VoltageSource {
			second = "minus"
		}
		d.errorf(byName[second].val, joinKey(path, second), "%s: both ends are on node %q, so the part does nothing", ctx, p.From)
		return false
	}
	return true
}

// partValue reads a resistor's value (none: the part is free), a voltage
// source's volts or a current source's amps.
func (d *decoder) partValue(p *PartSpec, byName map[string]entry, path, ctx string) bool {
	ok := true
	switch p.Kind {
	case solver.Resistor:
		e, has := byName["value"]
		if !has {
			p.Free = true
			break
		}
		if isNull(e.val) {
			d.errorf(e.val, joinKey(path, "value"), "%s: value is empty; leave the key out to let ohmfit choose it", ctx)
			return false
		}
		p.Value, ok = d.positiveOr(e.val, joinKey(path, "value"), label(ctx, "value"), units.Ohm, zeroResistor)
	case solver.VoltageSource:
		p.Value, ok = d.value(byName["volts"].val, joinKey(path, "volts"), label(ctx, "volts"), units.Volt)
	case solver.CurrentSource:
		p.Value, ok = d.value(byName["amps"].val, joinKey(path, "amps"), label(ctx, "amps"), units.Amp)
	}
	return ok
}

package constraints

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"slices"
	"strings"
	"unicode"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

var choiceKeys = []string{"series", "min", "max", "combine", "tolerance", "tcr", "package"}

func (d *decoder) choose(n *yaml.Node) {
	if !d.expectMapping(n, "choose", "choose", "{series: E96, min: 1k, max: 1M}") {
		return
	}
	byName, _ := d.fields(n, "choose", "choose", append(slices.Clone(choiceKeys), "overrides"))
	def := &d.t.Choose.Default
	def.Pos = Pos{n.Line, n.Column}
	if !d.choice(def, n, byName, "choose", "choose") {
		return
	}
	e, ok := byName["overrides"]
	if !ok || isNull(e.val) {
		return
	}
	if !d.expectMapping(e.val, "choose.overrides", "choose: overrides", "{R2: {series: E24}}") {
		return
	}
	_, order := d.fields(e.val, "choose.overrides", "choose: overrides", nil)
	d.t.Choose.Overrides = map[string]Choice{}
	for _, o := range order {
		path := "choose.overrides." + o.name
		ctx := fmt.Sprintf("choose: override for %q", o.name)
		d.overrideRefs = append(d.overrideRefs, nameRef{o.name, o.key, path})
		if !d.expectMapping(o.val, path, ctx, "{series: E24, min: 10k}") {
			continue
		}
		c := *def
		c.Pos = Pos{o.val.Line, o.val.Column}
		ob, _ := d.fields(o.val, path, ctx, choiceKeys)
		if d.choice(&c, o.val, ob, path, ctx) {
			d.t.Choose.Overrides[o.name] = c
		}
	}
}

// choice applies the keys present to c (which holds the inherited values)
// and checks the result. It reports whether c is usable.
func (d *decoder) choice(c *Choice, n *yaml.Node, byName map[string]entry, path, ctx string) bool {
	nerr := len(d.errs)
	if e, ok := byName["series"]; ok {
		d.series(c, e.val, joinKey(path, "series"), label(ctx, "series"))
	}
	if e, ok := byName["min"]; ok {
		c.Min, _ = d.positive(e.val, joinKey(path, "min"), label(ctx, "min"), units.Ohm)
	}
	if e, ok := byName["max"]; ok {
		c.Max, _ = d.positive(e.val, joinKey(path, "max"), label(ctx, "max"), units.Ohm)
	}
	if e, ok := byName["combine"]; ok {
		cp := joinKey(path, "combine")
		i := -1
		if e.val.Kind == yaml.ScalarNode {
			i = slices.Index(combineNames, e.val.Value)
		}
		if i >= 0 {
			c.Combine = Combine(i)
		} else if s := suggest(e.val.Value, combineNames); s != "" && e.val.Kind == yaml.ScalarNode {
			d.errorf(e.val, cp, "%s: unknown way to combine %s%s", label(ctx, "combine"), describe(e.val), s)
		} else {
			d.errorf(e.val, cp, "%s: expected one of %s, got %s", label(ctx, "combine"), strings.Join(combineNames, ", "), describe(e.val))
		}
	}
	d.realChoice(c, byName, path, ctx)
	if len(d.errs) > nerr {
		return false
	}
	// Range problems point at the latest of the keys involved that this
	// mapping sets (where the conflict shows), or at the mapping itself
	// when all are inherited.
	latest := func(keys ...string) *yaml.Node {
		at := n
		for _, k := range keys {
			if e, ok := byName[k]; ok && (at == n || e.val.Line > at.Line || (e.val.Line == at.Line && e.val.Column > at.Column)) {
				at = e.val
			}
		}
		return at
	}
	if c.Min > c.Max {
		d.errorf(latest("min", "max"), path, "%s: min (%s) is above max (%s); swap them", ctx, units.Format(c.Min), units.Format(c.Max))
		return false
	}
	at := latest("series", "min", "max")
	if c.Stock != nil {
		if !slices.ContainsFunc(c.Stock, func(v float64) bool { return v >= c.Min && v <= c.Max }) {
			d.errorf(at, path, "%s: no stock value lies between min (%s) and max (%s)", ctx, units.Format(c.Min), units.Format(c.Max))
			return false
		}
	} else if s, err := eseries.Lookup(c.Series); err == nil && s.Count(c.Min, c.Max) == 0 {
		d.errorf(at, path, "%s: no %s value lies between min (%s) and max (%s)", ctx, s.Name, units.Format(c.Min), units.Format(c.Max))
		return false
	}
	return true
}

// seriesLike tells a series name (E24, e96, E7) from a stock file path, so a
// mistyped series is reported as such rather than as a missing file.
func seriesLike(s string) bool {
	if len(s) < 2 || (s[0] != 'E' && s[0] != 'e') {
		return false
	}
	for _, r := range s[1:] {
		if r < '0' || r > '9' {
			return false
		}
	}
	return true
}

// series reads `series:`: a series name, an inline stock list, or the path
// of a stock file relative to the template's directory.
func (d *decoder) series(c *Choice, n *yaml.Node, path, ctx string) {
	switch {
	case n.Kind == yaml.SequenceNode:
		if len(n.Content) == 0 {
			d.errorf(n, path, "%s: the stock list is empty", ctx)
			return
		}
		vals := make([]float64, 0, len(n.Content))
		for _, it := range n.Content {
			v, ok := d.positive(it, path, ctx, units.Ohm)
			if !ok {
				return
			}
			vals = append(vals, v)
		}
		c.Series, c.Stock, c.StockFile = "", sortedUnique(vals), ""
	case n.Kind == yaml.ScalarNode && !isNull(n) && n.Value != "":
		if seriesLike(n.Value) {
			s, err := eseries.Lookup(n.Value)
			if err != nil {
				d.wrapf(n, path, err, "%s: unknown series %s%s; series are %s", ctx, units.Quote(n.Value),
					suggest(n.Value, eseries.Names()), strings.Join(eseries.Names(), " "))
				return
			}
			c.Series, c.Stock, c.StockFile = s.Name, nil, ""
			return
		}
		vals, file, ok := d.stockFile(n, path, ctx)
		if ok {
			c.Series, c.Stock, c.StockFile = "", vals, file
		}
	default:
		d.errorf(n, path, "%s: expected a series name (E24), a list of values or a stock file, got %s", ctx, describe(n))
	}
}

// stockFile reads a stock file: one value per line, blank lines and #
// comments allowed. Problems inside it name that file and line, but are
// ordered by the template position that named it.
func (d *decoder) stockFile(n *yaml.Node, path, ctx string) ([]float64, string, bool) {
	file := n.Value
	if !filepath.IsAbs(file) {
		file = filepath.Join(d.dir, file)
	}
	data, rerr := readFile(file)
	if rerr != nil {
		if errors.Is(rerr.Err, fs.ErrNotExist) {
			d.wrapf(n, path, rerr.Err, "%s: no series or stock file named %s%s", ctx, units.Quote(n.Value), suggest(n.Value, eseries.Names()))
		} else {
			d.wrapf(n, path, rerr, "%s: stock file %s: %s", ctx, file, rerr.Msg)
		}
		return nil, "", false
	}
	// A UTF-8 byte order mark, as some spreadsheets write, is not a value;
	// templates accept one too.
	data = bytes.TrimPrefix(data, []byte("\uFEFF"))
	var vals []float64
	for i, line := range strings.Split(string(data), "\n") {
		text, _, _ := strings.Cut(line, "#")
		col := 1 + len(text) - len(strings.TrimLeftFunc(text, unicode.IsSpace))
		text = strings.TrimSpace(text)
		if text == "" {
			continue
		}
		fail := func(msg string, err error) ([]float64, string, bool) {
			d.errs = append(d.errs, &Error{File: file, Line: i + 1, Col: col, Key: path,
				Msg:   fmt.Sprintf("%s (stock file named in %s at line %d)", msg, d.fileName(), n.Line),
				Err:   err,
				order: Pos{n.Line, n.Column}})
			return nil, "", false
		}
		v, err := units.ParseAs(text, units.Ohm)
		if err != nil {
			return fail(Message(err), err)
		}
		if v <= 0 {
			return fail(fmt.Sprintf("stock value %s is not positive", units.Clip(text)), nil)
		}
		if v < MinMagnitude || v > MaxMagnitude {
			return fail(fmt.Sprintf("stock value %s lies outside 1e-30 … 1e30 Ω, the range of any resistor", units.Clip(text)), nil)
		}
		vals = append(vals, v)
	}
	if len(vals) == 0 {
		d.errorf(n, path, "%s: stock file %s holds no values", ctx, file)
		return nil, "", false
	}
	return sortedUnique(vals), file, true
}

func (d *decoder) fileName() string {
	if d.file == "" {
		return "the template"
	}
	return d.file
}

func sortedUnique(v []float64) []float64 {
	slices.Sort(v)
	return slices.Compact(v)
}

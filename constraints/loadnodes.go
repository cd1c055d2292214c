package constraints

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

// entry is one key of a mapping with its value.
type entry struct {
	name     string
	key, val *yaml.Node
}

// Cross-references are checked once every section has been read, so their
// order in the file does not matter.
type (
	// nameRef is a name one section gives for something another defines
	// (a node, a part, a condition, an ADC), at the YAML node that says it.
	nameRef struct {
		name string
		n    *yaml.Node
		key  string
	}
	setRef struct {
		cond     int
		ctx      string
		part     string
		key, val *yaml.Node
		path     string
	}
)

// decoder walks the YAML node tree, filling a Template and collecting
// problems. Walking the tree ourselves (rather than decoding into tagged
// structs) gives every problem the position of the key or value at fault.
type decoder struct {
	file, dir string
	errs      []*Error
	t         *Template

	groundNode *yaml.Node // the ground value, or nil when defaulted
	partsNode  *yaml.Node

	nodeRefs     []nameRef
	ratioRefs    []nameRef // the nodes ratio targets divide by
	partRefs     []nameRef
	condRefs     []nameRef
	overrideRefs []nameRef
	setRefs      []setRef
	curveRefs    []curveRef
	adcRefs      []nameRef
	heatRefs     []nameRef // self_heating targets: the sensor each names
}

func (d *decoder) errorf(n *yaml.Node, key, format string, args ...any) {
	d.wrapf(n, key, nil, format, args...)
}

func (d *decoder) wrapf(n *yaml.Node, key string, cause error, format string, args ...any) {
	e := &Error{File: d.file, Key: key, Msg: fmt.Sprintf(format, args...), Err: cause}
	if n != nil {
		e.Line, e.Col = n.Line, n.Column
	}
	d.errs = append(d.errs, e)
}

// missingf reports something absent from mapping n. The message points at
// the mapping, but is ordered as if found at its end, so a misspelt key
// inside it ("too:" for "to:") is reported first, as the real mistake.
func (d *decoder) missingf(n *yaml.Node, key, format string, args ...any) {
	d.errorf(n, key, format, args...)
	last := n
	for len(last.Content) > 0 {
		last = last.Content[len(last.Content)-1]
	}
	d.errs[len(d.errs)-1].order = Pos{last.Line, last.Column + len(last.Value) + 1}
}

// first returns the earliest problem in file order.
func (d *decoder) first() *Error {
	best := d.errs[0]
	for _, e := range d.errs[1:] {
		if e.before(best) {
			best = e
		}
	}
	return best
}

// readRoot reads a YAML file (what names it in messages: "a template")
// into its root node after the checks every file gets: text, not binary;
// well-formed YAML; no aliases or excessive nesting (prescan). nil, with
// the errors recorded, when it fails them.
func (d *decoder) readRoot(data []byte, what string) *yaml.Node {
	if line, col, ok := binaryAt(data); ok {
		d.errs = append(d.errs, &Error{File: d.file, Line: line, Col: col,
			Msg: "not a text file: unreadable or control characters; " + what + " is UTF-8 YAML text"})
		return nil
	}
	root := d.document(data)
	if root == nil {
		return nil
	}
	if d.prescan(root, 0); len(d.errs) > 0 {
		return nil
	}
	return root
}

func (d *decoder) parse(data []byte) *Template {
	if len(data) > MaxFileSize {
		d.errorf(nil, "", "template is larger than %d MiB", MaxFileSize>>20)
		return nil
	}
	root := d.readRoot(data, "a template")
	if root == nil {
		return nil
	}
	d.t = &Template{File: d.file, Dir: d.dir}
	d.template(root)
	if len(d.errs) > 0 {
		return nil
	}
	d.crossCheck()
	if len(d.errs) > 0 {
		return nil
	}
	return d.t
}

// binaryAt finds the first byte that cannot be in YAML text: invalid UTF-8
// or a control character other than tab, newline and carriage return.
func binaryAt(data []byte) (line, col int, found bool) {
	line, col = 1, 1
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && size <= 1 {
			return line, col, true
		}
		if r == '\n' {
			line, col = line+1, 1
		} else {
			if unicode.IsControl(r) && r != '\t' && r != '\r' && r != '\u0085' {
				return line, col, true
			}
			col++
		}
		i += size
	}
	return 0, 0, false
}

// document parses exactly one YAML document and returns its root, or nil
// after recording a problem.
func (d *decoder) document(data []byte) (root *yaml.Node) {
	// yaml.v3 reports malformed input as errors, but it is a third-party
	// parser fed arbitrary bytes; a panic inside it must still become a
	// message, never a stack trace.
	defer func() {
		if r := recover(); r != nil {
			d.errorf(nil, "", "cannot read YAML: the parser failed (%v)", r)
			root = nil
		}
	}()
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if errors.Is(err, io.EOF) {
			d.errorf(nil, "", "empty template: expected `ohmfit: 1` followed by parts")
		} else {
			d.yamlError(err, data)
		}
		return nil
	}
	var extra yaml.Node
	switch err := dec.Decode(&extra); {
	case err == nil:
		d.errorf(&extra, "", "a template is one YAML document; this file holds several (remove the extra `---`)")
		return nil
	case !errors.Is(err, io.EOF):
		d.yamlError(err, data)
		return nil
	}
	root = &doc
	if root.Kind == yaml.DocumentNode {
		if len(root.Content) == 0 {
			d.errorf(nil, "", "empty template: expected `ohmfit: 1` followed by parts")
			return nil
		}
		root = root.Content[0]
	}
	if root.Kind == yaml.ScalarNode && root.ShortTag() == "!!null" {
		d.errorf(root, "", "empty template: expected `ohmfit: 1` followed by parts")
		return nil
	}
	return root
}

// yamlError turns the parser's "yaml: line N: msg" into a positioned Error.
// When the source shows what went wrong (yamlHint), the error points at
// that character and says how to fix it instead.
func (d *decoder) yamlError(err error, src []byte) {
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	e := &Error{File: d.file, Msg: "not valid YAML: " + msg, Err: err}
	if rest, ok := strings.CutPrefix(msg, "line "); ok {
		if num, text, ok := strings.Cut(rest, ": "); ok {
			if n, perr := strconv.Atoi(num); perr == nil {
				e.Line, e.Msg = n, "not valid YAML: "+text
			}
		}
	}
	if line, col, text, ok := yamlHint(src, msg, e.Line); ok {
		e.Line, e.Col, e.Msg = line, col, "not valid YAML: "+text
	}
	d.errs = append(d.errs, e)
}

// prescan rejects aliases and deep nesting before anything is interpreted.
// Aliases are refused outright: a template has no need for them, and
// expanding nested aliases is how a small file becomes a huge one.
func (d *decoder) prescan(n *yaml.Node, depth int) {
	if depth > maxDepth {
		d.errorf(n, "", "nested more than %d levels deep; this is not a template", maxDepth)
		return
	}
	if n.Kind == yaml.AliasNode {
		d.errorf(n, "", "YAML aliases (*%s) are not supported in templates; write the value out", units.Clip(n.Value))
		return
	}
	for _, c := range n.Content {
		d.prescan(c, depth+1)
		if len(d.errs) > 0 {
			return
		}
	}
}

// describe names a node's shape for "expected X, got Y" messages.
func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "a mapping"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		switch n.ShortTag() {
		case "!!null":
			return "nothing"
		case "!!bool":
			return "true/false"
		case "!!int", "!!float":
			return "the number " + n.Value
		}
		return units.Quote(n.Value)
	}
	return "something else"
}

func isNull(n *yaml.Node) bool {
	return n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null"
}

// joinKey extends a key path: joinKey("parts[1]", "to") is "parts[1].to".
func joinKey(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// label prefixes a message with its context: label("part \"R1\"", "to").
func label(ctx, key string) string {
	switch {
	case ctx == "":
		return key
	case key == "":
		return ctx
	}
	return ctx + ": " + key
}

// fields reads a mapping's keys in order, reporting non-scalar, duplicate
// and (when allowed is not nil) unknown keys. Problem keys are skipped.
func (d *decoder) fields(n *yaml.Node, path, ctx string, allowed []string) (map[string]entry, []entry) {
	pre := ""
	if ctx != "" {
		pre = ctx + ": "
	}
	byName := map[string]entry{}
	var order []entry
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		if k.Kind != yaml.ScalarNode || isNull(k) {
			d.errorf(k, path, "%sexpected a key name, got %s", pre, describe(k))
			continue
		}
		name := units.Clip(k.Value)
		kp := joinKey(path, name)
		if prev, dup := byName[name]; dup {
			d.errorf(k, kp, "%skey %q appears twice (first on line %d)", pre, name, prev.key.Line)
			continue
		}
		if allowed != nil && !slices.Contains(allowed, name) {
			if i := strings.IndexAny(k.Value, "：，"); i >= 0 && k.Style == 0 {
				// "name： V1" reads as one key; point at the full-width mark.
				c := *k
				c.Column += utf8.RuneCountInString(k.Value[:i])
				r, _ := utf8.DecodeRuneInString(k.Value[i:])
				d.errorf(&c, kp, "%sa full-width %s (%c) where YAML needs the ASCII one; write %s with a space after it", pre,
					map[rune]string{'：': "colon", '，': "comma"}[r], r, map[rune]string{'：': ":", '，': ","}[r])
				continue
			}
			if s := suggest(name, allowed); s != "" {
				d.errorf(k, kp, "%sunknown key %q%s", pre, name, s)
			} else {
				d.errorf(k, kp, "%sunknown key %q; expected one of %s", pre, name, strings.Join(allowed, ", "))
			}
			continue
		}
		e := entry{name: name, key: k, val: v}
		byName[name] = e
		order = append(order, e)
	}
	return byName, order
}

// expectMapping reports n unless it is a mapping.
func (d *decoder) expectMapping(n *yaml.Node, path, ctx, example string) bool {
	if n.Kind == yaml.MappingNode {
		return true
	}
	d.errorf(n, path, "%s: expected a mapping such as %s, got %s", ctx, example, describe(n))
	return false
}

// expectList reports n unless it is a list.
func (d *decoder) expectList(n *yaml.Node, path, ctx string) bool {
	if n.Kind == yaml.SequenceNode {
		return true
	}
	d.errorf(n, path, "%s: expected a list, got %s", ctx, describe(n))
	return false
}

// MaxName is the longest name, in characters, of a part, node or
// condition: names appear in every table and message.
const MaxName = 64

// name reads a name: a non-empty scalar without spaces or control characters,
// since names appear unquoted in labels such as "voltage a-b".
func (d *decoder) name(n *yaml.Node, path, ctx string) (string, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) || n.ShortTag() == "!!bool" {
		d.errorf(n, path, "%s: expected a name, got %s", ctx, describe(n))
		return "", false
	}
	if n.Value == "" {
		d.errorf(n, path, "%s: the name is empty", ctx)
		return "", false
	}
	if strings.IndexFunc(n.Value, func(r rune) bool { return unicode.IsSpace(r) || unicode.IsControl(r) }) >= 0 {
		d.errorf(n, path, "%s: name %s contains a space; names are single words such as vout or R1", ctx, units.Quote(n.Value))
		return "", false
	}
	if l := utf8.RuneCountInString(n.Value); l > MaxName {
		d.errorf(n, path, "%s: name %s is %d characters long; names are short words such as vout or R1 (at most %d)", ctx, units.Quote(n.Value), l, MaxName)
		return "", false
	}
	return n.Value, true
}

// Magnitudes a value may have (other than 0): no part, source, limit or
// goal of a circuit lies outside 1e-30 … 1e30 of its unit (common practice,
// no source; the SI prefixes end at quecto, 1e-30, and quetta, 1e30, from
// memory), and
// keeping inside leaves the solver's arithmetic far from float64's ends
// (2.2e-308 … 1.8e308), so that products, powers and relative errors stay
// finite and distinct.
const (
	MinMagnitude = 1e-30
	MaxMagnitude = 1e30
)

// value reads a number in the given unit with units.ParseAs, refusing
// magnitudes outside MinMagnitude … MaxMagnitude.
func (d *decoder) value(n *yaml.Node, path, ctx string, unit units.Unit) (float64, bool) {
	v, ok := d.number(n, path, ctx, unit)
	if !ok {
		return 0, false
	}
	switch a := math.Abs(v); {
	case a != 0 && a < MinMagnitude:
		hint := "write the value in its real size"
		if strings.HasSuffix(path, ".equals") || strings.Contains(path, ".curve") {
			hint = "for a goal of zero write 0 with an absolute tolerance such as 1m"
		}
		d.errorf(n, path, "%s: %s is below 1e-30 in size, smaller than any circuit quantity ohmfit computes with; %s", ctx, units.Clip(n.Value), hint)
		return 0, false
	case a > MaxMagnitude:
		d.errorf(n, path, "%s: %s is above 1e30 in size, larger than any circuit quantity ohmfit computes with; check the exponent", ctx, units.Clip(n.Value))
		return 0, false
	}
	return v, true
}

// number reads a number in the given unit with units.ParseAs.
func (d *decoder) number(n *yaml.Node, path, ctx string, unit units.Unit) (float64, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) {
		d.errorf(n, path, "%s: expected %s, got %s", ctx, units.Example(unit), describe(n))
		return 0, false
	}
	v, err := units.ParseAs(n.Value, unit)
	if err != nil {
		d.wrapf(n, path, err, "%s: %s", ctx, Message(err))
		return 0, false
	}
	return v, true
}

// positive reads a value that must be above zero.
func (d *decoder) positive(n *yaml.Node, path, ctx string, unit units.Unit) (float64, bool) {
	return d.positiveOr(n, path, ctx, unit, "")
}

// Hints for a zero where a resistance must be positive: what a zero means
// depends on what the resistance is.
const (
	zeroResistor = "a 0 Ω part is a wire: join its two nodes instead"
	zeroADCInput = "give the converter's input resistance in ohms, or leave input out for an ideal input"
)

// positiveOr is positive that adds zeroHint to the message when the value
// given is exactly zero.
func (d *decoder) positiveOr(n *yaml.Node, path, ctx string, unit units.Unit, zeroHint string) (float64, bool) {
	v, ok := d.value(n, path, ctx, unit)
	if ok && v <= 0 {
		hint := ""
		if v == 0 && zeroHint != "" {
			hint = "; " + zeroHint
		}
		d.errorf(n, path, "%s: must be positive, got %s%s", ctx, units.Clip(n.Value), hint)
		return 0, false
	}
	return v, ok
}

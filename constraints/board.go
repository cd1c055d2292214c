package constraints

import (
	"fmt"
	"path/filepath"
	"strings"
	"unicode"

	"github.com/ohmfit/ohmfit/eseries/units"
	"gopkg.in/yaml.v3"
)

// Board is a loaded board file: several networks, each a template, whose
// values are to be chosen together (`ohmfit board`). Loading checks the
// board file itself; the templates it names are read by the caller
// (package synth/board), which knows the built-in examples.
type Board struct {
	File     string // file name used in messages
	Dir      string // directory the networks' template paths are relative to
	Name     string // the `board:` line; "" when not given
	Networks []BoardNetwork
}

// BoardNetwork is one entry of a board's `networks:` list.
type BoardNetwork struct {
	// Template is the template as written: a path relative to the board
	// file, or example:NAME for a built-in example.
	Template string
	// Prefix is the designator prefix (U3 makes R1 into U3-R1).
	Prefix string
	// ErrorMax is the cap on the network's goal error, a fraction (0.5 %
	// gives 0.005); zero when not given (the template's tolerances then
	// set it, see synth/board).
	ErrorMax    float64
	HasErrorMax bool
	Pos         Pos // the list item
	TemplatePos Pos // the template's value
	PrefixPos   Pos // the prefix's value
}

// LoadBoard reads and parses the board file at path.
func LoadBoard(path string) (*Board, error) {
	data, rerr := readFile(path)
	if rerr != nil {
		return nil, rerr
	}
	return ParseBoard(path, data)
}

// ParseBoard parses board-file text. file is used in messages and, through
// its directory, to resolve the networks' template paths. The error, if
// any, is an *Error for the first problem in file order.
func ParseBoard(file string, data []byte) (*Board, error) {
	d := &decoder{file: file, dir: filepath.Dir(file)}
	if file == "" {
		d.dir = "."
	}
	b := d.parseBoard(data)
	if len(d.errs) > 0 {
		e := d.first()
		// The YAML reader speaks of templates; this is a board file.
		if strings.HasPrefix(e.Msg, "empty template") {
			e.Msg = "empty board file: expected `ohmfit: 1`, a `board:` name and `networks:`"
		}
		return nil, e
	}
	return b, nil
}

var (
	boardKeys   = []string{"ohmfit", "board", "networks"}
	networkKeys = []string{"template", "prefix", "error_max"}
)

func (d *decoder) parseBoard(data []byte) *Board {
	root := d.readRoot(data, "a board file")
	if root == nil {
		return nil
	}
	if root.Kind != yaml.MappingNode {
		d.errorf(root, "", "a board file is a mapping of keys (ohmfit, board, networks), got %s", describe(root))
		return nil
	}
	if !d.boardVersion(root) {
		return nil
	}
	b := &Board{File: d.file, Dir: d.dir}
	byName, _ := d.fields(root, "", "", boardKeys)
	if e, ok := byName["board"]; ok && !isNull(e.val) {
		if e.val.Kind != yaml.ScalarNode {
			d.errorf(e.val, "board", "board: expected a line of text naming the board, got %s", describe(e.val))
		} else {
			b.Name = e.val.Value
		}
	}
	e, ok := byName["networks"]
	switch {
	case !ok:
		d.missingf(root, "networks", "missing key \"networks\": the board's networks, each {template: FILE, prefix: U3, error_max: 1%%}")
	case isNull(e.val) || (e.val.Kind == yaml.SequenceNode && len(e.val.Content) == 0):
		d.errorf(e.val, "networks", "networks: the list is empty; a board needs at least one network")
	case d.expectList(e.val, "networks", "networks"):
		seen := map[string]int{} // lower-case prefix -> line
		for i, item := range e.val.Content {
			if n, ok := d.boardNetwork(item, fmt.Sprintf("networks[%d]", i), i); ok {
				key := strings.ToLower(n.Prefix)
				if line, dup := seen[key]; dup {
					d.errorf(nodeAt(item, "prefix"), fmt.Sprintf("networks[%d].prefix", i),
						"network %d: prefix %q is used twice (first on line %d); each network needs its own designator prefix", i+1, n.Prefix, line)
					continue
				}
				seen[key] = n.PrefixPos.Line
				b.Networks = append(b.Networks, n)
			}
		}
	}
	if len(d.errs) > 0 {
		return nil
	}
	return b
}

// boardVersion checks `ohmfit: 1` at the top of a board file by the
// templates' rule (version), so that both read and refuse a version alike;
// only the message for a missing key names the board file.
func (d *decoder) boardVersion(root *yaml.Node) bool {
	if nodeAt(root, "ohmfit") == root {
		d.missingf(root, "ohmfit", "missing `ohmfit: %d` (the schema version) at the top of the board file", SchemaVersion)
		return false
	}
	return d.version(root)
}

// nodeAt returns the value of key in mapping n, or n itself.
func nodeAt(n *yaml.Node, key string) *yaml.Node {
	for i := 0; i+1 < len(n.Content); i += 2 {
		if n.Content[i].Value == key {
			return n.Content[i+1]
		}
	}
	return n
}

func (d *decoder) boardNetwork(n *yaml.Node, path string, i int) (BoardNetwork, bool) {
	ctx := fmt.Sprintf("network %d", i+1)
	out := BoardNetwork{Pos: Pos{n.Line, n.Column}}
	if !d.expectMapping(n, path, ctx, "{template: rail.yaml, prefix: U3, error_max: 1%}") {
		return out, false
	}
	before := len(d.errs)
	byName, _ := d.fields(n, path, ctx, networkKeys)
	if e, ok := byName["template"]; ok {
		if e.val.Kind != yaml.ScalarNode || isNull(e.val) || strings.TrimSpace(e.val.Value) == "" {
			d.errorf(e.val, joinKey(path, "template"), "%s: template: expected a file name or example:NAME, got %s", ctx, describe(e.val))
		} else {
			out.Template, out.TemplatePos = e.val.Value, Pos{e.val.Line, e.val.Column}
		}
	} else {
		d.missingf(n, joinKey(path, "template"), "%s: missing key \"template\": a template file (relative to the board file) or example:NAME", ctx)
	}
	if e, ok := byName["prefix"]; ok {
		if p, ok := d.prefix(e.val, joinKey(path, "prefix"), ctx); ok {
			out.Prefix, out.PrefixPos = p, Pos{e.val.Line, e.val.Column}
		}
	} else {
		d.missingf(n, joinKey(path, "prefix"), "%s: missing key \"prefix\": the designator prefix of its parts, such as U3", ctx)
	}
	if e, ok := byName["error_max"]; ok {
		out.ErrorMax, out.HasErrorMax = d.errorMax(e.val, joinKey(path, "error_max"), ctx)
	}
	return out, len(d.errs) == before
}

// prefix reads a designator prefix: a letter, then letters, digits or
// underscores, so that "U3-R1" reads back unambiguously.
func (d *decoder) prefix(n *yaml.Node, path, ctx string) (string, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) || n.ShortTag() == "!!bool" || n.Value == "" {
		d.errorf(n, path, "%s: prefix: expected a designator prefix such as U3, got %s", ctx, describe(n))
		return "", false
	}
	for k, r := range n.Value {
		if r > unicode.MaxASCII || !(unicode.IsLetter(r) || (k > 0 && (unicode.IsDigit(r) || r == '_'))) {
			d.errorf(n, path, "%s: prefix %q: a designator prefix is a letter followed by letters, digits or _, such as U3", ctx, n.Value)
			return "", false
		}
	}
	return n.Value, true
}

// errorMax reads a goal-error cap: "0.5%" or a plain fraction such as
// 0.005, above zero and below 100 %.
func (d *decoder) errorMax(n *yaml.Node, path, ctx string) (float64, bool) {
	what := ctx + ": error_max"
	if n.Kind != yaml.ScalarNode || isNull(n) {
		d.errorf(n, path, "%s: expected a goal error such as 1%% or 0.01, got %s", what, describe(n))
		return 0, false
	}
	q, err := units.Parse(n.Value)
	if err != nil {
		d.wrapf(n, path, err, "%s: %s", what, strings.TrimPrefix(err.Error(), "eseries: "))
		return 0, false
	}
	if q.Unit != units.Percent && q.Unit != units.NoUnit {
		d.errorf(n, path, "%s: expected a goal error such as 1%% or 0.01, got %s", what, n.Value)
		return 0, false
	}
	if !(q.Value > 0) {
		d.errorf(n, path, "%s: must be positive, got %s", what, n.Value)
		return 0, false
	}
	if q.Value >= 1 {
		d.errorf(n, path, "%s: %s is a goal error of %s or more; for percent write %s%%", what, n.Value, "100 %", n.Value)
		return 0, false
	}
	return q.Value, true
}

package constraints

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"unicode"
	"unicode/utf8"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"gopkg.in/yaml.v3"
)

// MaxFileSize is the largest template or stock file read, in bytes. Real
// templates are a few kilobytes; the bound keeps a wrong path (a log, an
// image) from being slurped whole.
const MaxFileSize = 4 << 20

// maxDepth bounds nesting. The deepest legal path (choose, overrides, part,
// series list) is five levels; anything far deeper is not a template.
const maxDepth = 32

// Defaults for choose, as the contract states them.
const (
	defaultSeries = "E24"
	defaultMin    = 10.0
	defaultMax    = 10e6
)

// Load reads and parses the template at path. File is set to path as given
// and Dir to its directory, against which stock files are resolved.
func Load(path string) (*Template, error) {
	data, rerr := readFile(path)
	if rerr != nil {
		return nil, rerr
	}
	return Parse(path, data)
}

// StdinName stands for standard input in messages ("<stdin>:3:5: ...");
// the FILE argument "-" reads the template from there.
const StdinName = "<stdin>"

// LoadReader reads a template from r (standard input, say) with the same
// size limit as a file, and parses it; name stands for the file in messages,
// and stock files are resolved against the current directory.
func LoadReader(name string, r io.Reader) (*Template, error) {
	data, rerr := readAllLimited(name, r, MaxFileSize, "a template")
	if rerr != nil {
		return nil, rerr
	}
	d := &decoder{file: name, dir: "."}
	t := d.parse(data)
	if len(d.errs) > 0 {
		return nil, d.first()
	}
	return t, nil
}

// Parse parses template text. file is used in messages and, through its
// directory, to resolve stock files ("" means the current directory). The
// error, if any, is an *Error for the first problem in file order.
func Parse(file string, data []byte) (*Template, error) {
	d := &decoder{file: file, dir: filepath.Dir(file)}
	if file == "" {
		d.dir = "."
	}
	t := d.parse(data)
	if len(d.errs) > 0 {
		return nil, d.first()
	}
	return t, nil
}

// readFile reads a regular file of at most MaxFileSize bytes. The size is
// checked before reading so a huge or endless file costs nothing. The file's
// type is checked before it is opened, and it is opened without blocking:
// opening a FIFO (or a device) could otherwise wait forever for a writer.
func readFile(path string) ([]byte, *Error) {
	return readLimited(path, MaxFileSize, "a template")
}

// ReadFile reads an input file the way templates are read: a regular file
// only (a FIFO or device is refused without blocking), of at most limit
// bytes; what names the kind of file for the message ("a shard result").
// Its errors name the file and say what is wrong in plain words.
func ReadFile(path string, limit int64, what string) ([]byte, error) {
	data, err := readLimited(path, limit, what)
	if err != nil {
		return nil, err
	}
	return data, nil
}

func readLimited(path string, limit int64, what string) ([]byte, *Error) {
	fail := func(msg string, err error) ([]byte, *Error) {
		return nil, &Error{File: path, Msg: msg, Err: err}
	}
	notRegular := func(fi fs.FileInfo) ([]byte, *Error) {
		return fail(fmt.Sprintf("not a regular file (%s); ohmfit reads plain text files", fileKind(fi.Mode())), nil)
	}
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		return notRegular(fi)
	}
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return fail("cannot open: "+pathCause(err), err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return fail("cannot read: "+pathCause(err), err)
	}
	if !fi.Mode().IsRegular() {
		return notRegular(fi) // replaced between the two looks
	}
	if fi.Size() > limit {
		return fail(tooBigMessage(limit, what), nil)
	}
	// The limit also covers a file that grows between Stat and read.
	return readAllLimited(path, f, limit, what)
}

// readAllLimited reads r to its end, refusing more than limit bytes; the
// one reader behind every input file and standard input.
func readAllLimited(name string, r io.Reader, limit int64, what string) ([]byte, *Error) {
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		return nil, &Error{File: name, Msg: "cannot read: " + pathCause(err), Err: err}
	}
	if int64(len(data)) > limit {
		return nil, &Error{File: name, Msg: tooBigMessage(limit, what)}
	}
	return data, nil
}

// tooBigMessage says an input is over its size limit.
func tooBigMessage(limit int64, what string) string {
	return fmt.Sprintf("file is larger than %d MiB; this is not %s", limit>>20, what)
}

// fileKind names a file type for a message.
func fileKind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a directory"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}

// pathCause drops the path an fs error repeats, since Error names the file.
func pathCause(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// entry is one key of a mapping with its value.
type entry struct {
	name     string
	key, val *yaml.Node
}

// Cross-references are checked once every section has been read, so their
// order in the file does not matter.
type (
	nodeRef struct {
		name string
		n    *yaml.Node
		key  string
	}
	partRef struct {
		name string
		n    *yaml.Node
		key  string
	}
	condRef struct {
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

	nodeRefs     []nodeRef
	ratioRefs    []nodeRef // the nodes ratio targets divide by
	partRefs     []partRef
	condRefs     []condRef
	overrideRefs []partRef
	setRefs      []setRef
	curveRefs    []curveRef
	adcRefs      []partRef
	heatRefs     []partRef // self_heating targets: the sensor each names
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
	v, ok := d.value(n, path, ctx, unit)
	if ok && v <= 0 {
		hint := ""
		if unit == units.Ohm && v == 0 {
			hint = "; a 0 Ω part is a wire: join its two nodes instead"
		}
		d.errorf(n, path, "%s: must be positive, got %s%s", ctx, units.Clip(n.Value), hint)
		return 0, false
	}
	return v, ok
}

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
var partTypes = []struct {
	name string
	kind solver.Kind
	keys []string
}{
	{"resistor", solver.Resistor, []string{"name", "type", "from", "to", "value", "tolerance", "tcr", "package"}},
	{"voltage-source", solver.VoltageSource, []string{"name", "type", "plus", "minus", "volts", "tolerance"}},
	{"current-source", solver.CurrentSource, []string{"name", "type", "from", "to", "amps", "tolerance"}},
	{"opamp", solver.OpAmp, []string{"name", "type", "plus", "minus", "out"}},
	// Sensors are resistors whose value follows the temperature (sensorload.go).
	{"ntc", solver.Resistor, append([]string{"name", "type", "from", "to"}, sensorKeys["ntc"]...)},
	{"rtd", solver.Resistor, append([]string{"name", "type", "from", "to"}, sensorKeys["rtd"]...)},
}

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

func (d *decoder) part(n *yaml.Node, path string, i int) (PartSpec, *yaml.Node, bool) {
	ctx := fmt.Sprintf("part %d", i+1)
	if !d.expectMapping(n, path, ctx, "{name: R1, type: resistor, from: a, to: b}") {
		return PartSpec{}, nil, false
	}
	// Name and type are needed before the other keys can be judged.
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
		return PartSpec{}, nil, false
	}
	ti := -1
	if typeNode.Kind == yaml.ScalarNode {
		ti = slices.IndexFunc(partTypes, func(p struct {
			name string
			kind solver.Kind
			keys []string
		}) bool {
			return p.name == typeNode.Value
		})
	}
	if ti < 0 {
		what := describe(typeNode)
		if s := suggest(typeNode.Value, partTypeNames()); s != "" && typeNode.Kind == yaml.ScalarNode {
			d.errorf(typeNode, joinKey(path, "type"), "%s: unknown part type %s%s", ctx, what, s)
		} else {
			d.errorf(typeNode, joinKey(path, "type"), "%s: unknown part type %s; types are %s", ctx, what, strings.Join(partTypeNames(), ", "))
		}
		return PartSpec{}, nil, false
	}
	pt := partTypes[ti]
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
		return PartSpec{}, nil, false
	}
	if pt.kind != solver.OpAmp && p.From == p.To {
		second := "to"
		if pt.kind == solver.VoltageSource {
			second = "minus"
		}
		d.errorf(byName[second].val, joinKey(path, second), "%s: both ends are on node %q, so the part does nothing", ctx, p.From)
		return PartSpec{}, nil, false
	}
	if _, sensor := sensorKeys[pt.name]; sensor {
		if !d.sensorModel(&p, pt.name, n, byName, path, ctx) || !d.realPart(&p, byName, path, ctx) {
			return PartSpec{}, nil, false
		}
		return p, byName["name"].val, true
	}
	switch pt.kind {
	case solver.Resistor:
		e, has := byName["value"]
		if !has {
			p.Free = true
			break
		}
		if isNull(e.val) {
			d.errorf(e.val, joinKey(path, "value"), "%s: value is empty; leave the key out to let ohmfit choose it", ctx)
			return PartSpec{}, nil, false
		}
		p.Value, ok = d.positive(e.val, joinKey(path, "value"), label(ctx, "value"), units.Ohm)
	case solver.VoltageSource:
		p.Value, ok = d.value(byName["volts"].val, joinKey(path, "volts"), label(ctx, "volts"), units.Volt)
	case solver.CurrentSource:
		p.Value, ok = d.value(byName["amps"].val, joinKey(path, "amps"), label(ctx, "amps"), units.Amp)
	}
	if ok && !d.realPart(&p, byName, path, ctx) {
		return PartSpec{}, nil, false
	}
	return p, byName["name"].val, ok
}

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
		d.overrideRefs = append(d.overrideRefs, partRef{o.name, o.key, path})
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
		k := -1
		if it.Kind == yaml.ScalarNode {
			k = slices.Index(rankNames, it.Value)
		}
		switch {
		case k < 0 && it.Kind == yaml.ScalarNode && suggest(it.Value, rankNames) != "":
			d.errorf(it, path, "rank: unknown key %s%s", describe(it), suggest(it.Value, rankNames))
		case k < 0:
			d.errorf(it, path, "rank: expected one of %s, got %s", strings.Join(rankNames, ", "), describe(it))
		case slices.Contains(keys, RankKey(k)):
			d.errorf(it, path, "rank: %s appears twice", units.Quote(it.Value))
		default:
			keys = append(keys, RankKey(k))
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

// crossCheck resolves names between sections once all are read.
func (d *decoder) crossCheck() {
	t := d.t
	d.expandCurves()
	t.addHiddenConditions()
	d.checkSensors()
	if len(d.errs) == 0 {
		d.checkSensorRanges()
	}
	if len(d.errs) > 0 {
		return
	}
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
	for _, r := range d.nodeRefs {
		if !slices.Contains(nodes, r.name) {
			d.errorf(r.n, r.key, "target names node %q, which no part connects%s", r.name, suggest(r.name, nodes))
		}
	}
	for _, r := range d.ratioRefs {
		if r.name == t.Ground {
			d.errorf(r.n, r.key, "ratio: %q is the ground node, always at 0 V, so the ratio is undefined; for a node's voltage to ground write {voltage: NODE}", r.name)
		}
	}
	d.checkDangling(nodes)
	var names []string
	for _, p := range t.Parts {
		names = append(names, p.Name)
	}
	for _, r := range d.partRefs {
		if !slices.Contains(names, r.name) {
			d.errorf(r.n, r.key, "target names part %q, which is not in parts%s", r.name, suggest(r.name, names))
		}
	}
	var conds []string
	for _, c := range t.Conditions {
		conds = append(conds, c.Name)
	}
	for _, r := range d.condRefs {
		if !slices.Contains(conds, r.name) {
			d.errorf(r.n, r.key, "when names condition %q, which is not in conditions%s", r.name, suggest(r.name, conds))
		}
	}
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
			v, ok = d.positive(s.val, s.path, label(s.ctx, s.part), units.Ohm)
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
	if len(d.errs) == 0 {
		// Last, so that no check above counts them as the user's parts
		// (an ADC's node is connected only by what the user wires to it).
		d.addADCLoads()
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

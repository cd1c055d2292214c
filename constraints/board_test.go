package constraints

import (
	"errors"
	"strings"
	"testing"
)

const boardHead = "ohmfit: 1\nboard: Test board\nnetworks:\n"

func TestParseBoard(t *testing.T) {
	src := boardHead + `  - {template: rail.yaml, prefix: U3, error_max: 0.5%}
  - {template: example:feedback, prefix: U4, error_max: 0.002}
  - {template: sub/sense.yaml, prefix: U9}
`
	b, err := ParseBoard("boards/main.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if b.Name != "Test board" || b.Dir != "boards" || len(b.Networks) != 3 {
		t.Fatalf("got %+v", b)
	}
	want := []BoardNetwork{
		{Template: "rail.yaml", Prefix: "U3", ErrorMax: 0.005, HasErrorMax: true},
		{Template: "example:feedback", Prefix: "U4", ErrorMax: 0.002, HasErrorMax: true},
		{Template: "sub/sense.yaml", Prefix: "U9"},
	}
	for i, w := range want {
		g := b.Networks[i]
		if g.Template != w.Template || g.Prefix != w.Prefix || !Same(g.ErrorMax, w.ErrorMax) || g.HasErrorMax != w.HasErrorMax {
			t.Errorf("network %d: got %+v, want %+v", i+1, g, w)
		}
		if g.TemplatePos.Line != 4+i || g.TemplatePos.Col != 16 {
			t.Errorf("network %d: template at %+v", i+1, g.TemplatePos)
		}
	}
}

func TestParseBoardBad(t *testing.T) {
	cases := []struct {
		name string
		src  string // "@@" marks where the error must point
		frag string
	}{
		{"empty", "", "empty board file"},
		{"not a mapping", "@@- a\n", "a board file is a mapping"},
		{"missing version", "@@board: x\nnetworks: []\n", "missing `ohmfit: 1`"},
		{"other version", "ohmfit: @@2\n", "unsupported schema version 2; this ohmfit reads version 1"},
		{"version not a number", "ohmfit: @@one\n", "expected the schema version 1"},
		{"unknown top key", "ohmfit: 1\n@@netwrks: []\n", `unknown key "netwrks" (did you mean "networks"?)`},
		{"no networks", "@@ohmfit: 1\nboard: x\n", `missing key "networks"`},
		{"empty networks", "ohmfit: 1\nnetworks: @@[]\n", "the list is empty"},
		{"network not a mapping", boardHead + "  - @@rail.yaml\n", "network 1: expected a mapping"},
		{"unknown network key", boardHead + "  - {template: a.yaml, prefix: U1, @@error: 1%}\n", `network 1: unknown key "error" (did you mean "error_max"?)`},
		{"missing template", boardHead + "  - @@{prefix: U1, error_max: 1%}\n", `network 1: missing key "template"`},
		{"missing prefix", boardHead + "  - @@{template: a.yaml}\n", `network 1: missing key "prefix"`},
		{"bad prefix", boardHead + "  - {template: a.yaml, prefix: @@3U}\n", `prefix "3U": a designator prefix is a letter`},
		{"prefix with dash", boardHead + "  - {template: a.yaml, prefix: @@U-3}\n", `prefix "U-3"`},
		{"duplicate prefix", boardHead + "  - {template: a.yaml, prefix: U1}\n  - {template: b.yaml, prefix: @@u1}\n", `network 2: prefix "u1" is used twice (first on line 4)`},
		{"error_max zero", boardHead + "  - {template: a.yaml, prefix: U1, error_max: @@0}\n", "must be positive"},
		{"error_max unit", boardHead + "  - {template: a.yaml, prefix: U1, error_max: @@3V}\n", "expected a goal error such as 1% or 0.01"},
		{"error_max unreadable", boardHead + "  - {template: a.yaml, prefix: U1, error_max: @@lots}\n", "network 1: error_max:"},
		{"error_max plain one", boardHead + "  - {template: a.yaml, prefix: U1, error_max: @@1}\n", "for percent write 1%"},
		{"empty template name", boardHead + "  - {template: @@'', prefix: U1}\n", "expected a file name or example:NAME"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text, line, col := marked(c.src)
			_, err := ParseBoard("b.yaml", []byte(text))
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("got %v, want an *Error", err)
			}
			if !strings.Contains(e.Msg, c.frag) {
				t.Errorf("message %q lacks %q", e.Msg, c.frag)
			}
			if line > 0 && (e.Line != line || e.Col != col) {
				t.Errorf("at %d:%d, want %d:%d (%s)", e.Line, e.Col, line, col, e.Msg)
			}
			if e.File != "b.yaml" {
				t.Errorf("file %q", e.File)
			}
		})
	}
}

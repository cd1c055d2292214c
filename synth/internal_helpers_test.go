package synth

import (
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
)

// parsedProblem reads a template from text and builds its search problem
// with the template's own series, failing the test on any error: the
// internal tests' counterpart of problemFromYAML in the external ones.
func parsedProblem(t *testing.T, name string, text []byte) *Problem {
	t.Helper()
	tp, err := constraints.Parse(name, text)
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	p, err := NewProblem(cp, "")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

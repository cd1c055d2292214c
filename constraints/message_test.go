package constraints_test

import (
	"errors"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// Every package's errors carry the package's name in Error, as Go errors
// do, and leave it out of what constraints.Message gives a person; the
// sentinels still match with errors.Is.
func TestMessageLeavesOutThePackage(t *testing.T) {
	_, parseErr := units.Parse("4.7x")
	_, seriesErr := eseries.Lookup("E25")
	_, codeErr := units.Code(-1)
	_, pkgErr := ratings.Lookup("0000")
	_, ntcErr := sensors.Beta{R25: 10e3, Beta: 3950}.Resistance(-300)
	_, combErr := synth.Combine(-1, nil, synth.CombineSettings{})
	_, solveErr := solver.Compile(solver.Circuit{Parts: []solver.Part{
		{Name: "V1", Kind: solver.VoltageSource, From: "a", To: "gnd", Value: 1},
		{Name: "R1", Kind: solver.Resistor, From: "b", To: "c", Value: 1e3},
	}})
	cases := []struct {
		name   string
		err    error
		pkg    string
		is     error
		starts string
	}{
		{"value", parseErr, "units", units.ErrSyntax, "cannot read value"},
		{"series", seriesErr, "eseries", eseries.ErrUnknownSeries, "unknown series"},
		{"code", codeErr, "units", nil, "no IEC 60062 code"},
		{"package", pkgErr, "ratings", nil, "unknown package"},
		{"sensor range", ntcErr, "sensors", sensors.ErrRange, "-300 °C"},
		{"combine", combErr, "synth", nil, "combine needs"},
		{"network", solveErr, "solver", solver.ErrSingular, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.err == nil {
				t.Fatal("no error")
			}
			m := constraints.Message(c.err)
			if !strings.HasPrefix(c.err.Error(), c.pkg+": ") {
				t.Errorf("Error() = %q, want the package name first", c.err.Error())
			}
			if strings.Contains(m, c.pkg+": ") || !strings.HasPrefix(m, c.starts) {
				t.Errorf("Message = %q, want it to start %q, without %q", m, c.starts, c.pkg+": ")
			}
			if c.is != nil && !errors.Is(c.err, c.is) {
				t.Errorf("errors.Is(%v, %v) is false", c.err, c.is)
			}
		})
	}
}

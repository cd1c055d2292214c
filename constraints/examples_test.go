package constraints_test

import (
	"reflect"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/solver"
)

// TestEmbeddedExamples loads every shipped example and checks the network
// it describes part by part, so an edit that silently changes a topology
// shows up here.
func TestEmbeddedExamples(t *testing.T) {
	type part struct {
		name string
		kind solver.Kind
		free bool
	}
	R, V, I, U := solver.Resistor, solver.VoltageSource, solver.CurrentSource, solver.OpAmp
	want := map[string][]part{
		"battery-sense": {{"Vgpio", V, false}, {"Rtop", R, true}, {"RT1", R, false}, {"Rpar", R, true}},
		"bias-bench":    {{"Vin", V, false}, {"R1", R, false}, {"R2", R, false}, {"Ileak", I, false}, {"RL", R, false}},
		"bridge":        {{"Vex", V, false}, {"RG", R, false}, {"R1", R, true}, {"R2", R, true}, {"R3", R, false}},
		// The ADC's input resistance and leakage come last, as the parts
		// that load its node.
		"cold-chain":  {{"Vgpio", V, false}, {"Rtop", R, true}, {"RT1", R, false}, {"Rpar", R, true}, {"ADC1:input", R, false}, {"ADC1:leakage", I, false}},
		"divider":     {{"V5", V, false}, {"R1", R, true}, {"R2", R, true}, {"RL", R, false}},
		"feedback":    {{"Vout", V, false}, {"R1", R, true}, {"R2", R, true}, {"Ibias", I, false}},
		"gain-stage":  {{"Vin", V, false}, {"U1", U, false}, {"Rf", R, true}, {"Rg", R, true}, {"RL", R, false}},
		"sensor-bias": {{"Vref", V, false}, {"R1", R, true}, {"RT", R, false}, {"R2", R, true}},
	}
	// The one example with nothing to choose: it is what `solve` and a
	// plain `check` are shown on.
	valued := map[string]bool{"bias-bench": true}
	names := examples.Names()
	if len(names) != len(want) {
		t.Errorf("examples %v, want %d of them", names, len(want))
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			data, _ := examples.Get(name)
			tpl, err := constraints.Parse(name+".yaml", data)
			if err != nil {
				t.Fatal(err)
			}
			c := tpl.Circuit()
			var got []part
			for i, p := range c.Parts {
				got = append(got, part{p.Name, p.Kind, tpl.Parts[i].Free})
				if tpl.Parts[i].Free != (p.Kind == solver.Resistor && p.Value == 0) {
					t.Errorf("%s: free %v but value %g", p.Name, tpl.Parts[i].Free, p.Value)
				}
			}
			if !reflect.DeepEqual(got, want[name]) {
				t.Errorf("parts %v, want %v", got, want[name])
			}
			if tpl.Valued() != valued[name] || len(tpl.Targets) == 0 || tpl.Name == "" {
				t.Errorf("an example must have targets, a name, and free parts unless it is the valued one")
			}
			if examples.Summary(name) != tpl.Name {
				t.Errorf("Summary %q, want %q", examples.Summary(name), tpl.Name)
			}
		})
	}
}

package constraints_test

import (
	"fmt"

	"github.com/ohmfit/ohmfit/constraints"
)

func ExampleParse() {
	src := []byte(`ohmfit: 1
name: Bias for a reference input
parts:
  - {name: Vcc, type: voltage-source, plus: vcc, minus: gnd, volts: 12}
  - {name: Rtop, type: resistor, from: vcc, to: ref}
  - {name: Rbot, type: resistor, from: ref, to: gnd}
targets:
  - {voltage: ref, equals: 2.048, tolerance: 1%}
  - {current: Rtop, max: 200u}
choose: {series: E48, min: 1k}
`)
	t, err := constraints.Parse("bias.yaml", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(t.Name)
	for _, i := range t.FreeParts() {
		c := t.Choose.For(t.Parts[i].Name)
		fmt.Printf("%s: %s from %g to %g, %s\n", t.Parts[i].Name, c.Series, c.Min, c.Max, c.Combine)
	}
	for _, tg := range t.Targets {
		fmt.Println(tg.Label())
	}
	fmt.Println(t.Conditions[0].Name, t.Rank)

	_, err = constraints.Parse("bias.yaml", []byte("ohmfit: 1\nparts:\n  - {name: R1, type: resistr, from: a, to: gnd}\n"))
	fmt.Println(err)
	// Output:
	// Bias for a reference input
	// Rtop: E48 from 1000 to 1e+07, single
	// Rbot: E48 from 1000 to 1e+07, single
	// voltage ref
	// current Rtop
	// nominal [error power parts]
	// bias.yaml:3:22: part "R1": unknown part type "resistr" (did you mean "resistor"?)
}

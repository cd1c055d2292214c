package variation_test

import (
	"fmt"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// A 3.3 V to 0.8 V divider of 1 % parts from a ±1 % rail: the worst case
// over all eight corners (by the divider formula, 3.3·1.01·10.2k·1.01 /
// (31.6k·0.99 + 10.2k·1.01) = 0.8257 V at the top) and the sensitivity of
// the output to each part.
func ExampleCheck() {
	t, err := constraints.Parse("", []byte(`ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: 3.3, tolerance: 1%}
  - {name: R1, type: resistor, from: in, to: fb, value: 31.6k, tolerance: 1%}
  - {name: R2, type: resistor, from: fb, to: gnd, value: 10.2k, tolerance: 1%}
targets:
  - {voltage: fb, equals: 0.8, tolerance: 3%}
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	cp, err := constraints.Compile(t)
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := variation.NewDesign(cp, nil, "", constraints.Ambient{})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := variation.Check(d, &variation.Settings{Samples: -1})
	if err != nil {
		fmt.Println(err)
		return
	}
	g := r.Goals[0]
	fmt.Printf("%s: %.4f V, worst case %.4f … %.4f V (%s, %d corners)\n", g.Label, g.Nominal, g.WorstMin, g.WorstMax, r.Method, r.Corners)
	for _, s := range g.Sens {
		fmt.Printf("S(%s) = %+.4f\n", s.Part, s.Normalised)
	}
	// Output:
	// voltage fb: 0.8053 V, worst case 0.7852 … 0.8257 V (corners, 8 corners)
	// S(V) = +1.0000
	// S(R1) = -0.7560
	// S(R2) = +0.7560
}

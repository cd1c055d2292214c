package synth_test

import (
	"context"
	"fmt"
	"log"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// An outside Go program fits a network in four steps: parse a template,
// compile it against its network, build the search space from the
// preferred series, and search. The example is an invented 3.3 V rail
// divider for a 1.2 V reference input; each answer's output is worked out
// again with the divider formula, 3.3·R2/(R1+R2), beside the search's error.
func ExampleSearch() {
	tmpl, err := constraints.Parse("rail.yaml", []byte(`ohmfit: 1
name: 3.3 V to 1.2 V
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: 1.2}
choose: {series: E24, min: 1k, max: 100k}
`))
	if err != nil {
		log.Fatal(err)
	}
	cp, err := constraints.Compile(tmpl)
	if err != nil {
		log.Fatal(err)
	}
	p, err := synth.NewProblem(cp, "") // "" keeps the template's series
	if err != nil {
		log.Fatal(err)
	}
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 3}, synth.Rows{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(res.Status, "over", res.Stats.Space, "candidates")
	for _, s := range res.Solutions {
		v := s.Values()
		divider := 3.3 * v[1] / (v[0] + v[1]) // the divider formula
		fmt.Printf("%d: R1 %g, R2 %g, out %.4f V (error %.3f%%)\n", s.Rank, v[0], v[1], divider, 100*s.Score.Error)
	}
	// Output:
	// proven over 2401 candidates
	// 1: R1 82000, R2 47000, out 1.2023 V (error 0.194%)
	// 2: R1 8200, R2 4700, out 1.2023 V (error 0.194%)
	// 3: R1 75000, R2 43000, out 1.2025 V (error 0.212%)
}

// Choose is the one rule for the search method, as every command uses it:
// "auto" takes branch and bound where its bounds apply.
func ExampleChoose() {
	tmpl, err := constraints.Parse("ladder.yaml", []byte(`ohmfit: 1
name: two thresholds
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: a}
  - {name: R2, type: resistor, from: a, to: b}
  - {name: R3, type: resistor, from: b, to: gnd}
targets:
  - {voltage: a, equals: 3}
  - {voltage: b, equals: 1}
choose: {series: E24, min: 1k, max: 100k}
`))
	if err != nil {
		log.Fatal(err)
	}
	cp, err := constraints.Compile(tmpl)
	if err != nil {
		log.Fatal(err)
	}
	p, err := synth.NewProblem(cp, "")
	if err != nil {
		log.Fatal(err)
	}
	set := &synth.Settings{Top: 1}
	m, _, err := synth.Choose("auto", p, set)
	if err != nil {
		log.Fatal(err)
	}
	res, err := synth.Search(context.Background(), p, set, m)
	if err != nil {
		log.Fatal(err)
	}
	v := res.Solutions[0].Values()
	// The ladder's closed form: V(a) = 5·(R2+R3)/ΣR, V(b) = 5·R3/ΣR.
	sum := v[0] + v[1] + v[2]
	fmt.Println(m.Name(), res.Status, v)
	fmt.Printf("a %.3f V, b %.3f V\n", 5*(v[1]+v[2])/sum, 5*v[2]/sum)
	// Output:
	// branch-and-bound proven [36000 36000 18000]
	// a 3.000 V, b 1.000 V
}

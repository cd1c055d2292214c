package constraints

import (
	"math"
	"testing"
)

// TestSourceCurrentReads checks what a current target reads on each part
// type (the contract's "Current targets on sources"): 12 V across 10 kΩ
// draws 1.2 mA (Ohm's law), which the voltage source delivers out of plus
// (+1.2 mA, it supplies power) and the resistor carries from -> to; a
// current source reads the current it drives, from -> to inside it (KCL:
// 1 mA into node b through Rb). A supply-current budget below the draw
// must reject the design.
func TestSourceCurrentReads(t *testing.T) {
	tp, err := Parse("budget.yaml", []byte(`ohmfit: 1
parts:
  - {name: Vs, type: voltage-source, plus: a, minus: gnd, volts: 12}
  - {name: R1, type: resistor, from: a, to: gnd, value: 10k}
  - {name: Is, type: current-source, from: gnd, to: b, amps: 1m}
  - {name: Rb, type: resistor, from: b, to: gnd, value: 1k}
targets:
  - {current: Vs, max: 100u}
  - {current: R1, max: 1}
  - {current: Is, max: 1}
`))
	if err != nil {
		t.Fatal(err)
	}
	p, err := Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	s := p.Network.NewSolver()
	sc := p.NewScore()
	if err := p.Evaluate(s, nil, sc); err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{12.0 / 10e3, 12.0 / 10e3, 1e-3} {
		if got := sc.Value(i, 0); math.Abs(got-want) > 1e-15 {
			t.Errorf("%s reads %g A, want %g A", tp.Targets[i].Label(), got, want)
		}
	}
	if sc.Feasible || sc.Violated != (Violation{Kind: TargetLimit, Target: 0, Condition: 0}) {
		t.Errorf("a 100 µA budget passed a 1.2 mA draw (feasible %v, violated %+v)", sc.Feasible, sc.Violated)
	}
}

package solver_test

import (
	"fmt"

	"github.com/ohmfit/ohmfit/solver"
)

// A 3.3 V rail divided down to a 0.8 V feedback node.
func ExampleAnalyze() {
	sol, err := solver.Analyze(solver.Circuit{Parts: []solver.Part{
		{Name: "V1", Kind: solver.VoltageSource, From: "out", To: "gnd", Value: 3.3},
		{Name: "R1", Kind: solver.Resistor, From: "out", To: "fb", Value: 31.25e3},
		{Name: "R2", Kind: solver.Resistor, From: "fb", To: "gnd", Value: 10e3},
	}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, n := range sol.Nodes {
		fmt.Printf("%-3s %.4f V\n", n.Name, n.Volts)
	}
	for _, p := range sol.Parts {
		fmt.Printf("%-3s %8.4f V %9.3f uA %9.3f uW\n", p.Name, p.Volts, p.Amps*1e6, p.Watts*1e6)
	}
	fmt.Printf("resistors dissipate %.3f uW\n", sol.ResistorPower*1e6)
	// Output:
	// gnd 0.0000 V
	// out 3.3000 V
	// fb  0.8000 V
	// V1    3.3000 V   -80.000 uA  -264.000 uW
	// R1    2.5000 V    80.000 uA   200.000 uW
	// R2    0.8000 V    80.000 uA    64.000 uW
	// resistors dissipate 264.000 uW
}

// Re-solving one topology for new values, and the resistance seen from the
// feedback node with the rail shorted (R1 ∥ R2).
func ExampleSolver() {
	net, err := solver.Compile(solver.Circuit{Parts: []solver.Part{
		{Name: "V1", Kind: solver.VoltageSource, From: "out", To: "gnd", Value: 3.3},
		{Name: "R1", Kind: solver.Resistor, From: "out", To: "fb"},
		{Name: "R2", Kind: solver.Resistor, From: "fb", To: "gnd", Value: 10e3},
	}})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := net.NewSolver()
	r1, _ := net.PartIndex("R1")
	fb, _ := net.NodeIndex("fb")
	for _, v := range []float64{10e3, 22.1e3, 31.6e3} {
		s.SetValue(r1, v)
		if err := s.Solve(); err != nil {
			fmt.Println(err)
			return
		}
		rth, _ := s.Resistance(fb, 0)
		fmt.Printf("R1 = %5.0f: V(fb) = %.4f V, R(fb) = %.1f ohm\n", v, s.Voltage(fb), rth)
	}
	// Output:
	// R1 = 10000: V(fb) = 1.6500 V, R(fb) = 5000.0 ohm
	// R1 = 22100: V(fb) = 1.0280 V, R(fb) = 6884.7 ohm
	// R1 = 31600: V(fb) = 0.7933 V, R(fb) = 7596.2 ohm
}

// A sensor bias divider solved at both ends of its top resistor's range,
// then at values between them without a new factorisation: the solution
// moves along a line as one conductance changes (the bilinear theorem), so
// two solutions give all the others. The divider law, 5·10k/(R1 + 10k),
// gives the same figures.
func ExampleSolver_SolveBetween() {
	net, err := solver.Compile(solver.Circuit{Parts: []solver.Part{
		{Name: "V1", Kind: solver.VoltageSource, From: "in", To: "gnd", Value: 5},
		{Name: "R1", Kind: solver.Resistor, From: "in", To: "bias", Value: 2.2e3},
		{Name: "R2", Kind: solver.Resistor, From: "bias", To: "gnd", Value: 10e3},
	}})
	if err != nil {
		fmt.Println(err)
		return
	}
	r1, _ := net.PartIndex("R1")
	bias, _ := net.NodeIndex("bias")
	s := net.NewSolver()
	ends := make([]solver.Endpoint, 2)
	for k, r := range []float64{2.2e3, 47e3} {
		s.SetValue(r1, r)
		if err := s.Solve(); err != nil {
			fmt.Println(err)
			return
		}
		ends[k] = solver.Endpoint{X: append([]float64(nil), s.X()...), R: r, Sign: s.DetSign()}
	}
	for _, r := range []float64{4.7e3, 10e3, 22e3} {
		s.SetValue(r1, r)
		if err := s.SolveBetween(r1, ends[0], ends[1]); err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("R1 %5.0f Ω: bias %.4f V, divider law %.4f V\n", r, s.Voltage(bias), 5*10e3/(r+10e3))
	}
	// Output:
	// R1  4700 Ω: bias 3.4014 V, divider law 3.4014 V
	// R1 10000 Ω: bias 2.5000 V, divider law 2.5000 V
	// R1 22000 Ω: bias 1.5625 V, divider law 1.5625 V
}

package units_test

import (
	"fmt"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
)

func ExampleParse() {
	for _, s := range []string{"4.7k", "4k7", "R47", "4.7 kΩ", "3300mV", "0.5%", "4.7x"} {
		q, err := units.Parse(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-8s %g %q\n", s, q.Value, q.Unit)
	}
	v, err := units.ParseAs("3.3A", units.Volt)
	fmt.Println(v, err)
	// Output:
	// 4.7k     4700 ""
	// 4k7      4700 ""
	// R47      0.47 ""
	// 4.7 kΩ   4700 "Ω"
	// 3300mV   3.3 "V"
	// 0.5%     0.005 "%"
	// units: cannot read value "4.7x": unknown suffix "x"
	// 0 units: cannot read value "3.3A": in A, want V
}

func ExampleFormat() {
	var out []string
	for _, v := range []float64{4700, 30100, 2.2e6, 0.8, 2e-8, 0.80033, 999.96, -9530} {
		out = append(out, units.Format(v))
	}
	fmt.Println(strings.Join(out, " "))
	fmt.Println(units.FormatUnit(4700, units.Ohm), "|", units.FormatUnit(20e-6, units.Amp),
		"|", units.FormatUnit(0.005, units.Percent))
	// Output:
	// 4.7k 30.1k 2.2M 800m 20n 800.3m 1k -9.53k
	// 4.7 kΩ | 20 µA | 0.5%
}

func ExampleCode() {
	var codes []string
	for _, v := range []float64{0.47, 4.7, 100, 1000, 4700, 4990, 10e3, 2.2e6} {
		c, _ := units.Code(v)
		codes = append(codes, c)
	}
	fmt.Println(strings.Join(codes, " "))
	_, err := units.Code(0)
	fmt.Println(err)
	// Output:
	// R47 4R7 100R 1K0 4K7 4K99 10K 2M2
	// units: no IEC 60062 code for 0: want a finite resistance above zero
}

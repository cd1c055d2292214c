package eseries_test

import (
	"fmt"
	"strings"

	"github.com/ohmfit/ohmfit/eseries"
)

func ExampleLookup() {
	e24, err := eseries.Lookup("e24")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(e24.Name, e24.PerDecade, e24.Tolerance)
	var names []string
	for _, v := range e24.Values(2e3, 5e3) {
		names = append(names, eseries.Format(v))
	}
	fmt.Println(strings.Join(names, " "))
	below, _ := e24.Below(4500)
	above, _ := e24.Above(4500)
	fmt.Println(below, above, e24.Contains(4700))

	_, err = eseries.Lookup("E7")
	fmt.Println(err)
	// Output:
	// E24 24 0.05
	// 2k 2.2k 2.4k 2.7k 3k 3.3k 3.6k 3.9k 4.3k 4.7k
	// 4300 4700 true
	// eseries: unknown series "E7" (known: E3, E6, E12, E24, E48, E96, E192)
}

func ExampleParse() {
	for _, s := range []string{"4.7k", "4k7", "R47", "4.7 kΩ", "3300mV", "0.5%", "4.7x"} {
		q, err := eseries.Parse(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-8s %g %q\n", s, q.Value, q.Unit)
	}
	v, err := eseries.ParseAs("3.3A", eseries.Volt)
	fmt.Println(v, err)
	// Output:
	// 4.7k     4700 ""
	// 4k7      4700 ""
	// R47      0.47 ""
	// 4.7 kΩ   4700 "Ω"
	// 3300mV   3.3 "V"
	// 0.5%     0.005 "%"
	// eseries: cannot read value "4.7x": unknown suffix "x"
	// 0 eseries: cannot read value "3.3A": in A, want V
}

func ExampleFormat() {
	var out []string
	for _, v := range []float64{4700, 30100, 2.2e6, 0.8, 2e-8, 0.80033, 999.96, -9530} {
		out = append(out, eseries.Format(v))
	}
	fmt.Println(strings.Join(out, " "))
	fmt.Println(eseries.FormatUnit(4700, eseries.Ohm), "|", eseries.FormatUnit(20e-6, eseries.Amp),
		"|", eseries.FormatUnit(0.005, eseries.Percent))
	// Output:
	// 4.7k 30.1k 2.2M 800m 20n 800.3m 1k -9.53k
	// 4.7 kΩ | 20 µA | 0.5%
}

func ExampleCode() {
	var codes []string
	for _, v := range []float64{0.47, 4.7, 100, 1000, 4700, 4990, 10e3, 2.2e6} {
		c, _ := eseries.Code(v)
		codes = append(codes, c)
	}
	fmt.Println(strings.Join(codes, " "))
	_, err := eseries.Code(0)
	fmt.Println(err)
	// Output:
	// R47 4R7 100R 1K0 4K7 4K99 10K 2M2
	// eseries: no IEC 60062 code for 0: want a finite resistance above zero
}

package eseries_test

import (
	"fmt"
	"strings"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
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
		names = append(names, units.Format(v))
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

package units

import "strings"

// examples are the ways a value in each unit may be written, for messages.
var examples = map[Unit][]string{
	Ohm:  {"4700", "4.7k", "4k7", "4.7kΩ"},
	Volt: {"3.3", "3.3V", "800m"},
	Amp:  {"100u", "100µA", "1m"},
	Watt: {"50m", "50mW", "0.25W"},
	// A bare number is the fraction, as for a tolerance.
	Percent: {"1%", "0.5%", "0.01"},
}

// nouns name what a value in each unit is.
var nouns = map[Unit]string{Ohm: "a resistance", Volt: "a voltage", Amp: "a current", Watt: "a power", Percent: "a percentage"}

// Example says how a value in unit u is written, for a message that asks
// for one: "a resistance like 4700, 4.7k, 4k7 or 4.7kΩ". A unit without
// examples of its own gets "a number like 4700, 4.7k or 4k7".
func Example(u Unit) string {
	ex, noun := examples[u], nouns[u]
	if ex == nil {
		ex, noun = []string{"4700", "4.7k", "4k7"}, "a number"
	}
	return noun + " like " + strings.Join(ex[:len(ex)-1], ", ") + " or " + ex[len(ex)-1]
}

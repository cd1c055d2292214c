package ratings

import (
	"fmt"
	"math"
	"strings"
)

// Package is one resistor package with what it is rated for.
type Package struct {
	Name  string  // "0603", "axial-1/4W"
	Watts float64 // rated power at or below the rated ambient (usually 70 °C)
	Volts float64 // maximum working voltage (the lower of this and √(P·R) applies)
	SMD   bool    // a chip resistor; false for through-hole
}

// Packages lists the packages from smallest to largest rating.
//
// Values: typical published ratings of general-purpose thick-film chip
// resistors and of carbon/metal-film through-hole resistors, from memory
// (common practice; check the datasheet of the series you buy — anti-surge,
// high-power and thin-film series differ).
var Packages = []Package{
	{"0201", 0.05, 25, true},
	{"0402", 0.0625, 50, true},
	{"0603", 0.1, 75, true},
	{"0805", 0.125, 150, true},
	{"1206", 0.25, 200, true},
	{"1210", 0.5, 200, true},
	{"2010", 0.75, 200, true},
	{"2512", 1, 200, true},
	{"axial-1/4W", 0.25, 250, false},
	{"axial-1/2W", 0.5, 350, false},
}

// Derating is the fraction of rated power a part may run at: half
// (common practice, no source; it leaves margin for ambient temperature,
// self-heating of neighbours and value drift).
const Derating = 0.5

// Near is the fraction of a voltage rating, or of the derated power, above
// which a part is reported as near its rating (common practice, no source).
const Near = 0.8

// ES1VoltsDC is the ES1 limit for DC voltage in IEC 62368-1 (electrical
// energy source class 1: 60 V DC). Above it a circuit is no longer ES1 and
// needs the safeguards of a higher class.
const ES1VoltsDC = 60.0

// Lookup returns the named package. Names are matched without regard to
// case, and "1/4W", "0.25W", "axial-0.25W" all name axial-1/4W.
func Lookup(name string) (Package, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	key = strings.TrimPrefix(key, "axial-")
	key = strings.TrimPrefix(key, "tht-")
	switch key {
	case "1/4w", "0.25w", "250mw":
		key = "axial-1/4w"
	case "1/2w", "0.5w", "500mw":
		key = "axial-1/2w"
	}
	for _, p := range Packages {
		if strings.ToLower(p.Name) == key {
			return p, nil
		}
	}
	return Package{}, errorf(nil, "unknown package %q; packages are %s", name, strings.Join(Names(), " "))
}

// Names lists the package names in table order.
func Names() []string {
	n := make([]string, len(Packages))
	for i, p := range Packages {
		n[i] = p.Name
	}
	return n
}

// Derated returns the power the package may carry under the derating rule.
func (p Package) Derated() float64 { return p.Watts * Derating }

// Fits reports whether a part dissipating watts with volts across it may use
// the package: at most the derated power and at most the working voltage.
func (p Package) Fits(watts, volts float64) bool {
	return math.Abs(watts) <= p.Derated() && math.Abs(volts) <= p.Volts
}

// Smallest returns the first package in table order (chips first, then
// through-hole) that fits the power and voltage, and false if none does.
// With smdOnly the through-hole parts are not considered.
func Smallest(watts, volts float64, smdOnly bool) (Package, bool) {
	for _, p := range Packages {
		if smdOnly && !p.SMD {
			continue
		}
		if p.Fits(watts, volts) {
			return p, true
		}
	}
	return Package{}, false
}

// Rank returns the package's position in the table, the order in which a
// "largest allowed package" limit is read; -1 for a package not in it.
func Rank(name string) int {
	for i, p := range Packages {
		if p.Name == name {
			return i
		}
	}
	return -1
}

// Load describes how hard a part works a package.
type Load struct {
	PowerFraction   float64 // watts / rated watts
	VoltageFraction float64 // volts / maximum working voltage
}

// LoadOf returns the fractions of the package's ratings a part uses.
func (p Package) LoadOf(watts, volts float64) Load {
	return Load{PowerFraction: math.Abs(watts) / p.Watts, VoltageFraction: math.Abs(volts) / p.Volts}
}

// Verdict classes how a part stands against its package's ratings. Its
// text is what the check table and JSON show.
type Verdict string

// The verdicts, from best to worst.
const (
	VerdictOK        Verdict = "ok"              // within Near of the derated power and of the voltage limit
	VerdictNear      Verdict = "near"            // above Near of the derated power or of the voltage limit
	VerdictDerating  Verdict = "derating"        // beyond the derated power but within the rating
	VerdictOverload  Verdict = "overload"        // beyond the rated power or the voltage limit
	VerdictNoPackage Verdict = "no package fits" // no package in the table carries the part
)

// Verdict classes a load: VerdictOK, VerdictNear, VerdictDerating or
// VerdictOverload.
func (l Load) Verdict() Verdict {
	switch {
	case l.PowerFraction > 1 || l.VoltageFraction > 1:
		return VerdictOverload
	case l.PowerFraction > Derating:
		return VerdictDerating
	case l.PowerFraction > Near*Derating || l.VoltageFraction > Near:
		return VerdictNear
	}
	return VerdictOK
}

// RatingCaution is the caution printed when a part runs near or beyond its
// package's ratings.
func RatingCaution(part, pkg string, l Load) string {
	return fmt.Sprintf("CAUTION: %s runs at %.0f%% of the rated power and %.0f%% of the working voltage of a %s; "+
		"ratings fall with ambient temperature above the rated ambient (often 70 °C; see the datasheet's "+
		"derating curve), and a part near its limit runs hot, drifts and can fail or char the board. Use a "+
		"larger package or spread the power, and follow the maker's data, local codes and licensed practice.",
		part, 100*l.PowerFraction, 100*l.VoltageFraction, pkg)
}

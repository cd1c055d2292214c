package ratings

import (
	"fmt"
	"math"
	"strconv"
)

// Hazardous reports whether a potential difference of volts (DC) is above
// ES1 of IEC 62368-1. ES1 is "not exceeding" 60 V DC, so 60 V itself is
// within ES1; a figure above the limit only by floating-point residue
// (1e-12 relative, the contract's tie tolerance) counts as on it. The sign
// is irrelevant: −61 V is as hazardous as +61 V.
func Hazardous(volts float64) bool {
	v := math.Abs(volts)
	return v > ES1VoltsDC && v-ES1VoltsDC > 1e-12*ES1VoltsDC
}

// Fit is the one rule for whether a resistor's package carries it: the
// package the template names (named, "" for none) when it fits the power
// and voltage by Package.Fits, else, with none named, the smallest in the
// table that does (Smallest, through-hole included). ok is false when the
// named package does not fit or, with none named, when no package in the
// table does; pkg is then the named package, or Largest.
func Fit(named string, watts, volts float64) (pkg Package, ok bool) {
	if named != "" {
		p, err := Lookup(named)
		if err == nil {
			return p, p.Fits(watts, volts)
		}
	}
	if p, ok := Smallest(watts, volts, false); ok {
		return p, true
	}
	return Largest(), false
}

// Largest is the package in the table that carries the most power at the
// derating rule, and of those the highest working voltage: the one an
// overload that fits nothing is measured against.
func Largest() Package {
	best := Packages[0]
	for _, p := range Packages[1:] {
		if p.Derated() > best.Derated() || (p.Derated() == best.Derated() && p.Volts > best.Volts) {
			best = p
		}
	}
	return best
}

// NodeAt is one node's potential to ground.
type NodeAt struct {
	Name  string
	Volts float64
}

// Span is the largest potential difference between two nodes that a Watch
// has seen: High.Volts − Low.Volts, never negative.
type Span struct {
	Volts     float64
	High, Low NodeAt
	Where     string // where it was seen, as Where words it
}

// Where words the place a figure was seen for a caution: `condition
// "nominal"`, or with corner `condition "nominal", at a worst-case
// tolerance corner`.
func Where(cond string, corner bool) string {
	if corner {
		return fmt.Sprintf("condition %q, at a worst-case tolerance corner", cond)
	}
	return fmt.Sprintf("condition %q", cond)
}

// resistorLoad is one resistor's worst load seen.
type resistorLoad struct {
	name, pkg    string
	watts, volts float64 // largest |watts| and |volts| seen
	wWhere       string  // where the largest watts were seen
	vWhere       string  // where the largest volts were seen
}

// Watch observes the solved conditions of one design and returns the
// cautions they call for, by one rule for every command: a hazardous
// voltage when the largest potential difference between any two nodes in
// any condition is above ES1 (Hazardous), and a package caution for each
// resistor that its package does not carry (Fit). The zero value is ready
// to use.
type Watch struct {
	span  Span
	seen  bool
	parts []resistorLoad
	index map[string]int
}

// Nodes observes the node potentials of one solved condition (names and
// volts in the same order); ground, named ground, is taken at 0 V whether
// or not it is listed. where says where they were seen (see Where).
func (w *Watch) Nodes(where string, names []string, volts []float64, ground string) {
	hi, lo := NodeAt{Name: ground}, NodeAt{Name: ground}
	for i, v := range volts {
		if v > hi.Volts {
			hi = NodeAt{names[i], v}
		}
		if v < lo.Volts {
			lo = NodeAt{names[i], v}
		}
	}
	if d := hi.Volts - lo.Volts; !w.seen || d > w.span.Volts {
		w.span = Span{Volts: d, High: hi, Low: lo, Where: where}
		w.seen = true
	}
}

// Resistor observes one physical resistor in one solved condition: the
// power it dissipates and the voltage across it. pkg is the package the
// template names for it, "" to let the table choose; where says where it
// was seen (see Where).
func (w *Watch) Resistor(where, name, pkg string, watts, volts float64) {
	if w.index == nil {
		w.index = map[string]int{}
	}
	k, ok := w.index[name]
	if !ok {
		k = len(w.parts)
		w.index[name] = k
		w.parts = append(w.parts, resistorLoad{name: name, pkg: pkg, wWhere: where, vWhere: where})
	}
	r := &w.parts[k]
	if a := math.Abs(watts); a > r.watts {
		r.watts, r.wWhere = a, where
	}
	if a := math.Abs(volts); a > r.volts {
		r.volts, r.vWhere = a, where
	}
}

// Span returns the largest potential difference seen so far.
func (w *Watch) Span() Span { return w.span }

// Cautions returns the cautions for everything observed: the hazardous
// voltage first, then one per resistor its package does not carry, in the
// order the resistors were first seen.
func (w *Watch) Cautions() []string {
	var out []string
	if Hazardous(w.span.Volts) {
		out = append(out, HazardCaution(w.span))
	}
	for _, r := range w.parts {
		if p, ok := Fit(r.pkg, r.watts, r.volts); !ok {
			out = append(out, PackageCaution(r.name, r.pkg != "", p, r.watts, r.wWhere, r.volts, r.vWhere))
		}
	}
	return out
}

// signedVolts writes a node potential with its sign: "+40 V", "-40 V", "0 V".
func signedVolts(v float64) string {
	if v == 0 {
		return "0 V"
	}
	return strconv.FormatFloat(v, 'g', 4, 64) + " V"
}

// HazardCaution is the caution for a potential difference above ES1. It
// names both nodes with their signed potentials, the difference and the
// condition, says plainly what the danger is, gives the usual precautions
// and defers to local codes and licensed practice; one paragraph.
func HazardCaution(s Span) string {
	hi := signedVolts(s.High.Volts)
	if s.High.Volts > 0 {
		hi = "+" + hi
	}
	return fmt.Sprintf("CAUTION: hazardous voltage: between node %s (%s) and node %s (%s) there are %.4g V, in %s, "+
		"above the %g V DC limit of ES1 in IEC 62368-1. Touching both can drive a dangerous current through the body. "+
		"Guard against contact, keep creepage and clearance distances for the working voltage on the board and in the wiring, "+
		"use parts rated for that voltage, and discharge before handling. ohmfit's figures are a first check, not a safety "+
		"assessment: follow the local electrical codes and the applicable standards, and have the design reviewed by a "+
		"qualified (where required, licensed) person.",
		s.High.Name, hi, s.Low.Name, signedVolts(s.Low.Volts), s.Volts, s.Where, ES1VoltsDC)
}

// PackageCaution is the caution for a resistor its package does not carry
// (Fit false): named says whether pkg is the template's package or the
// largest in the table; wWhere and vWhere say where the largest power and
// voltage were seen (see Where).
func PackageCaution(part string, named bool, pkg Package, watts float64, wWhere string, volts float64, vWhere string) string {
	what := fmt.Sprintf("no package in the table carries that within half its rated power and its working voltage (the largest, a %s, is good for %.4g W and %g V)",
		pkg.Name, pkg.Derated(), pkg.Volts)
	if named {
		what = fmt.Sprintf("its %s is good for %.4g W at half its rating and %g V", pkg.Name, pkg.Derated(), pkg.Volts)
	}
	load := fmt.Sprintf("dissipates up to %.4g W and has up to %.4g V across it, in %s", watts, volts, wWhere)
	if wWhere != vWhere {
		load = fmt.Sprintf("dissipates up to %.4g W (in %s) and has up to %.4g V across it (in %s)", watts, wWhere, volts, vWhere)
	}
	return fmt.Sprintf("CAUTION: %s %s; %s. An overloaded resistor runs hot, drifts and can fail open or char the board. "+
		"Use a power or high-voltage resistor rated for it with its derating curve, or spread the load over several parts, "+
		"each within its rating; follow the maker's data, local codes and licensed practice.",
		part, load, what)
}

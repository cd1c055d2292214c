package units

import (
	"errors"
	"strconv"
	"strings"
)

// Unit is the physical unit written after a value, if any.
type Unit int

// The units Parse recognises. NoUnit means a bare number (or an IEC 60062
// code, which carries no unit of its own: 4n7 is as likely a capacitance).
const (
	NoUnit  Unit = iota // a bare number
	Ohm                 // Ω, ohm, ohms
	Volt                // V
	Amp                 // A
	Watt                // W
	Percent             // %; the Quantity holds the fraction (1% -> 0.01)
)

// String returns the unit's symbol: "", "Ω", "V", "A", "W" or "%".
func (u Unit) String() string {
	switch u {
	case NoUnit:
		return ""
	case Ohm:
		return "Ω"
	case Volt:
		return "V"
	case Amp:
		return "A"
	case Watt:
		return "W"
	case Percent:
		return "%"
	}
	return "Unit(" + strconv.Itoa(int(u)) + ")"
}

// name is the unit as a message names it; NoUnit reads as "a plain number".
func (u Unit) name() string {
	if u == NoUnit {
		return "a plain number"
	}
	return u.String()
}

// Quantity is a value read by Parse together with the unit written after it.
// For Percent, Value is the fraction: "1%" gives 0.01.
type Quantity struct {
	Value float64
	Unit  Unit
}

// ErrSyntax is wrapped by every error Parse and ParseAs return.
var ErrSyntax = errors.New("units: cannot read value")

// ParseError reports text that Parse or ParseAs could not read, quoting it.
// It unwraps to ErrSyntax.
type ParseError struct {
	Text   string // the text as given
	Reason string // what is wrong with it, e.g. `unknown suffix "x"`
}

// Error returns e.g. `units: cannot read value "4.7x": unknown suffix "x"`.
func (e *ParseError) Error() string {
	return ErrSyntax.Error() + " " + Quote(e.Text) + ": " + e.Reason
}

// Message returns the error's text for a person, without the package's
// name: e.g. `cannot read value "4.7x": unknown suffix "x"`.
func (e *ParseError) Message() string {
	return "cannot read value " + Quote(e.Text) + ": " + e.Reason
}

// Unwrap returns ErrSyntax, so errors.Is(err, ErrSyntax) holds.
func (e *ParseError) Unwrap() error { return ErrSyntax }

// prefixes maps each accepted SI prefix to its power of ten. Both micro
// characters are accepted (U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU)
// because keyboards and fonts produce either; K is accepted as kilo because
// the trade writes 4K7 and 10K. Case matters otherwise: m is milli, M is mega.
var prefixes = map[string]int{
	"p": -12, "n": -9, "u": -6, "\u00b5": -6, "\u03bc": -6,
	"m": -3, "k": 3, "K": 3, "M": 6, "G": 9,
}

// unitSuffixes lists unit spellings, longest first so "ohms" wins over "ohm".
// "ohm" is matched without regard to case; the symbols exactly. R is not a
// unit: it only appears inside an IEC 60062 code (4R7, 100R).
var unitSuffixes = []struct {
	text string
	unit Unit
	fold bool
}{
	{"ohms", Ohm, true},
	{"ohm", Ohm, true},
	{"\u03a9", Ohm, false}, // GREEK CAPITAL LETTER OMEGA
	{"\u2126", Ohm, false}, // OHM SIGN
	{"V", Volt, false},
	{"A", Amp, false},
	{"W", Watt, false},
}

// Parse reads a value as an engineer writes it:
//
//   - a plain number: 4700, 4.7e3, -5, .5, 5.
//   - a number with an SI prefix: 4.7k, 100n, 2.2M, 3300m; p n u µ m k K M G
//     (µ as U+00B5 or U+03BC; m is milli, M is mega)
//   - either of those with a unit, with or without a space: 4.7kΩ, 4.7 kΩ,
//     4.7kohm, 3.3V, 50uA, 0.25 W (Ω as U+03A9 or U+2126; ohm/ohms in any case)
//   - an IEC 60062 code, the letter standing for the decimal point:
//     4k7, 4K7, R47, 4R7, 0R1, 100R, 1K0, 2M2, 6L8 (L: milli), and with any
//     prefix letter 4n7, 2u2 (unit NoUnit, or a unit written after it)
//   - a percentage: 1%, 0.5 % (Value is the fraction, 0.01 and 0.005)
//
// The number is read as a decimal and scaled by its prefix exactly, so
// "4.7k" is 4700 and "0.47" equals Code's and Values' 0.47 bit for bit.
// An exponent and a prefix together ("1e3k"), NaN, Inf, and values that
// overflow or underflow to zero are refused. Every failure is a *ParseError
// quoting the text; a value is never silently read as zero.
func Parse(text string) (Quantity, error) {
	q, reason := parse(text)
	if reason != "" {
		return Quantity{}, &ParseError{Text: text, Reason: reason}
	}
	return q, nil
}

// ParseAs reads text like Parse and returns its value in unit want. A bare
// number (or IEC 60062 code) is taken to be in want already; a different
// unit, or a percentage where want is not Percent, is an error naming both.
// ParseAs(t, NoUnit) accepts bare numbers and codes only; ParseAs(t, Percent)
// accepts "1%" (0.01) or a bare fraction ("0.01").
func ParseAs(text string, want Unit) (float64, error) {
	q, err := Parse(text)
	if err != nil {
		return 0, err
	}
	if q.Unit != NoUnit && q.Unit != want {
		reason := "in " + q.Unit.name() + ", want " + want.name()
		if q.Unit == Percent {
			reason = "a percentage, want " + want.name()
		}
		return 0, &ParseError{Text: text, Reason: reason}
	}
	return q.Value, nil
}

// parse does Parse's work; a non-empty reason means failure.
func parse(text string) (Quantity, string) {
	s := strings.TrimSpace(text)
	if s == "" {
		return Quantity{}, "empty"
	}
	neg := false
	if s[0] == '+' || s[0] == '-' {
		neg = s[0] == '-'
		s = s[1:]
	}
	if s == "" {
		return Quantity{}, "no number"
	}

	if strings.HasSuffix(s, "%") {
		body := strings.TrimSpace(strings.TrimSuffix(s, "%"))
		n, rest, reason := scanNumber(body)
		if reason != "" {
			return Quantity{}, reason
		}
		if rest != "" {
			return Quantity{}, "a percentage takes a plain number, not " + Quote(rest)
		}
		v, reason := n.value(-2, neg)
		return Quantity{Value: v, Unit: Percent}, reason
	}

	unit := NoUnit
	for _, u := range unitSuffixes {
		if len(s) < len(u.text) {
			continue
		}
		tail := s[len(s)-len(u.text):]
		if tail == u.text || (u.fold && strings.EqualFold(tail, u.text)) {
			unit = u.unit
			s = strings.TrimRight(s[:len(s)-len(u.text)], " \t")
			break
		}
	}
	if s == "" {
		return Quantity{}, "no number before the unit"
	}

	v, reason := parseMagnitude(s, neg)
	return Quantity{Value: v, Unit: unit}, reason
}

// parseMagnitude reads a number with optional prefix, or an IEC 60062 code.
func parseMagnitude(s string, neg bool) (float64, string) {
	n, rest, reason := scanNumber(s)
	if reason == "" && rest == "" {
		return n.value(0, neg)
	}

	// An IEC 60062 code: digits, one letter in place of the decimal point,
	// digits. It has no sign of its own beyond the one already taken, no
	// point, no exponent and no space.
	if v, ok, reason := parseCode(s, neg); ok {
		return v, reason
	}
	if reason != "" {
		return 0, reason
	}

	suffix := strings.TrimLeft(rest, " \t")
	if p, ok := prefixes[suffix]; ok {
		if n.hasExp {
			return 0, "an exponent and a prefix together"
		}
		return n.value(p, neg)
	}
	if suffix == "" {
		return 0, "space at the end"
	}
	switch suffix[0] {
	case '.', 'e', 'E', '+', '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return 0, "malformed number"
	}
	return 0, "unknown suffix " + Quote(suffix)
}

// parseCode reads an IEC 60062 code such as 4k7, R47 or 100R. ok reports
// whether s has a code's shape at all; reason is set when it does but
// cannot be read (an out-of-range value).
func parseCode(s string, neg bool) (v float64, ok bool, reason string) {
	i := 0
	for i < len(s) && isDigit(s[i]) {
		i++
	}
	intPart := s[:i]
	rest := s[i:]
	var letter string
	var exp int
	switch {
	case strings.HasPrefix(rest, "R"):
		letter, exp = "R", 0
	case strings.HasPrefix(rest, "L"):
		letter, exp = "L", -3 // IEC 60062:2016 milliohm letter: 6L8 = 6.8 mΩ
	default:
		for p, e := range prefixes {
			if strings.HasPrefix(rest, p) {
				letter, exp = p, e
				break
			}
		}
	}
	if letter == "" {
		return 0, false, ""
	}
	frac := rest[len(letter):]
	for j := 0; j < len(frac); j++ {
		if !isDigit(frac[j]) {
			return 0, false, ""
		}
	}
	// "4k" is a prefixed number, not a code; "R" alone is nothing. "100R"
	// and "68L" are codes: R and L have no prefix reading.
	if frac == "" && ((letter != "R" && letter != "L") || intPart == "") {
		return 0, false, ""
	}
	n := number{digits: intPart + frac, point: len(intPart)}
	v, reason = n.value(exp, neg)
	return v, true, reason
}

// number is a scanned decimal: digits with the point after point of them,
// times ten to exp.
type number struct {
	digits string
	point  int
	exp    int
	hasExp bool
}

// scanNumber reads [digits][.digits][(e|E)[+|-]digits] from the start of s
// and returns the rest. A plain grammar of our own, not strconv's, so that
// NaN, Inf, hex floats and underscores are refused.
func scanNumber(s string) (number, string, string) {
	var n number
	i := 0
	for i < len(s) && isDigit(s[i]) {
		i++
	}
	intPart := s[:i]
	frac := ""
	if i < len(s) && s[i] == '.' {
		j := i + 1
		for j < len(s) && isDigit(s[j]) {
			j++
		}
		frac = s[i+1 : j]
		i = j
	}
	if intPart == "" && frac == "" {
		return n, s, "no number"
	}
	n.digits = intPart + frac
	n.point = len(intPart)
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && isDigit(s[k]) {
			k++
		}
		if k == j {
			return n, s[i:], "exponent without digits"
		}
		e, err := strconv.Atoi(s[i+1 : k])
		if err != nil || e > 1e6 || e < -1e6 {
			return n, s[i:], "exponent out of range"
		}
		n.exp = e
		n.hasExp = true
		i = k
	}
	return n, s[i:], ""
}

// value converts n times 10^shift to the nearest float64 through one
// correctly rounded decimal conversion, so prefixes introduce no error.
func (n number) value(shift int, neg bool) (float64, string) {
	lit := "0." + n.digits + "e" + strconv.Itoa(n.exp+shift+n.point)
	v, err := strconv.ParseFloat(lit, 64)
	if err != nil {
		return 0, "out of range"
	}
	if v == 0 && strings.Trim(n.digits, "0") != "" {
		return 0, "out of range (too small)"
	}
	if neg {
		v = -v
	}
	return v, ""
}

func isDigit(c byte) bool { return '0' <= c && c <= '9' }

package units

import (
	"math"
	"strconv"
	"strings"
)

// Format writes v in short engineering form with up to 4 significant digits,
// trailing zeros trimmed: 4700 -> "4.7k", 30100 -> "30.1k", 2.2e6 -> "2.2M",
// 0.8 -> "800m", 2e-8 -> "20n", 999.96 -> "1k", 0 -> "0". It is FormatSig(v, 4).
//
// The output is pure ASCII (micro is "u") so it is safe in CSV, JSON and
// terminals of any encoding, and Parse reads it back. FormatUnit is the form
// for people and writes "µ".
func Format(v float64) string { return FormatSig(v, 4) }

// FormatSig is Format with sig significant digits; sig is clamped to 1..17
// (17 digits always suffice to tell two float64 apart). Prefixes run from p
// to G: values a little beyond keep the end prefix ("0.001p", "1000G"), and
// values further out are written with an exponent ("1.5e15", "2e-18"), so
// that no figure grows into a long row of zeros.
// NaN and infinities are written "NaN", "Inf" and "-Inf", which Parse refuses.
func FormatSig(v float64, sig int) string {
	mant, prefix := engParts(v, sig)
	return mant + prefix
}

// FormatUnit writes v for people with its unit: "4.7 kΩ", "800 mV",
// "20 µA", "100 Ω". Micro is "µ" (U+00B5 MICRO SIGN), which Parse accepts.
// Percent is written as a percentage of the fraction v without a space
// ("0.5%" for 0.005), as tolerances are usually written; NoUnit gives Format(v).
func FormatUnit(v float64, u Unit) string { return formatUnit(v, u, 4) }

// FormatUnitSig is FormatUnit with sig significant digits: "595.99 mV"
// at five rather than "596 mV". Infinities are "∞" and "-∞" (an open bound
// in a message); NoUnit gives FormatSig(v, sig).
func FormatUnitSig(v float64, u Unit, sig int) string {
	switch {
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return "-∞"
	}
	return formatUnit(v, u, sig)
}

// formatUnit is FormatUnit with sig significant digits, infinities
// written as FormatSig writes them.
func formatUnit(v float64, u Unit, sig int) string {
	switch u {
	case NoUnit:
		return FormatSig(v, sig)
	case Percent:
		return strconv.FormatFloat(v*100, 'g', sig, 64) + "%"
	}
	mant, prefix := engParts(v, sig)
	if prefix == "u" {
		prefix = "\u00b5"
	}
	return mant + " " + prefix + u.String()
}

// engPrefix holds the prefix for each engineering exponent from -12 to 9.
var engPrefix = map[int]string{-12: "p", -9: "n", -6: "u", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}

// engParts splits v into its digits and SI prefix, rounding to sig
// significant digits before choosing the prefix so that 999.96 becomes "1k"
// rather than "1000".
func engParts(v float64, sig int) (string, string) {
	switch {
	case math.IsNaN(v):
		return "NaN", ""
	case math.IsInf(v, 1):
		return "Inf", ""
	case math.IsInf(v, -1):
		return "-Inf", ""
	case v == 0:
		return "0", ""
	}
	sig = min(max(sig, 1), 17)
	sign := ""
	if v < 0 {
		sign, v = "-", -v
	}
	digits, exp := sigDigits(v, sig)
	e3 := floorDiv(exp, 3) * 3
	e3 = min(max(e3, -12), 9)
	if pos := exp - e3 + 1; pos > maxWhole || pos < -maxLeadingZeros {
		return sign + placePoint(digits, 1) + "e" + strconv.Itoa(exp), ""
	}
	return sign + placePoint(digits, exp-e3+1), engPrefix[e3]
}

// Beyond the end prefixes, at most maxWhole digits stand before the point
// ("1000G") and maxLeadingZeros zeros after it ("0.001p"); further out the
// exponent form is shorter and easier to read.
const (
	maxWhole        = 4
	maxLeadingZeros = 2
)

// sigDigits rounds v > 0 to sig significant digits and returns them with
// the decimal exponent of the first: 4700, 4 -> "4700", 3.
func sigDigits(v float64, sig int) (string, int) {
	s := strconv.FormatFloat(v, 'e', sig-1, 64) // d.ddde±XX
	i := strings.IndexByte(s, 'e')
	exp, _ := strconv.Atoi(s[i+1:]) // FormatFloat always writes a valid exponent
	return strings.Replace(s[:i], ".", "", 1), exp
}

// placePoint puts the decimal point after pos digits (padding with zeros
// either side as needed) and trims trailing zeros after the point.
func placePoint(digits string, pos int) string {
	var s string
	switch {
	case pos <= 0:
		s = "0." + strings.Repeat("0", -pos) + digits
	case pos >= len(digits):
		return digits + strings.Repeat("0", pos-len(digits))
	default:
		s = digits[:pos] + "." + digits[pos:]
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

func floorDiv(a, b int) int {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

// codeLetter holds the IEC 60062 multiplier letter for each engineering
// exponent a resistance code uses.
var codeLetter = map[int]string{0: "R", 3: "K", 6: "M", 9: "G"}

// Code writes the IEC 60062 letter-and-digit code for a resistance in ohms:
// the multiplier letter (R, K, M, G) stands where the decimal point would be.
// 4700 -> "4K7", 0.47 -> "R47", 2.2e6 -> "2M2", 100 -> "100R", 10000 -> "10K",
// 4990 -> "4K99", 1.02e6 -> "1M02". A code never ends on the letter after a
// single digit, so 1 -> "1R0" and 1000 -> "1K0"; below one ohm at least two
// digits follow the R (0.1 -> "R10").
//
// Like Format it rounds to 4 significant digits; values of 1000 GΩ and more
// keep the G ("1000G"). Zero, negative, NaN and infinite values have no code
// and give an error.
func Code(v float64) (string, error) {
	if !(v > 0) || math.IsInf(v, 1) {
		return "", errorf(nil, "no IEC 60062 code for %s: want a finite resistance above zero",
			strconv.FormatFloat(v, 'g', -1, 64))
	}
	digits, exp := sigDigits(v, 4)
	if exp < 0 {
		// Below one ohm: R, the leading zeros after the point, the digits.
		frac := strings.Repeat("0", -exp-1) + strings.TrimRight(digits, "0")
		if len(frac) < 2 {
			frac += "0"
		}
		return "R" + frac, nil
	}
	e3 := min(floorDiv(exp, 3)*3, 9)
	pos := exp - e3 + 1
	if pos > len(digits) {
		digits += strings.Repeat("0", pos-len(digits))
	}
	whole, frac := digits[:pos], strings.TrimRight(digits[pos:], "0")
	if len(whole) == 1 && frac == "" {
		frac = "0"
	}
	return whole + codeLetter[e3] + frac, nil
}

// Package ratings holds what a resistor's package can take: a table of the
// usual chip sizes (0201 … 2512) and through-hole ¼ W and ½ W parts with
// their rated power and maximum working voltage, the derating rule ohmfit
// applies (run a part at no more than half its rated power), the choice of
// the smallest package that carries a part, and the safety thresholds behind
// ohmfit's cautions (the 60 V DC ES1 limit of IEC 62368-1).
//
// The figures are typical published values for general-purpose thick-film
// chip resistors and carbon/metal-film through-hole parts, recalled from
// memory; real parts vary by maker and series, and the datasheet of the part
// actually bought governs. The package is a first check, not a substitute
// for a datasheet, a derating curve over ambient temperature, or a safety
// assessment.
//
// It is not for analysing a network (package solver) or for deciding which
// values to use (package synth); it imports nothing of ohmfit's.
package ratings

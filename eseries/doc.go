// Package eseries holds the IEC 60063 preferred-number series (E3 … E192),
// expands them over decades, finds the nearest standard values, and reads and
// writes component values: plain numbers, SI prefixes, units, percentages and
// the IEC 60062 letter-and-digit code (4k7, R47, 2M2).
//
// It is not for choosing values against goals (that is package synth) and it
// imports nothing else of ohmfit.
package eseries

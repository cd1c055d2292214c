// Package eseries holds the IEC 60063 preferred-number series (E3 … E192),
// expands them over decades and finds the nearest standard values.
//
// Reading and writing values (SI prefixes, units, percentages, IEC 60062
// codes) is package eseries/units. Neither chooses values against goals
// (that is package synth), and neither imports anything else of ohmfit.
package eseries

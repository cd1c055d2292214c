// Package sensors models resistive temperature sensors: NTC thermistors by
// the Beta equation or the Steinhart–Hart equation, and platinum RTDs by the
// Callendar–Van Dusen equation with the IEC 60751 coefficients.
//
// Each model turns a temperature in °C into a resistance in ohms, so that a
// template's sensor part becomes an ordinary resistor with one value per
// condition. The package is not for choosing values or solving networks, and
// imports nothing else of ohmfit.
package sensors

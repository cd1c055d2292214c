// Package examples holds the sample templates that ship inside the ohmfit
// binary, so `ohmfit` can print a working starting point without any files.
// Each is an invented scenario that exercises a different part of the
// template format.
package examples

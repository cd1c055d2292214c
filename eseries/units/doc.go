// Package units reads and writes component values as engineers write them:
// plain numbers, SI prefixes, units (Ω, V, A, W), percentages and the
// IEC 60062 letter-and-digit code (4k7, R47, 2M2). It also clips and quotes
// text a person gave, so that every message quotes it the same way.
//
// Format writes ASCII for files; FormatUnit writes for people. Parse reads
// back whatever either writes. The package imports nothing of ohmfit.
package units

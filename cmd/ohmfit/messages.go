package main

import (
	"fmt"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"
)

// The labels of the lines ohmfit writes on stderr. Every line starts with
// one (the progress bar on a terminal aside), so that a script can tell a
// failure from a remark; the README and `ohmfit help` list them.
const (
	errorLabel   = "ohmfit: error: "   // bad usage or bad input; exit 2
	notMetLabel  = "ohmfit: not met: " // the run worked but the hard limits are not met; exit 1
	cautionLabel = "ohmfit: CAUTION: " // a hazard or a rating to act on
	warningLabel = "ohmfit: warning: " // the input is probably not what was meant (a limit that cannot bind)
	noteLabel    = "ohmfit: note: "    // how the run went: a time limit, a heuristic, what was checked
)

// stderrLine writes one labelled line: the text folded onto one line and
// made safe for a terminal.
func stderrLine(w io.Writer, label, text string) {
	fmt.Fprintln(w, label+safeText(oneLine(text)))
}

// notef writes a note line on stderr.
func notef(w io.Writer, format string, args ...any) {
	stderrLine(w, noteLabel, fmt.Sprintf(format, args...))
}

// warnf writes a warning line on stderr.
func warnf(w io.Writer, format string, args ...any) {
	stderrLine(w, warningLabel, fmt.Sprintf(format, args...))
}

// cautionLine writes a caution on stderr. The library's caution texts start
// with "CAUTION: " themselves, for the tables; the label says it once.
func cautionLine(w io.Writer, text string) {
	stderrLine(w, cautionLabel, strings.TrimPrefix(text, "CAUTION: "))
}

// safeText escapes what a terminal would act on rather than show: control
// characters (an escape sequence in a file name would otherwise recolour
// or rewrite the screen), the bidirectional overrides that reorder text,
// and bytes that are not UTF-8. Everything else, µ and Ω included, is kept.
// Every message ohmfit prints on stderr passes through it, so a file name
// or a name from a template is quoted safely wherever it appears.
func safeText(s string) string {
	clean := true
	for _, r := range s {
		if unsafeRune(r) {
			clean = false
			break
		}
	}
	if clean && utf8.ValidString(s) {
		return s
	}
	var b strings.Builder
	for i := 0; i < len(s); {
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size <= 1:
			fmt.Fprintf(&b, `\x%02x`, s[i])
		case unsafeRune(r) && r < 0x100:
			fmt.Fprintf(&b, `\x%02x`, r)
		case unsafeRune(r):
			fmt.Fprintf(&b, `\u%04x`, r)
		default:
			b.WriteRune(r)
		}
		i += size
	}
	return b.String()
}

// unsafeRune reports whether r is a control character (C0, DEL, C1) or a
// bidirectional embedding, override or isolate.
func unsafeRune(r rune) bool {
	return unicode.IsControl(r) || (r >= 0x202a && r <= 0x202e) || (r >= 0x2066 && r <= 0x2069) || r == 0x200e || r == 0x200f
}

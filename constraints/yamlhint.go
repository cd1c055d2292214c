package constraints

import (
	"strings"
	"unicode/utf8"
)

// yamlHint finds, in the source of a file the YAML parser refused, the
// character that most likely caused it, and says how to fix it. The
// parser reports a line only (and for an unclosed bracket or quote, often
// a later one), so the source is scanned from the top for the mistakes
// people make: a tab or a no-break space in the indentation, a full-width
// colon or comma, an unclosed { [ or ", and a backslash escape YAML does
// not know. line and col are 1-based (col in characters); ok is false when
// nothing in the source explains msg.
//
// Only lines up to one past the reported line (near, 0 when unknown) are
// scanned for the first kinds: the parser stops at or after the cause, and
// a harmless tab further down must not take the blame.
func yamlHint(src []byte, msg string, near int) (line, col int, text string, ok bool) {
	lines := strings.Split(string(src), "\n")
	for i, l := range lines {
		if near > 0 && i > near {
			break
		}
		l = strings.TrimSuffix(l, "\r")
		if t := strings.TrimLeft(l, " \t\u00a0\u3000"); t == "" || t[0] == '#' {
			continue // blank lines and comments hold no structure
		}
		// Indentation: the leading run of blanks, of any kind.
		for j, r := range l {
			if r == ' ' {
				continue
			}
			switch r {
			case '\t':
				return i + 1, utf8.RuneCountInString(l[:j]) + 1, "a tab in the indentation; indent with spaces, not tabs", true
			case '\u00a0', '\u3000', '\u2007', '\u202f', '\u2002', '\u2003':
				return i + 1, utf8.RuneCountInString(l[:j]) + 1, "a no-break or wide space (U+" + hex4(r) + ") in the indentation; indent with plain spaces", true
			}
			break
		}
		// Characters outside quotes and comments.
		if c, r, found := scanUnquoted(l, func(r rune) bool { return r == '：' || r == '，' }); found {
			ascii := ":"
			if r == '，' {
				ascii = ","
			}
			return i + 1, c, "a full-width " + map[rune]string{'：': "colon", '，': "comma"}[r] + " (" + string(r) + "); write the ASCII " + ascii + " (with a space after it)", true
		}
		if c, what, found := quoteProblem(l); found {
			return i + 1, c, what, true
		}
	}
	if strings.Contains(msg, "did not find expected ',' or '}'") || strings.Contains(msg, "did not find expected ',' or ']'") ||
		strings.Contains(msg, "did not find expected node content") || strings.Contains(msg, "unexpected end of stream") {
		// An opening bracket not closed on its line: templates keep each
		// flow mapping or list on one line, so this is the first suspect.
		for i, l := range lines {
			if c, open, found := unclosedBracket(strings.TrimSuffix(l, "\r")); found {
				closer := map[rune]string{'{': "}", '[': "]"}[open]
				return i + 1, c, "this " + string(open) + " is not closed on its line; close it with " + closer + " (or, to go on over several lines, indent the continuation further)", true
			}
		}
	}
	return 0, 0, "", false
}

// scanUnquoted returns the 1-based column of the first rune of l, outside
// quoted strings and comments, for which bad reports true.
func scanUnquoted(l string, bad func(rune) bool) (int, rune, bool) {
	var quote rune
	col := 0
	prev := ' '
	for _, r := range l {
		col++
		switch {
		case quote == '"' && r == '\\':
			// The next rune is escaped; quoteProblem judges escapes.
		case quote != 0 && r == quote && !(quote == '"' && prev == '\\'):
			quote = 0
		case quote != 0:
		case (r == '"' || r == '\'') && (prev == ' ' || prev == '{' || prev == '[' || prev == ',' || prev == ':' || col == 1):
			quote = r
		case r == '#' && (prev == ' ' || col == 1):
			return 0, 0, false
		case bad(r):
			return col, r, true
		}
		if prev == '\\' && r == '\\' {
			prev = ' ' // an escaped backslash escapes nothing after it
		} else {
			prev = r
		}
	}
	return 0, 0, false
}

// quoteProblem reports a quoted string in l that is not closed on the line,
// or a double-quoted one holding an escape YAML does not know.
func quoteProblem(l string) (int, string, bool) {
	var quote rune
	start, col := 0, 0
	prev := ' '
	rs := []rune(l)
	for k := 0; k < len(rs); k++ {
		r := rs[k]
		col = k + 1
		switch {
		case quote == '"' && r == '\\':
			if k+1 >= len(rs) {
				break // a line break may be escaped
			}
			if !strings.ContainsRune(`0abtnvfre "/\N_LPxuU`+"\t", rs[k+1]) {
				return col, `\` + string(rs[k+1]) + ` is not an escape YAML knows; in double quotes write \\ for a backslash, or use single quotes`, true
			}
			k++
			col = k + 1
		case quote == '\'' && r == '\'' && k+1 < len(rs) && rs[k+1] == '\'':
			k++ // '' is a quote inside single quotes
		case quote != 0 && r == quote:
			quote = 0
		case quote != 0:
		case (r == '"' || r == '\'') && (prev == ' ' || prev == '{' || prev == '[' || prev == ',' || prev == ':' || k == 0):
			quote, start = r, col
		case r == '#' && (prev == ' ' || k == 0):
			return 0, "", false
		}
		prev = r
	}
	if quote != 0 {
		return start, "this " + string(quote) + " is not closed on its line; end the string with " + string(quote) + " before the line ends", true
	}
	return 0, "", false
}

// unclosedBracket returns the column of the first { or [ of l, outside
// quotes and comments, that the line does not close.
func unclosedBracket(l string) (int, rune, bool) {
	var stack []int
	var opens []rune
	var quote rune
	prev := ' '
	col := 0
	for _, r := range l {
		col++
		switch {
		case quote != 0 && r == quote:
			quote = 0
		case quote != 0:
		case r == '"' || r == '\'':
			quote = r
		case r == '#' && (prev == ' ' || col == 1):
			goto done
		case r == '{' || r == '[':
			stack, opens = append(stack, col), append(opens, r)
		case (r == '}' || r == ']') && len(stack) > 0:
			top := len(stack) - 1
			if (r == '}') != (opens[top] == '{') {
				return stack[top], opens[top], true // [1, 2} closes the wrong one
			}
			stack, opens = stack[:top], opens[:top]
		}
		prev = r
	}
done:
	if len(stack) > 0 {
		return stack[0], opens[0], true
	}
	return 0, 0, false
}

func hex4(r rune) string {
	const digits = "0123456789ABCDEF"
	return string([]byte{digits[r>>12&15], digits[r>>8&15], digits[r>>4&15], digits[r&15]})
}

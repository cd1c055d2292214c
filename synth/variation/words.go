package variation

// Plural picks the form of a noun (with whatever follows it) for a count:
// one for exactly 1, many for any other count, 0 too ("0 samples"). It is
// the one place the check's and the commands' messages choose between the
// two, so that no message says "1 samples".
func Plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

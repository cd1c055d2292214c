package main

import "github.com/ohmfit/ohmfit/constraints"

// didYouMean returns ` (did you mean "x"?)` for the candidate closest to
// word, or "" when none is close enough to be a plausible typo; it uses the
// template loader's rule so that the command line and templates suggest
// alike.
func didYouMean(word string, candidates []string) string {
	return constraints.Suggest(word, candidates)
}

package main

// The words a user reads, one per idea, in tables, CSV, JSON values and
// help alike (the glossary in constraints/README.md). Output of every
// command takes them from here, so that a new command speaks the same
// language.
const (
	// wordPass and wordFail are the one pair for "meets its limits" and
	// "does not", in check's tables, fit --check and fit --robust.
	wordPass = "pass"
	wordFail = "fail"
	// wordNoLimit stands in a pass/fail column for a quantity without limits.
	wordNoLimit = "-"
	// wordFront names the set of answers that nothing beats on error,
	// power and count at once (fit --tradeoffs and its heading).
	wordFront = "trade-off front"
	// wordPowerFront labels the plot's staircase: the answers nothing beats
	// on error and power alone. It is only part of the trade-off front
	// (which also keeps answers with fewer parts), so it has its own name.
	wordPowerFront = "lowest error for its power"
	// wordCount heads the column of physical resistors an answer uses
	// (JSON part_count; the rank key "parts").
	wordCount = "count"
	// wordGoal and wordLimit tell a target with equals (a goal, ranked by
	// its error) from one with only min/max (a limit, pass or fail).
	wordGoal  = "goal"
	wordLimit = "limit"
)

// targetKind is wordGoal or wordLimit for a target.
func targetKind(hasEquals bool) string {
	if hasEquals {
		return wordGoal
	}
	return wordLimit
}

// verdictWord is wordPass or wordFail.
func verdictWord(ok bool) string {
	if ok {
		return wordPass
	}
	return wordFail
}

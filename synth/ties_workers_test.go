package synth_test

import (
	"context"
	"os"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// TestExactTiesSameForWorkers: the gain-10 difference stage of the scale
// cases has dozens of designs with the same error in exact arithmetic
// (R2/R1 = R4/R3 = 10 in any decades; the error left is VB = 1.05's own
// rounding), whose plainly computed errors spread over 1e-16 … 3e-15, past
// the contract's 1e-15 absolute tie, because the output is the difference
// of larger terms. Refined solves (the conductances' rounding added back)
// must give them one error, so they rank by power, and the list must be
// the same for 1, 2 and 8 workers: "the same input always gives the same
// list" (shared/contract.md).
func TestExactTiesSameForWorkers(t *testing.T) {
	text, err := os.ReadFile("testdata/scale/diff4-e96.yaml")
	if err != nil {
		t.Fatal(err)
	}
	p := problemFromYAML(t, string(text), "")
	sameForWorkers(t, p, synth.BranchBound{})
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 20, Workers: 1}, synth.BranchBound{})
	if err != nil {
		t.Fatal(err)
	}
	for i, s := range res.Solutions {
		v := s.Values()
		// Every answer listed is an exact ratio pair (closed form of the
		// difference stage: Vo = Vref + (R2/R1)(VB − VA) when R4/R3 = R2/R1).
		if v[1] != 10*v[0] || v[3] != 10*v[2] {
			t.Fatalf("rank %d: %v is not an exact gain-10 pair", i+1, v)
		}
		if first := res.Solutions[0].Score.Error; s.Score.Error != first {
			t.Errorf("rank %d: error %.17g, rank 1 %.17g: exact ties must come out equal", i+1, s.Score.Error, first)
		}
		if i > 0 && s.Score.Power < res.Solutions[i-1].Score.Power {
			t.Errorf("rank %d: power %.17g below rank %d's: ties go to power", i+1, s.Score.Power, i)
		}
	}
}

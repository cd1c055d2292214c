package synth_test

import (
	"context"
	"os"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/synth"
)

func TestZZDebug(t *testing.T) {
	for _, f := range []string{"loaded3-e96", "ladder4-e96", "diff4-e96", "taps5-e24", "ladder6-e96"} {
		text, _ := os.ReadFile("testdata/scale/" + f + ".yaml")
		p := problemFromYAML(t, string(text), "")
		t0 := time.Now()
		res, err := synth.Search(context.Background(), p, &synth.Settings{Workers: 2, TimeLimit: 30 * time.Second}, synth.BranchBound{})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s space %g: %v rows %d eval %d solves %d status %v best %g bound %g %v", f, p.Space(), time.Since(t0), res.Stats.Rows, res.Stats.Evaluated, res.Stats.Solves, res.Status, res.Solutions[0].Score.Error, res.Bound, res.Solutions[0].Values())
	}
}

package synth_test

import (
	"context"
	"fmt"
	"os"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

func TestZZDump(t *testing.T) {
	if os.Getenv("ZZDUMP") == "" {
		t.Skip()
	}
	for _, c := range scaleCases {
		if c.file == "ladder6-e96" && os.Getenv("ZZ6") == "" {
			continue
		}
		p := scaleProblem(t, c, "")
		for _, w := range []int{1, 2} {
			res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 10, Workers: w}, synth.BranchBound{})
			if err != nil {
				t.Fatal(err)
			}
			fmt.Printf("%s w%d %v %d %v\n", c.file, w, res.Status, len(res.Solutions), res.Stats.Elapsed)
			for _, s := range res.Solutions {
				fmt.Printf("  %v %.17g %.17g %d\n", s.Values(), s.Score.Error, s.Score.Power, s.Parts)
			}
		}
	}
}

package synth_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// An eight-tap E96 ladder: 289^8 = 4.87e19 candidates (289 = E96 over
// three decades, 1k to 1M, both ends in: IEC 60063), past int64's 9.2e18.
// Branch and bound proves it, and its counts of candidates stay right past
// int64: the progress total is the space, and every candidate is counted
// done exactly once when the search is proven.
func TestBeyondInt64Space(t *testing.T) {
	if testing.Short() {
		t.Skip("several seconds")
	}
	text, err := os.ReadFile("testdata/ladder8-e96.yaml")
	if err != nil {
		t.Fatal(err)
	}
	p := problemFromYAML(t, string(text), "")
	if want := math.Pow(289, 8); p.Space() != want {
		t.Fatalf("space %g, want 289^8 = %g", p.Space(), want)
	}
	pr := &synth.Progress{}
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 3, Progress: pr}, synth.BranchBound{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != synth.Proven || len(res.Solutions) != 3 {
		t.Fatalf("status %v, %d answers", res.Status, len(res.Solutions))
	}
	done, total := pr.Counts()
	if total != p.Space() || math.Abs(done-total) > 1e-12*total {
		t.Errorf("progress %g of %g, want all of %g", done, total, p.Space())
	}
	// The ladder's closed form (voltage divider: V(tk) = 3.3·(R(k+1)+…+R8)/ΣR)
	// gives rank 1's error, independent of the solver.
	v := res.Solutions[0].Values()
	sum := 0.0
	for _, r := range v {
		sum += r
	}
	worst, below := 0.0, sum
	for k, want := range []float64{2.9, 2.5, 2.1, 1.7, 1.3, 0.9, 0.5} {
		below -= v[k]
		worst = math.Max(worst, math.Abs(3.3*below/sum-want)/want)
	}
	if math.Abs(worst-res.Solutions[0].Score.Error) > 1e-12 {
		t.Errorf("rank 1 %v: error %g, closed form %g", v, res.Solutions[0].Score.Error, worst)
	}
}

// The rows method refuses a space whose rows pass int64, rather than let
// the row count wrap: ten E96 positions of 121 values (1k to 17.8k: 96 per
// decade plus the 25 from 10k to 17.8k, IEC 60063's E96 table) have
// 121^9 = 5.6e18 rows, past int64/2, in a space of 6.7e20 that any
// method accepts (under MaxSpace).
func TestRowsRefuseRowsPastInt64(t *testing.T) {
	var b strings.Builder
	fmt.Fprintf(&b, "ohmfit: 1\nname: ten-part ladder\nparts:\n  - {name: V1, type: voltage-source, plus: t0, minus: gnd, volts: 5}\n")
	for i := 1; i <= 10; i++ {
		to := fmt.Sprintf("t%d", i)
		if i == 10 {
			to = "gnd"
		}
		fmt.Fprintf(&b, "  - {name: R%d, type: resistor, from: t%d, to: %s}\n", i, i-1, to)
	}
	fmt.Fprintf(&b, "targets:\n  - {voltage: t4, equals: 2.5}\nchoose: {series: E96, min: 1k, max: 17.8k}\n")
	p := problemFromYAML(t, b.String(), "")
	if want := math.Pow(121, 10); p.Space() != want || p.Space() > synth.MaxSpace {
		t.Fatalf("space %g, want 121^10 = %g, within MaxSpace", p.Space(), want)
	}
	_, err := synth.Search(context.Background(), p, &synth.Settings{Top: 1, MaxRows: 1e30}, synth.Rows{})
	if !errors.Is(err, synth.ErrTooManyRows) {
		t.Fatalf("error %v, want ErrTooManyRows", err)
	}
}

package synth_test

import (
	"context"
	"runtime"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// A top list far longer than the space costs only what is found: asking
// for 10^11 answers of a 2-position space must return the whole space
// (each candidate once) without reserving room for what was asked, with
// either method and any worker count.
func TestHugeTopAllocatesByFound(t *testing.T) {
	const yaml = `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: 2}
choose: {series: E3, min: 1k, max: 10k}
`
	p := problemFromYAML(t, yaml, "")
	for _, m := range []synth.Method{synth.Rows{}, synth.Relax{}} {
		for _, workers := range []int{1, 2} {
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 1e11, Workers: workers}, m)
			runtime.ReadMemStats(&after)
			if err != nil {
				t.Fatalf("%s: %v", m.Name(), err)
			}
			if m.Name() == (synth.Rows{}).Name() && len(res.Solutions) != int(p.Space()) {
				t.Errorf("%s: %d answers, want the whole space of %g", m.Name(), len(res.Solutions), p.Space())
			}
			// 10^11 slots would be 800 GB; what is found here is a few kB.
			if grown := after.TotalAlloc - before.TotalAlloc; grown > 64<<20 {
				t.Errorf("%s, %d workers: %d bytes allocated for a %g-candidate space", m.Name(), workers, grown, p.Space())
			}
		}
	}
}

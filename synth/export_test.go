package synth

// SetUpdatedHook sets the hook branch and bound calls with every corner it
// updates along a line instead of solving (testHookUpdated); nil removes it.
func SetUpdatedHook(f func(p *Problem, corner []int32, values []float64, power float64, gen int)) {
	testHookUpdated = f
}

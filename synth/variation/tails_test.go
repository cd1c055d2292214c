package variation

import "testing"

// The 0.135 % and 99.865 % points are reported only where some sample lies
// beyond each (n·0.00135 ≥ 1, n ≥ 741); below that a run reports its lowest
// and highest sample, which the outputs label as such.
func TestSummariseTails(t *testing.T) {
	always := func(float64) bool { return true }
	for _, n := range []int{2, 100, 740, 741, 10000} {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64((i*7919)%n) / float64(n-1) // 0 … 1, shuffled
		}
		st := summarise(x, always)
		if n < TailSamples {
			if st.Low != 0 || st.High != 1 || TailsEstimated(n) {
				t.Errorf("n=%d: %g … %g, estimated %v; want the lowest and highest sample, 0 … 1", n, st.Low, st.High, TailsEstimated(n))
			}
			continue
		}
		// Linear interpolation between order statistics at q·(n−1).
		wantLo, wantHi := 0.00135, 0.99865
		if !TailsEstimated(n) || st.Low <= 0 || st.High >= 1 || st.Low > wantLo+1e-12 || st.High < wantHi-1e-12 {
			t.Errorf("n=%d: %g … %g, estimated %v; want the 0.135 %% and 99.865 %% points", n, st.Low, st.High, TailsEstimated(n))
		}
	}
}

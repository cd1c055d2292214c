package constraints

import (
	"math"
	"testing"
)

// TestKindFormat: every quantity a target reads is written with its unit,
// at the same number of digits, whatever command prints it.
func TestKindFormat(t *testing.T) {
	tests := []struct {
		k    TargetKind
		v    float64
		want string
	}{
		{Voltage, 0.699972, "699.97 mV"},
		{Current, 95.6246e-6, "95.625 µA"},
		{Power, 0.1721e-3, "172.1 µW"},
		{Resistance, 8758.75, "8.7588 kΩ"},
		{Ratio, 6.8, "6.8"},
		{Code, 2047.96, "2048.0"},
		{Sensitivity, 16.3531e-3, "16.353 mV/°C"},
		{Linearity, 3.35621, "3.3562 °C"},
		{Resolution, 0.0423, "0.0423 °C/step"},
		{Voltage, math.Inf(1), "∞"},
	}
	for _, tt := range tests {
		t.Run(tt.k.String(), func(t *testing.T) {
			if got := tt.k.Format(tt.v); got != tt.want {
				t.Errorf("%v.Format(%v) = %q, want %q", tt.k, tt.v, got, tt.want)
			}
		})
	}
}

package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// hazardRails is a network between two rails: p at hi and n at lo against
// ground, R1 from p to m and R2 from m to n. With free, R1 and R2 are left
// for fit to choose.
func hazardRails(hi, lo float64, free bool) string {
	val := ", value: 10k, tolerance: 1%"
	if free {
		val = ""
	}
	return fmt.Sprintf(`ohmfit: 1
parts:
  - {name: Vp, type: voltage-source, plus: p, minus: gnd, volts: %g}
  - {name: Vn, type: voltage-source, plus: n, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: p, to: m%s}
  - {name: R2, type: resistor, from: m, to: n%s}
targets:
  - {voltage: m, equals: %g}
choose: {series: E24, min: 1k, max: 100k}
`, hi, lo, val, val, (hi+lo)/2)
}

// TestHazardEveryCommand checks the one rule for hazardous voltage in every
// command that prints cautions: the largest potential difference between
// any two nodes in any condition, against the 60 V DC limit of ES1 in IEC
// 62368-1 (the ES1 limit is "not exceeding 60 V", so 60.00 V is within ES1
// and 60.01 V is not; source: IEC 62368-1, table of ES1 limits for DC).
// Each case is met with positive rails, negative rails and a span between
// two nodes neither of which is 60 V from ground; the caution names both
// nodes with their signs.
func TestHazardEveryCommand(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name   string
		hi, lo float64
		want   string // the caution's opening, "" for none
	}{
		{"pos-59.99", 59.99, 0, ""},
		{"pos-60", 60, 0, ""},
		{"pos-60.01", 60.01, 0, `between node p (+60.01 V) and node gnd (0 V) there are 60.01 V, in condition "nominal"`},
		{"neg-59.99", 0, -59.99, ""},
		{"neg-60", 0, -60, ""},
		{"neg-60.01", 0, -60.01, `between node gnd (0 V) and node n (-60.01 V) there are 60.01 V, in condition "nominal"`},
		{"span-59.99", 30, -29.99, ""},
		{"span-60", 30, -30, ""},
		{"span-60.01", 30, -30.01, `between node p (+30 V) and node n (-30.01 V) there are 60.01 V, in condition "nominal"`},
	}
	for _, c := range cases {
		valued := filepath.Join(dir, c.name+"-valued.yaml")
		free := filepath.Join(dir, c.name+"-free.yaml")
		if err := os.WriteFile(valued, []byte(hazardRails(c.hi, c.lo, false)), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(free, []byte(hazardRails(c.hi, c.lo, true)), 0o644); err != nil {
			t.Fatal(err)
		}
		cmds := map[string][]string{
			"solve": {"solve", valued},
			"fit":   {"fit", free, "--top", "1", "--workers", "1"},
			"check": {"check", valued, "--samples", "0"},
		}
		if c.lo == 0 {
			// divider builds a rail to ground from its flags.
			vin := fmt.Sprintf("%g", c.hi)
			cmds["divider"] = []string{"divider", "--vin", vin, "--vout", "2.5", "--top", "1", "--workers", "1"}
		}
		for cmd, args := range cmds {
			t.Run(c.name+"/"+cmd, func(t *testing.T) {
				out, errOut, code := runCLI(t, args...)
				if code != ExitOK {
					t.Fatalf("exit %d: %s", code, errOut)
				}
				all := out + errOut
				got := strings.Count(all, "CAUTION: hazardous voltage")
				if c.want == "" {
					if got != 0 {
						t.Errorf("caution at %g V span, want none:\n%s", c.hi-c.lo, all)
					}
					return
				}
				if got != 1 {
					t.Errorf("%d hazard cautions, want 1:\n%s", got, all)
				}
				if cmd == "divider" {
					// Its rail is named by the divider, not "p".
					return
				}
				for _, want := range []string{c.want, "60 V DC limit of ES1 in IEC 62368-1", "local electrical codes", "licensed"} {
					if !strings.Contains(all, want) {
						t.Errorf("caution lacks %q:\n%s", want, all)
					}
				}
			})
		}
	}
}

// TestHazardFeedback checks feedback's caution: its output node sits where
// the chosen pair puts it (Vref·(1 + R1/R2)), so the rule is met by a goal
// clearly on each side of 60 V rather than at 60.01 V.
func TestHazardFeedback(t *testing.T) {
	for _, c := range []struct {
		vout string
		want int
	}{{"55", 0}, {"65", 1}} {
		t.Run("vout "+c.vout, func(t *testing.T) {
			out, errOut, code := runCLI(t, "feedback", "--vref", "1.25", "--vout", c.vout, "--top", "1", "--workers", "1")
			if code != ExitOK {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			if got := strings.Count(out+errOut, "CAUTION: hazardous voltage"); got != c.want {
				t.Errorf("--vout %s: %d hazard cautions, want %d:\n%s%s", c.vout, got, c.want, out, errOut)
			}
		})
	}
}

// TestPackageFitAgrees checks that solve and check decide package fit by
// the same rule: 300 V across 225 kΩ is 0.4 W (P = V²/R), within half the
// rating of a 2512 (1 W) but above its 200 V, and within an axial ½ W's
// 350 V but above half its 0.5 W, so no package in the table carries it.
func TestPackageFitAgrees(t *testing.T) {
	file := filepath.Join(t.TempDir(), "bleed.yaml")
	text := `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: a, minus: gnd, volts: 300}
  - {name: R1, type: resistor, from: a, to: gnd, value: 225k, tolerance: 0.01%}
targets:
  - {current: R1, max: 1}
`
	if err := os.WriteFile(file, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	_, errOut, code := runCLI(t, "solve", file)
	if code != ExitOK || !strings.Contains(errOut, "CAUTION: R1 dissipates up to 0.4 W and has up to 300 V across it") ||
		!strings.Contains(errOut, "no package in the table carries that") {
		t.Errorf("solve: exit %d, want the package caution for R1:\n%s", code, errOut)
	}
	out, errOut, code := runCLI(t, "check", file, "--samples", "0")
	if code != ExitOK || !strings.Contains(out, "no package fits") {
		t.Errorf("check: exit %d, want R1's verdict \"no package fits\":\n%s%s", code, out, errOut)
	}
}

package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/synth/board"
)

// TestBoardBOMFile writes a board's --bom and reads it back: the check
// --bom header, and every designator of the table's BOM exactly once, with
// quantities that add up to the designators.
func TestBoardBOMFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "board-bom.csv")
	stdout, stderr, code := runCLI(t, "board", "example:controller", "--bom", path)
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 2 || !slices.Equal(rows[0], bomHeader) {
		t.Fatalf("header %v, want %v", rows[0], bomHeader)
	}
	seen := map[string]int{}
	for _, r := range rows[1:] {
		ds := strings.Split(r[0], ", ")
		if q := r[len(r)-1]; q != strconv.Itoa(len(ds)) {
			t.Errorf("line %v: quantity %s for %d designators", r, q, len(ds))
		}
		for _, d := range ds {
			seen[d]++
			if !strings.Contains(stdout, d) {
				t.Errorf("%s is in the file but not in the table", d)
			}
		}
	}
	for d, n := range seen {
		if n != 1 {
			t.Errorf("%s on %d lines", d, n)
		}
	}
	if len(seen) < 12 {
		t.Errorf("only %d designators for six networks of two or more resistors", len(seen))
	}
}

// TestBoardInterrupt sends a real Ctrl-C (SIGINT) to a board of twenty
// networks. In the selection it stops the search: the best selection so
// far is printed, marked not proven (interrupted), exit 0. While the
// networks' designs are still being listed there is nothing to show: one
// line on stderr, exit 2. Either way it is never swallowed and never a
// stack trace.
func TestBoardInterrupt(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a long board")
	}
	cmd := exec.Command(os.Args[0], "board", "testdata/board/twenty/board.yaml")
	cmd.Env = append(os.Environ(), "OHMFIT_TEST_MAIN=1")
	var out, errOut bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errOut
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(700 * time.Millisecond) // into the long part (not a timing claim)
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	err := stoppedAfterInterrupt(t, cmd, done)
	if strings.Contains(errOut.String(), "goroutine") {
		t.Fatalf("stack trace: %s", errOut.String())
	}
	if err == nil {
		// Stopped in the selection: before the count is proven the table
		// says "not proven (interrupted)"; after (a fast machine reaches the
		// tie-break within the sleep), the note says the tie-break is not.
		counted := strings.Contains(out.String(), "not proven (interrupted)")
		tieBreak := strings.Contains(out.String(), "proven: no selection uses fewer values") &&
			strings.Contains(errOut.String(), "interrupted in the tie-break")
		if !(counted || tieBreak) || !strings.Contains(errOut.String(), "interrupted") {
			t.Errorf("exit 0 without saying it was interrupted:\n%s\n%s", out.String(), errOut.String())
		}
		return
	}
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != int(ExitBadInput) ||
		!strings.Contains(errOut.String(), "interrupted while listing") || out.Len() != 0 || strings.Count(errOut.String(), "\n") != 1 {
		t.Errorf("ended with %v\nstdout: %s\nstderr: %s", err, out.String(), errOut.String())
	}
}

// TestBoardTimeLimit gives the board of twenty networks a short time
// limit. If it ends in the selection, the best selection so far is shown,
// exit 0, with status time-limit, not proven, and a bound no larger than
// the count; if it ends while the designs are still being listed, one
// line on stderr names the time limit, exit 2. Which of the two happens
// depends on the machine; both are checked.
func TestBoardTimeLimit(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a long board")
	}
	stdout, stderr, code := runCLI(t, "board", "testdata/board/twenty/board.yaml", "--time-limit", "1500ms", "--format", "json")
	if code == ExitBadInput {
		if !strings.Contains(stderr, "time limit of 1.5s ran out while listing") || stdout != "" || strings.Count(stderr, "\n") != 1 {
			t.Errorf("exit 2 with\nstdout: %s\nstderr: %s", stdout, stderr)
		}
		return
	}
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Status          string
		Proven          bool
		Distinct, Bound int
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Proven {
		t.Skip("the machine proved the board within the limit; nothing was cut short")
	}
	if doc.Status != "time-limit" || doc.Bound > doc.Distinct || doc.Bound < 1 ||
		!strings.Contains(stderr, "time limit of 1.5s reached; showing the best selection found so far (not proven)") {
		t.Errorf("status %q, bound %d of %d; stderr: %s", doc.Status, doc.Bound, doc.Distinct, stderr)
	}
}

// TestTimeLimitWording: board's --time-limit is fit's, word for word (one
// help text, timeLimitUsage, for one meaning).
func TestTimeLimitWording(t *testing.T) {
	root := newRootCmd(strings.NewReader(""), io.Discard, io.Discard)
	var usages []string
	for _, name := range []string{"fit", "board"} {
		cmd, _, err := root.Find([]string{name})
		if err != nil {
			t.Fatal(err)
		}
		f := cmd.Flags().Lookup("time-limit")
		if f == nil {
			t.Fatalf("%s has no --time-limit", name)
		}
		usages = append(usages, f.Usage)
	}
	if usages[0] != usages[1] || usages[1] != timeLimitUsage {
		t.Errorf("fit: %q\nboard: %q", usages[0], usages[1])
	}
}

// TestBoardJSONSearchFigures: the board JSON carries the selection
// search's figures, each as the library computed it: a network's "kept"
// (designs left after dominated ones are dropped; at least 1, at most
// "designs"), the board's "selection_nodes" (the selection search is one
// goroutine and deterministic, so a second solve gives the same count),
// and no timing (the document repeats from run to run, as fit's does).
func TestBoardJSONSearchFigures(t *testing.T) {
	const file = "testdata/board/two.yaml"
	stdout, stderr, code := runCLI(t, "board", file, "--format", "json")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		SelectionNodes *int64   `json:"selection_nodes"`
		Elapsed        *float64 `json:"elapsed"` // must be absent
		Networks       []struct {
			Designs int
			Kept    *int
		}
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	b, err := board.Load(file)
	if err != nil {
		t.Fatal(err)
	}
	res, err := board.Solve(context.Background(), b, nil)
	if err != nil {
		t.Fatal(err)
	}
	if doc.SelectionNodes == nil || *doc.SelectionNodes != res.Nodes {
		t.Errorf("selection_nodes %v, want %d", doc.SelectionNodes, res.Nodes)
	}
	if doc.Elapsed != nil {
		t.Errorf("elapsed %v s in the JSON: a timing makes two runs' documents differ", *doc.Elapsed)
	}
	if len(doc.Networks) != len(res.Networks) {
		t.Fatalf("%d networks, want %d", len(doc.Networks), len(res.Networks))
	}
	for i, n := range doc.Networks {
		if n.Kept == nil || *n.Kept != res.Networks[i].Kept || *n.Kept < 1 || *n.Kept > n.Designs {
			t.Errorf("network %d: kept %v of %d designs, want %d", i, n.Kept, n.Designs, res.Networks[i].Kept)
		}
	}
}

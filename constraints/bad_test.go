package constraints

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadFiles loads each template in testdata/bad, whose first line states
// the expected "line:col: message" (the message may be a prefix), so the
// same files can serve the command's exit-code tests.
func TestBadFiles(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.yaml"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no bad templates found (%v)", err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			want := wantLine(t, f)
			_, err = Load(f)
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("got %v, want an *Error", err)
			}
			if got := strings.TrimPrefix(err.Error(), f+":"); !strings.HasPrefix(got, want) {
				t.Errorf("got  %s\nwant %s:%s", err, f, want)
			}
		})
	}
}

// wantLine returns what a bad-input file's first line, "# want: …", expects.
func wantLine(t *testing.T, file string) string {
	t.Helper()
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	first, _, _ := strings.Cut(string(data), "\n")
	want, ok := strings.CutPrefix(first, "# want: ")
	if !ok {
		t.Fatalf("first line %q does not start with \"# want: \"", first)
	}
	return want
}

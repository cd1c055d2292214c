package main

import (
	"go/build"
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// modulePath is the import path prefix of the project's own packages.
const modulePath = "github.com/ohmfit/ohmfit/"

// TestDevelopersTableMatchesImports keeps the architecture table of
// DEVELOPERS.md true: every package of the module has a row, and the row's
// "imports of ours" column lists exactly what the package imports from the
// module (read from the source with go/build, as `go list` does).
func TestDevelopersTableMatchesImports(t *testing.T) {
	root := filepath.Join("..", "..")
	text, err := os.ReadFile(filepath.Join(root, "DEVELOPERS.md"))
	if err != nil {
		t.Fatal(err)
	}
	row := regexp.MustCompile("(?m)^\\| `([a-z/]+)` \\| [^|]+ \\| ([^|]+) \\|$")
	table := map[string][]string{}
	for _, m := range row.FindAllStringSubmatch(string(text), -1) {
		var deps []string
		if d := strings.TrimSpace(m[2]); d != "none" {
			for _, p := range strings.Split(d, ",") {
				deps = append(deps, strings.TrimSpace(p))
			}
		}
		slices.Sort(deps)
		table[m[1]] = deps
	}
	found := map[string]bool{}
	err = filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if !d.IsDir() {
			return nil
		}
		if n := d.Name(); n == "testdata" || (strings.HasPrefix(n, ".") && path != root) {
			return filepath.SkipDir
		}
		pkg, err := build.ImportDir(path, 0)
		if err != nil {
			return nil // no Go files here
		}
		rel, _ := filepath.Rel(root, path)
		rel = filepath.ToSlash(rel)
		found[rel] = true
		var ours []string
		for _, imp := range pkg.Imports {
			if strings.HasPrefix(imp, modulePath) {
				ours = append(ours, strings.TrimPrefix(imp, modulePath))
			}
		}
		slices.Sort(ours)
		want, ok := table[rel]
		if !ok {
			t.Errorf("DEVELOPERS.md has no row for package %s (imports of ours: %s)", rel, strings.Join(ours, ", "))
			return nil
		}
		if !slices.Equal(want, ours) {
			t.Errorf("DEVELOPERS.md says %s imports %v of ours; it imports %v", rel, want, ours)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	for p := range table {
		if !found[p] {
			t.Errorf("DEVELOPERS.md has a row for %s, which is not a package", p)
		}
	}
}

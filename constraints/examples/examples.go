package examples

import (
	"embed"
	"io/fs"
	"path"
	"slices"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
)

//go:embed *.yaml
var files embed.FS

// Names returns the example names (file names without ".yaml"), sorted.
func Names() []string {
	entries, err := files.ReadDir(".")
	if err != nil {
		// The embedded directory always exists; an error is a build defect.
		panic(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, strings.TrimSuffix(e.Name(), ".yaml"))
	}
	slices.Sort(names)
	return names
}

// Get returns the text of the named example.
func Get(name string) ([]byte, bool) {
	if !slices.Contains(Names(), name) {
		return nil, false
	}
	data, err := files.ReadFile(path.Join(".", name+".yaml"))
	return data, err == nil
}

// Summary returns the named example's `name:` line as the template loader
// reads it, or "" when there is no such example.
func Summary(name string) string {
	data, ok := Get(name)
	if !ok {
		return ""
	}
	t, err := constraints.Parse(name+".yaml", data)
	if err != nil {
		return ""
	}
	return t.Name
}

// boards holds the built-in board files (boards/NAME.yaml) and the
// templates they name, which sit beside them (boards/NAME/*.yaml) so that
// they stay out of the template list.
//
//go:embed boards
var boards embed.FS

// BoardNames returns the built-in board names (boards/NAME.yaml without
// ".yaml"), sorted.
func BoardNames() []string {
	entries, err := boards.ReadDir("boards")
	if err != nil {
		// The embedded directory always exists; an error is a build defect.
		panic(err)
	}
	var names []string
	for _, e := range entries {
		if !e.IsDir() && strings.HasSuffix(e.Name(), ".yaml") {
			names = append(names, strings.TrimSuffix(e.Name(), ".yaml"))
		}
	}
	slices.Sort(names)
	return names
}

// Board returns the text of the named built-in board file.
func Board(name string) ([]byte, bool) {
	if !slices.Contains(BoardNames(), name) {
		return nil, false
	}
	return BoardFile(name + ".yaml")
}

// BoardFile returns a file of the built-in boards by its slash-separated
// path relative to the boards directory ("controller/rail-3v3.yaml"), as a
// built-in board names its templates. Paths that leave the directory are
// not found.
func BoardFile(rel string) ([]byte, bool) {
	p := path.Join("boards", rel)
	if !fs.ValidPath(rel) || !strings.HasPrefix(p, "boards/") {
		return nil, false
	}
	data, err := boards.ReadFile(p)
	return data, err == nil
}

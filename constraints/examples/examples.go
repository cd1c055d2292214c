package examples

import (
	"embed"
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

// Package examples holds the demo models that ship inside the forkcast
// binary. Every scenario in them is invented.
package examples

import (
	"embed"
	"sort"
	"strings"
)

//go:embed *.fork
var files embed.FS

// Example is one bundled model.
type Example struct {
	Name   string // the file name without .fork, as in example:NAME
	Source []byte
}

// Names lists the bundled examples that hold a decision tree, in
// alphabetical order.
func Names() []string { return list(false) }

// Registers lists the bundled examples that hold a risk register and no
// tree, in alphabetical order: `forkcast register example:NAME` analyses
// them. Their names end in -register.
func Registers() []string { return list(true) }

func list(registers bool) []string {
	entries, _ := files.ReadDir(".")
	var out []string
	for _, e := range entries {
		name := strings.TrimSuffix(e.Name(), ".fork")
		if strings.HasSuffix(name, "-register") == registers {
			out = append(out, name)
		}
	}
	sort.Strings(out)
	return out
}

// Get returns the bundled example with that name.
func Get(name string) (Example, bool) {
	src, err := files.ReadFile(strings.TrimSuffix(name, ".fork") + ".fork")
	if err != nil {
		return Example{}, false
	}
	return Example{Name: strings.TrimSuffix(name, ".fork"), Source: src}, true
}

// Summary is the first comment line of an example: what it is about.
func (e Example) Summary() string {
	for _, line := range strings.Split(string(e.Source), "\n") {
		line = strings.TrimSpace(line)
		if strings.HasPrefix(line, "#") {
			return strings.TrimSpace(strings.TrimPrefix(line, "#"))
		}
		if line != "" {
			break
		}
	}
	return ""
}

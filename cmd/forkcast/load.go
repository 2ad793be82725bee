package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
	"github.com/urfave/cli/v2"
)

// loaded is a model read from the command line's FILE.
type loaded struct {
	Model    *tree.Model      // as written
	Compiled *compiled.Model  // checked and compiled
	Name     string           // as the user gave it, for messages
	Src      []byte           // the text, for showing diagnostics (nil for a model file read as a stream that has none)
	Diags    tree.Diagnostics // warnings (errors stop loading)
}

// maxNodesFlag is shared by every command that reads a model.
var maxNodesFlag = &cli.IntFlag{
	Name:  "max-nodes",
	Usage: "refuse models that expand to more than `N` nodes, before building them (the default needs about 1 GB of memory for a typical model, 2.5 GB at most)",
	Value: tree.DefaultNodeLimit,
}

// fileArg returns the one FILE argument or a usage error.
func fileArg(c *cli.Context) (string, error) {
	switch c.NArg() {
	case 0:
		return "", usageErr("%s needs a model FILE (a .fork or .json path, - for standard input, or example:NAME)", c.Command.Name)
	case 1:
		return c.Args().First(), nil
	}
	return "", usageErr("%s takes one FILE, got %d: %s", c.Command.Name, c.NArg(), strings.Join(c.Args().Slice(), " "))
}

// readSource reads FILE: a path, "-" for standard input, or example:NAME.
func readSource(c *cli.Context, name string) ([]byte, bool, error) {
	isJSON := strings.EqualFold(filepath.Ext(name), ".json")
	switch {
	case name == "-":
		src, err := io.ReadAll(c.App.Reader)
		if err != nil {
			return nil, false, modelErr("reading standard input: %v", err)
		}
		// Standard input has no extension: JSON starts with a brace, after
		// any amount of white space (no model text starts with one).
		trimmed := bytes.TrimLeft(bytes.TrimPrefix(src, []byte("\ufeff")), " \t\r\n")
		return src, len(trimmed) > 0 && trimmed[0] == '{', nil
	case strings.HasPrefix(name, "example:"):
		ex, ok := examples.Get(strings.TrimPrefix(name, "example:"))
		if !ok {
			return nil, false, modelErr("no example %q; the examples are: %s", strings.TrimPrefix(name, "example:"), strings.Join(append(examples.Names(), examples.Registers()...), ", "))
		}
		return ex.Source, false, nil
	}
	// A missing file and a directory are both inputs that cannot be
	// read: exit status 1, as for a model with errors (see main.go).
	if st, err := os.Stat(name); err == nil && st.IsDir() {
		return nil, false, modelErr("%s is a directory; give a model file (.fork or .json)", shown(name))
	}
	src, err := os.ReadFile(name)
	if err != nil {
		return nil, false, readErr(name, err)
	}
	return src, isJSON, nil
}

// readErr is the error for a model file that cannot be read.
func readErr(name string, err error) error {
	if os.IsNotExist(err) {
		return modelErr("no such file: %s", shown(name))
	}
	return modelErr("%s", shown(err.Error()))
}

// streamed reports whether FILE is a model text file that loadModel reads
// as a stream: a path (not standard input or an example) to an existing
// file that is not JSON.
func streamed(name string) bool {
	if name == "-" || strings.HasPrefix(name, "example:") || strings.EqualFold(filepath.Ext(name), ".json") {
		return false
	}
	st, err := os.Stat(name)
	return err == nil && st.Mode().IsRegular()
}

// loadSource reads and compiles FILE. src is its text when it is needed
// afterwards: to show diagnostics, or --set's problems (needText).
func loadSource(c *cli.Context, name string, limit int, needText bool) (cm *compiled.Model, ds tree.Diagnostics, src []byte, err error) {
	defer collectRarely()()
	if streamed(name) {
		// A model file is read as a stream, so that a large one costs
		// memory for the model and not for its text as well; the text is
		// read again only when it is shown.
		cm, ds, err = lang.LoadFile(name, lang.Options{NodeLimit: limit})
		if err == nil && (len(ds) > 0 || needText) {
			src, err = os.ReadFile(name)
		}
		if err != nil {
			return nil, nil, nil, readErr(name, err)
		}
		return cm, ds, src, nil
	}
	src, isJSON, err := readSource(c, name)
	if err != nil {
		return nil, nil, nil, err
	}
	if !isJSON {
		cm, ds = lang.Load(src, lang.Options{NodeLimit: limit})
		return cm, ds, src, nil
	}
	m, ds := interchange.ReadBytes(src, interchange.Options{NodeLimit: limit})
	if !ds.HasErrors() {
		var cs tree.Diagnostics
		cm, cs = compiled.Compile(m)
		ds = append(ds, cs...)
	}
	return cm, ds.Sort(), src, nil
}

// loadModel reads, parses and compiles FILE, with the inputs given by
// --set. Errors and warnings go to
// standard error as file:line:col diagnostics; a model with errors returns
// an exit-1 error.
func loadModel(c *cli.Context) (*loaded, error) {
	name, err := fileArg(c)
	if err != nil {
		return nil, err
	}
	sets, err := parseSettings(c)
	if err != nil {
		return nil, err
	}
	cm, ds, src, err := loadSource(c, name, c.Int(maxNodesFlag.Name), len(sets) > 0)
	if err != nil {
		return nil, err
	}
	shown := name
	if name == "-" {
		shown = "<stdin>"
	}
	if ds.HasErrors() {
		printLimited(c, ds, shown, src, solveWarningLimit, "fix the errors, then run `forkcast check` to see them all")
		n := len(ds.Errors())
		if c.Command.Name == "check" {
			return nil, modelErr("%s: %d error%s", shown, n, plural(n))
		}
		if c.Command.Name == "register" {
			return nil, modelErr("%s: %d error%s; nothing was analysed", shown, n, plural(n))
		}
		return nil, modelErr("%s: %d error%s; nothing was solved", shown, n, plural(n))
	}
	cm, err = applySettings(c, cm, sets, shown, src)
	if err != nil {
		return nil, err
	}
	if !cm.HasTree() && c.Command.Name != "check" && c.Command.Name != "register" {
		return nil, modelErr("%s has no tree, only %s: analyse it with `forkcast register %s`, or add a decision that uses its figures (let NAME = register REGISTER total)",
			shown, registersSummary(cm.Source()), name)
	}
	return &loaded{Model: cm.Source(), Compiled: cm, Name: shown, Src: src, Diags: ds}, nil
}

// loadAndSolve is what every analysis command starts with: read FILE,
// report its first warnings, and roll the tree back.
func loadAndSolve(c *cli.Context) (*loaded, *eval.Solution, error) {
	l, err := loadModel(c)
	if err != nil {
		return nil, nil, err
	}
	l.printWarnings(c)
	sol, err := eval.Solve(l.Compiled)
	if err != nil {
		return nil, nil, modelErr("%v", err)
	}
	return l, sol, nil
}

// solveWarningLimit is how many warnings an analysis command shows before
// pointing to `forkcast check` for the rest.
const solveWarningLimit = 5

// printWarnings reports the model's warnings on standard error, the first
// few only: `check` lists them all.
func (l *loaded) printWarnings(c *cli.Context) {
	printLimited(c, l.Diags, l.Name, l.Src, solveWarningLimit, "run `forkcast check` to see them all")
	noteRiskIgnored(c, l)
}

// printLimited prints every error and at most limit warnings (limit < 0:
// all), then says how many warnings were left out and how to see them.
func printLimited(c *cli.Context, ds tree.Diagnostics, name string, src []byte, limit int, how string) {
	var shown tree.Diagnostics
	left := 0
	for _, d := range ds {
		if d.Severity == tree.Warning && limit >= 0 {
			if limit == 0 {
				left++
				continue
			}
			limit--
		}
		shown = append(shown, d)
	}
	shown.Print(c.App.ErrWriter, name, src)
	if left > 0 {
		fmt.Fprintf(c.App.ErrWriter, "%s: %d more warning%s not shown; %s\n", name, left, plural(left), how)
	}
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

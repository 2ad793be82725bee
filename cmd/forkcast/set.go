package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/render"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
	"github.com/xrash/smetrics"
)

// setList collects the words of every --set as given; they are read
// against the model, which says what inputs exist.
type setList struct{ words []string }

// Set adds one NAME=VALUE.
func (s *setList) Set(v string) error {
	s.words = append(s.words, v)
	return nil
}

// String is the words given, for the flag's help.
func (s *setList) String() string { return strings.Join(s.words, " ") }

// setFlag is --set, on every command that reads a model. Its value is a
// new list each time: commands are built afresh for every run.
func setFlag() *cli.GenericFlag {
	return &cli.GenericFlag{
		Name:  "set",
		Usage: "answer with input `NAME=VALUE`, as if the model's let line said so (repeatable; 280_000, 25% allowed)",
		Value: &setList{},
	}
}

// setting is one --set, read: the input's name and its value.
type setting struct {
	word  string // as given, for messages
	name  string
	value decimal.Decimal
}

// parseSettings reads the --set words: each NAME=VALUE, VALUE a number as
// a model writes it (lang.ParseNumber: 1_000 separators, 25%, a leading
// minus sign), each NAME once. Whether the names exist is for the model to
// say (applySettings).
func parseSettings(c *cli.Context) ([]setting, error) {
	list, _ := c.Generic("set").(*setList)
	if list == nil {
		return nil, nil
	}
	var out []setting
	seen := map[string]bool{}
	for _, w := range list.words {
		name, text, ok := strings.Cut(w, "=")
		name, text = strings.TrimSpace(name), strings.TrimSpace(text)
		if !ok || name == "" || text == "" {
			return nil, usageErr("--set %s: write NAME=VALUE, the name of a `let` and a number, e.g. --set licence=280_000 or --set p_late=25%%", shown(w))
		}
		if seen[name] {
			return nil, usageErr("--set gives %s twice; give each input once", shown(name))
		}
		seen[name] = true
		v, err := parseNumber(text)
		if err != nil {
			return nil, usageErr("--set %s: %v", shown(w), err)
		}
		out = append(out, setting{word: w, name: name, value: v})
	}
	return out, nil
}

// applySettings gives the compiled model the inputs set: an unknown name,
// or values that leave the model invalid (a probability outside [0, 1]),
// is a usage error, after the model's own diagnostics of it; a value
// outside the input's range is a warning, as it is in a `let` line.
func applySettings(c *cli.Context, cm *compiled.Model, sets []setting, name string, src []byte) (*compiled.Model, error) {
	if len(sets) == 0 {
		return cm, nil
	}
	var changes []compiled.Setting
	for _, s := range sets {
		ch, err := cm.Set(s.name, s.value)
		if err != nil {
			return nil, usageErr("--set %s: %s", shown(s.word), unknownInput(cm, s.name))
		}
		changes = append(changes, ch)
	}
	out, err := cm.With(changes...)
	var inv *compiled.InvalidError
	switch {
	case errors.As(err, &inv):
		inv.Diagnostics.Print(c.App.ErrWriter, name, src)
		return nil, usageErr("%s: the model is not valid with %s; give %s", name, setWords(sets), pluralWord(len(sets), "another value", "other values"))
	case err != nil:
		return nil, usageErr("%s: %v", setWords(sets), err)
	}
	for _, s := range sets {
		in, _ := out.InputNamed(s.name)
		if in.HasRange && (s.value.LessThan(in.Low) || s.value.GreaterThan(in.High)) {
			fmt.Fprintf(c.App.ErrWriter, "%s: warning: --set %s lies outside the range of %s, %s .. %s\n", name, shown(s.word), shown(s.name),
				render.Grouped(in.Low.String()), render.Grouped(in.High.String()))
		}
	}
	return out, nil
}

// unknownInput says that the model has no input of that name, which of
// its inputs comes closest, and what they all are.
func unknownInput(cm *compiled.Model, name string) string {
	inputs := cm.Inputs()
	if len(inputs) == 0 {
		return fmt.Sprintf("the model has no input %q: it has no `let` lines to set", name)
	}
	names := make([]string, len(inputs))
	best, score := "", 0.8 // below this, a suggestion is more noise than help
	for i, in := range inputs {
		names[i] = in.Name
		if s := smetrics.JaroWinkler(name, in.Name, 0.7, 4); s > score {
			best, score = in.Name, s
		}
	}
	msg := fmt.Sprintf("the model has no input %q", name)
	if best != "" {
		msg += fmt.Sprintf(" (did you mean %q?)", best)
	}
	if len(names) > maxListed {
		return msg + fmt.Sprintf("; its inputs include %s and %d more", strings.Join(names[:maxListed], ", "), len(names)-maxListed)
	}
	return msg + "; its inputs are " + strings.Join(names, ", ")
}

// maxListed is how many input names a message lists.
const maxListed = 20

// setWords lists the settings as given: "--set a=1, --set b=2".
func setWords(sets []setting) string {
	ws := make([]string, len(sets))
	for i, s := range sets {
		ws[i] = "--set " + shown(s.word)
	}
	return strings.Join(ws, ", ")
}

func pluralWord(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

package main

import (
	"bufio"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func breakevenCommand() *cli.Command {
	return &cli.Command{
		Name:      "breakeven",
		Usage:     "find where the best option changes as one input varies",
		ArgsUsage: "FILE",
		UsageText: "forkcast breakeven --vary NAME [--in LOW..HIGH] [--at DECISION] [--json] FILE\n\n" +
			"   forkcast breakeven examples/sourcing.fork --vary licence\n" +
			"   forkcast breakeven examples/release.fork --vary defect:Defective --in 0..50%\n" +
			"   forkcast breakeven examples/sourcing.fork --vary 'Integration with the fare back office/Clean'\n" +
			"   forkcast breakeven examples/release.fork --vary recall --in 20_000..900_000 --at Release",
		Description: "Varies one input over a range and reports every value at which the best option\n" +
			"of a decision changes (the breakeven or threshold points), which option is best\n" +
			"on each side, and every option's expected value there.\n\n" +
			"--vary names the input:\n" +
			"   NAME                a `let` parameter, e.g. licence\n" +
			"   UNCERTAINTY:STATE   the probability of a state of a named uncertainty,\n" +
			"                       e.g. defect:Defective or 'delivery:On time'\n" +
			"   NODE/BRANCH         the probability of a branch of a plain chance node, by\n" +
			"                       labels, e.g. 'Supplier service level/Met'; every chance\n" +
			"                       node with that label is varied together\n" +
			"Put a part in double quotes when it holds a ':' or '/' of its own:\n" +
			"   --vary '\"Phase 1: build\"/\"Late\"'\n\n" +
			"--in LOW..HIGH is the range (1_000 separators and 25% allowed). Without it a\n" +
			"parameter uses its own `in LOW .. HIGH` and a probability runs from 0 to 1.\n" +
			"When a probability moves, the sibling marked `rest` takes up the difference\n" +
			"(without one, the others are rescaled in proportion); the range is cut where a\n" +
			"sibling would leave [0, 1], and the output says so.\n\n" +
			"--at names the decision to watch by its label (default: the root, or the first\n" +
			"decision on the best path when the root is not a decision). When several\n" +
			"decisions share the label (a subtree used in several places), the one the\n" +
			"policy reaches is watched; BRANCH/DECISION picks the one reached through a\n" +
			"branch of that label, e.g. --at 'No survey/Drill or sell'.\n\n" +
			"A switch is exact when the two options' values are equal there; otherwise it is\n" +
			"found to " + fmt.Sprint(compiled.DivisionScale) + " decimal places and marked approximate (≈).",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "vary", Usage: "the input to vary: `NAME`, UNCERTAINTY:STATE or NODE/BRANCH"},
			&cli.StringFlag{Name: "in", Usage: "search `LOW..HIGH` (default: the parameter's own range, or 0..1 for a probability)"},
			&cli.StringFlag{Name: "at", Usage: "watch the decision with this `LABEL`"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON, values as exact decimal strings"},
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			if !c.IsSet("vary") || strings.TrimSpace(c.String("vary")) == "" {
				return usageErr("breakeven needs --vary NAME (a parameter), UNCERTAINTY:STATE or NODE/BRANCH")
			}
			v, err := eval.ParseVary(c.String("vary"))
			if err != nil {
				return usageErr("--vary: %v", err)
			}
			opts := eval.BreakevenOptions{Vary: v, At: c.String("at")}
			if c.IsSet("in") {
				lo, hi, err := parseRange(c.String("in"))
				if err != nil {
					return usageErr("--in: %v", err)
				}
				opts.Low, opts.High = &lo, &hi
			}
			l, err := loadModel(c)
			if err != nil {
				return err
			}
			l.printWarnings(c)
			be, err := eval.FindBreakeven(c.Context, l.Compiled, opts)
			var re *eval.RequestError
			switch {
			case errors.As(err, &re):
				return usageErr("%v", re)
			case err != nil:
				return modelErr("%v", err)
			}
			if c.Bool("json") {
				return writeBreakevenJSON(c.App.Writer, l.Model, be)
			}
			w := bufio.NewWriter(c.App.Writer)
			printBreakeven(w, l.Model, be)
			return w.Flush()
		},
	}
}

// parseRange reads LOW..HIGH, each bound a number written as in a model
// (lang.ParseNumber: 1_000 separators, 25%, a leading minus sign).
func parseRange(s string) (lo, hi decimal.Decimal, err error) {
	parts := strings.Split(s, "..")
	if len(parts) != 2 {
		return lo, hi, fmt.Errorf("%q is not a range: write LOW..HIGH, e.g. 200_000..300_000 or 10%%..40%%", s)
	}
	lo, err = parseNumber(parts[0])
	if err == nil {
		hi, err = parseNumber(parts[1])
	}
	if err == nil && lo.GreaterThan(hi) {
		err = fmt.Errorf("the range %s runs downwards: write the smaller bound first", s)
	}
	return lo, hi, err
}

func parseNumber(s string) (decimal.Decimal, error) {
	d, err := lang.ParseNumber(strings.TrimSpace(s))
	var ne *lang.NumberError
	if errors.As(err, &ne) {
		return d, fmt.Errorf("%q %s (%s)", ne.Text, ne.Problem, ne.Hint)
	}
	return d, err
}

// beFormat shows values of the varied input: a probability as a percent,
// anything else as a plain number; an approximate one rounded, with ≈.
type beFormat struct {
	prob bool
}

func inputFormat(m *tree.Model, be *eval.Breakeven) beFormat {
	if be.Vary.Kind != eval.VaryParam {
		return beFormat{prob: true}
	}
	// A parameter written as a probability somewhere counts as one.
	used := false
	look := func(e tree.Expr) {
		tree.Names(e, func(n *tree.Name) { used = used || n.Name == be.Vary.Name })
	}
	for _, u := range m.Uncertainties {
		for _, s := range u.States {
			look(s.Prob)
		}
	}
	for _, t := range m.Tests {
		for _, rd := range t.Readings {
			for _, l := range rd.Given {
				look(l.Prob)
			}
		}
	}
	tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
		for _, b := range n.Branches {
			look(b.Prob)
		}
		return true
	})
	return beFormat{prob: used}
}

func (f beFormat) show(x decimal.Decimal, exact bool) string {
	var s string
	if f.prob {
		s = render.Percent(x, 4)
		if !x.Mul(decimal.NewFromInt(100)).Round(4).Equal(x.Mul(decimal.NewFromInt(100))) {
			exact = false
		}
	} else {
		r := x.Round(6)
		if !r.Equal(x) {
			exact = false
		}
		s = render.Grouped(r.String())
	}
	if !exact {
		return "≈" + s
	}
	return s
}

func printBreakeven(w io.Writer, m *tree.Model, be *eval.Breakeven) {
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	f := inputFormat(m, be)
	if m.Title != "" {
		fmt.Fprintln(w, m.Title)
	}
	fmt.Fprintf(w, "breakeven of %s, now %s, over %s .. %s\n", be.What, f.show(be.Current, true), f.show(be.Low, true), f.show(be.High, true))
	fmt.Fprintf(w, "watching decision %s", quoted(be.Decision.Display()))
	if len(be.Path) > 0 {
		fmt.Fprintf(w, " (after %s)", strings.Join(quotedAll(be.Path), " → "))
	}
	fmt.Fprintln(w)
	if be.Adjust != "" {
		fmt.Fprintf(w, "as it moves, %s\n", be.Adjust)
	}
	for _, n := range be.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	fmt.Fprintln(w)
	name := be.Vary.String()
	if len(be.Switches) == 0 {
		fmt.Fprintf(w, "No switch: %s is best over the whole range.\n", quoted(be.Options[be.Segments[0].Best]))
	}
	for _, sw := range be.Switches {
		exact := "exact"
		if !sw.Exact {
			exact = fmt.Sprintf("approximate, to %d decimal places", compiled.DivisionScale)
		}
		fmt.Fprintf(w, "Switch at %s = %s (%s): %s below, %s above\n", name, f.show(sw.At, sw.Exact), exact,
			quoted(be.Options[sw.Below]), quoted(be.Options[sw.Above]))
		var rows [][]string
		for j, o := range be.Options {
			rows = append(rows, []string{o, money(sw.Values[j])})
		}
		textTable(w, "    ", 3, []bool{false, true}, rows)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Best option over the range")
	var rows [][]string
	for _, sg := range be.Segments {
		rows = append(rows, []string{f.show(sg.From, true), "..", f.show(sg.To, true), "  " + be.Options[sg.Best]})
	}
	textTable(w, "  ", 1, []bool{true, false, true, false}, rows)
	if len(be.Switches) > 0 {
		fmt.Fprintln(w, "(at a switch the options tie; ties go to the first option in the model)")
	}
}

func quotedAll(xs []string) []string {
	out := make([]string, len(xs))
	for i, x := range xs {
		out[i] = quoted(x)
	}
	return out
}

type breakevenJSON struct {
	Title     string        `json:"title,omitempty"`
	Objective string        `json:"objective"`
	Currency  string        `json:"currency,omitempty"`
	Vary      string        `json:"vary"`
	Kind      string        `json:"kind"`
	What      string        `json:"what"`
	Current   string        `json:"current"`
	Low       string        `json:"low"`
	High      string        `json:"high"`
	Narrowed  bool          `json:"narrowed"`
	Adjust    string        `json:"adjust,omitempty"`
	Decision  string        `json:"decision"`
	Path      []string      `json:"path"`
	Options   []string      `json:"options"`
	Switches  []switchJSON  `json:"switches"`
	Segments  []segmentJSON `json:"segments"`
	Notes     []string      `json:"notes"`
}

type switchJSON struct {
	At     string        `json:"at"`
	Exact  bool          `json:"exact"`
	Below  string        `json:"below"`
	Above  string        `json:"above"`
	Values []optionValue `json:"values"`
}

type optionValue struct {
	Option string `json:"option"`
	Value  string `json:"value"`
}

type segmentJSON struct {
	From string `json:"from"`
	To   string `json:"to"`
	Best string `json:"best"`
}

func writeBreakevenJSON(w io.Writer, m *tree.Model, be *eval.Breakeven) error {
	kind := map[eval.VaryKind]string{eval.VaryParam: "parameter", eval.VaryState: "state", eval.VaryBranch: "branch"}[be.Vary.Kind]
	out := breakevenJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency,
		Vary: be.Vary.String(), Kind: kind, What: be.What, Current: be.Current.String(),
		Low: be.Low.String(), High: be.High.String(), Narrowed: be.Narrowed, Adjust: be.Adjust,
		Decision: be.Decision.Display(), Path: append([]string{}, be.Path...), Options: be.Options,
		Switches: []switchJSON{}, Segments: []segmentJSON{}, Notes: append([]string{}, be.Notes...)}
	for _, sw := range be.Switches {
		sj := switchJSON{At: sw.At.String(), Exact: sw.Exact, Below: be.Options[sw.Below], Above: be.Options[sw.Above]}
		for j, o := range be.Options {
			sj.Values = append(sj.Values, optionValue{Option: o, Value: sw.Values[j].String()})
		}
		out.Switches = append(out.Switches, sj)
	}
	for _, sg := range be.Segments {
		out.Segments = append(out.Segments, segmentJSON{From: sg.From.String(), To: sg.To.String(), Best: be.Options[sg.Best]})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(out)
}

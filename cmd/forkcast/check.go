package main

import (
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/urfave/cli/v2"
)

func checkCommand() *cli.Command {
	return &cli.Command{
		Name:      "check",
		Usage:     "parse and validate a model; report every error and warning",
		ArgsUsage: "FILE",
		UsageText: "forkcast check [--warnings N] [--set NAME=VALUE]... FILE\n\n" +
			"   forkcast check model.fork && forkcast solve model.fork\n" +
			"   forkcast check example:sourcing --set p_late=50%    still valid with a 50% chance of delay?",
		Description: "Reads the model and reports every problem found, not only the first, as\n" +
			"file:line:col: message, the source line, a caret under the spot and a hint.\n" +
			"Errors (exit status 1) stop a model from being solved: syntax, unknown names,\n" +
			"probabilities outside [0, 1] or not summing to 1, duplicate labels, cycles.\n" +
			"Warnings do not: branches with probability 0, options that are worse than\n" +
			"another option of the same decision in every outcome or in distribution\n" +
			"(first-order stochastic dominance: the other has at least as high a chance\n" +
			"of beating any figure, with the best choices made after it), `let`s never\n" +
			"used.\n\n" +
			"With --set NAME=VALUE the model is checked with that input changed: a value\n" +
			"that makes it invalid (probabilities no longer summing to 1) is reported at\n" +
			"the lines it breaks, and the options dominated are those of the changed model.",
		Flags: []cli.Flag{
			&cli.IntFlag{Name: "warnings", Value: 50, Usage: "show at most `N` warnings (-1: all); errors are always all shown"},
			setFlag(),
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			l, err := loadModel(c)
			if err != nil {
				return err
			}
			if !l.Compiled.HasTree() {
				printLimited(c, l.Diags, l.Name, l.Src, c.Int("warnings"), "run with --warnings -1 to see them all")
				fmt.Fprintf(c.App.Writer, "%s: ok: no tree, %s, %d warning%s\n", l.Name, registersSummary(l.Model), len(l.Diags), plural(len(l.Diags)))
				return nil
			}
			sol, err := eval.Solve(l.Compiled)
			if err != nil {
				return modelErr("%v", err)
			}
			ds := append(l.Diags, eval.Dominated(sol)...).Sort()
			printLimited(c, ds, l.Name, l.Src, c.Int("warnings"), "run with --warnings -1 to see them all")
			regs := ""
			if len(l.Model.Registers) > 0 {
				regs = ", " + registersSummary(l.Model)
			}
			fmt.Fprintf(c.App.Writer, "%s: ok: %d nodes%s, %d warning%s\n", l.Name, len(sol.Nodes()), regs, len(ds), plural(len(ds)))
			return nil
		},
	}
}

func examplesCommand() *cli.Command {
	return &cli.Command{
		Name:      "examples",
		Usage:     "list the example models built in, or print one",
		ArgsUsage: "[NAME]",
		UsageText: "forkcast examples            list them\n" +
			"   forkcast examples sourcing   print one (save it with > sourcing.fork)\n" +
			"   forkcast solve example:sourcing",
		Description: "The examples are invented scenarios, built into the binary so that a fresh\n" +
			"install can show a worked model with no files at hand. Any command that takes\n" +
			"a FILE also takes example:NAME.",
		Action: func(c *cli.Context) error {
			w := c.App.Writer
			switch c.NArg() {
			case 0:
				width := 12
				for _, name := range append(examples.Names(), examples.Registers()...) {
					width = max(width, len(name))
				}
				for _, name := range examples.Names() {
					ex, _ := examples.Get(name)
					fmt.Fprintf(w, "%-*s %s\n", width, name, ex.Summary())
				}
				fmt.Fprintln(w, "\nprint one with `forkcast examples NAME`; solve one with `forkcast solve example:NAME`")
				if regs := examples.Registers(); len(regs) > 0 {
					fmt.Fprintln(w, "\nRisk registers (no tree):")
					for _, name := range regs {
						ex, _ := examples.Get(name)
						fmt.Fprintf(w, "%-*s %s\n", width, name, ex.Summary())
					}
					fmt.Fprintln(w, "\nquantify one with `forkcast register example:NAME`")
				}
				return nil
			case 1:
				ex, ok := examples.Get(c.Args().First())
				if !ok {
					return usageErr("no example %q; the examples are: %s", c.Args().First(), strings.Join(append(examples.Names(), examples.Registers()...), ", "))
				}
				_, err := w.Write(ex.Source)
				return err
			}
			return usageErr("examples takes at most one NAME")
		},
	}
}

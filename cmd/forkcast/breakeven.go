package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/report"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func breakevenCommand() *cli.Command {
	return &cli.Command{
		Name:      "breakeven",
		Usage:     "find where the best option changes as one input varies",
		ArgsUsage: "FILE",
		UsageText: "forkcast breakeven --vary NAME [--in LOW..HIGH] [--at DECISION] [--json] [--set NAME=VALUE]... FILE\n\n" +
			"   forkcast breakeven examples/sourcing.fork --vary licence\n" +
			"   forkcast breakeven examples/release.fork --vary defect:Defective --in 0..50%\n" +
			"   forkcast breakeven examples/sourcing.fork --vary 'Integration with the fare back office/Clean'\n" +
			"   forkcast breakeven examples/release.fork --vary recall --in 20_000..900_000 --at Release\n" +
			"   forkcast breakeven example:sourcing --vary licence --set p_late=45%",
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
			"   risk-tolerance      the risk tolerance of an exponential utility: where the\n" +
			"                       choice by certainty equivalent switches (approximate;\n" +
			"                       default range a thousandth to a thousand times the\n" +
			"                       spread of the decision's payoffs; see docs/risk.md)\n" +
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
			"A switch is exact when the two options' values are equal there exactly; one\n" +
			"that is no finite decimal is shown as a fraction, the decimal rounded beside it:\n" +
			"   Switch at licence = 301,000 (exact)\n" +
			"   Switch at p_defect = 52/1077 (exact; ≈ 4.8282%)\n" +
			"Otherwise (an input that enters the values non-linearly, such as a probability\n" +
			"used twice on one path) it is found to " + fmt.Sprint(compiled.DivisionScale) + " decimal places and marked\n" +
			"approximate:  Switch at p ≈ 54.7723% (approximate, to " + fmt.Sprint(compiled.DivisionScale) + " decimal places).\n" +
			"Under each switch: every option's expected value there (they tie). --json\n" +
			"carries every figure exactly, and an exact switch's \"fraction\".",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "vary", Usage: "the input to vary: `NAME`, UNCERTAINTY:STATE, NODE/BRANCH or risk-tolerance"},
			&cli.StringFlag{Name: "in", Usage: "search `LOW..HIGH` (default: the parameter's own range, or 0..1 for a probability)"},
			&cli.StringFlag{Name: "at", Usage: "watch the decision with this `LABEL`"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON, values as exact decimal strings"},
			&cli.IntFlag{Name: "max-samples", Value: eval.DefaultMaxSamples, Usage: "stop the search after `N` rollbacks"},
			setFlag(),
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			if !c.IsSet("vary") || strings.TrimSpace(c.String("vary")) == "" {
				return usageErr("breakeven needs --vary NAME (a parameter), UNCERTAINTY:STATE or NODE/BRANCH")
			}
			if v := strings.TrimSpace(c.String("vary")); v == "risk-tolerance" || v == "risk_tolerance" {
				l, err := loadModel(c)
				if err != nil {
					return err
				}
				if varyTolerance(v, l) {
					l.printWarnings(c)
					return toleranceBreakeven(c, l)
				}
			}
			v, err := eval.ParseVary(c.String("vary"))
			if err != nil {
				return usageErr("--vary: %v", err)
			}
			opts := eval.BreakevenOptions{Vary: v, At: c.String("at"), MaxSamples: c.Int("max-samples")}
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
			if err != nil {
				return analysisErr(err)
			}
			return show(c, report.Breakeven(l.Compiled, be, report.BreakevenOptions{Names: flagNames()}))
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
	switch {
	case err != nil:
	case lo.GreaterThan(hi):
		err = fmt.Errorf("the range %s runs downwards: write the smaller bound first", s)
	case lo.Equal(hi):
		err = fmt.Errorf("the range %s is empty: give a LOW below HIGH (to answer at one value, use --set NAME=VALUE)", s)
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

package main

import (
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
	"github.com/urfave/cli/v2"
)

func sweepCommand() *cli.Command {
	return &cli.Command{
		Name:      "sweep",
		Usage:     "every option's value over a range of one input, or a two-way strategy map of two",
		ArgsUsage: "FILE",
		UsageText: "forkcast sweep --vary INPUT [--vary INPUT2] [--in LOW..HIGH]... [--steps N]\n" +
			"       [--at DECISION] [--csv | --json] [--chart FILE.svg|.png] FILE\n\n" +
			"   forkcast sweep examples/sourcing.fork --vary licence\n" +
			"   forkcast sweep examples/sourcing.fork --vary licence --steps 8 --csv > licence.csv\n" +
			"   forkcast sweep examples/release.fork --vary p_defect --in 0..50% --chart sweep.svg\n" +
			"   forkcast sweep examples/sourcing.fork --vary licence --vary lease_fee --in 250_000..450_000 \\\n" +
			"       --in 250_000..450_000 --chart map.png",
		Description: "With one --vary: every option's expected value at a decision over an evenly\n" +
			"spaced grid of the input, the best option at each point, and exactly where the\n" +
			"best option changes (as breakeven finds it).\n\n" +
			"With two --vary: a two-way strategy map, the best option in each cell of a grid\n" +
			"over both inputs (the first across, the second up), and the boundaries between\n" +
			"the options' regions: exact where the options' values are linear in the two\n" +
			"inputs (points on the grid lines are always exact; a boundary that bends, as\n" +
			"when a probability and an amount under it both move, is joined up between\n" +
			"them and marked approximate).\n\n" +
			"--vary names the input as breakeven takes it (NAME, UNCERTAINTY:STATE or\n" +
			"NODE/BRANCH) and may carry its range after =, e.g. --vary 'defect:Defective=0..50%'.\n" +
			"--in LOW..HIGH gives the ranges instead, in the order of the --vary flags.\n" +
			"Without a range a parameter uses its own `in LOW .. HIGH` and a probability\n" +
			"runs from 0 to 100%, cut where the model would stop being valid.\n\n" +
			"--steps N is the number of intervals of each grid (default 20: 21 values).\n" +
			"--csv writes the grid as comma-separated values (one row per point or cell,\n" +
			"exact figures), --json the whole result; --chart draws it (one line per option\n" +
			"with the switches marked, or the map with its regions labelled) as SVG or PNG.",
		Flags: []cli.Flag{
			&cli.GenericFlag{Name: "vary", Value: &repeated{}, Usage: "the `INPUT` to vary (NAME, UNCERTAINTY:STATE or NODE/BRANCH), with an optional =LOW..HIGH; twice for a strategy map"},
			&cli.GenericFlag{Name: "in", Value: &repeated{}, Usage: "the range `LOW..HIGH` of each --vary, in order"},
			&cli.IntFlag{Name: "steps", Value: eval.DefaultSweepSteps, Usage: "`N` intervals in each grid"},
			&cli.StringFlag{Name: "at", Usage: "watch the decision with this `LABEL`"},
			&cli.BoolFlag{Name: "csv", Usage: "print the grid as comma-separated values"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON, every figure an exact decimal string"},
			&cli.StringFlag{Name: "chart", Usage: "write the chart to `FILE` (.svg or .png)"},
			&cli.IntFlag{Name: "max-samples", Value: eval.DefaultSweepMaxSamples, Usage: "stop after `N` rollbacks"},
			setFlag(),
			maxNodesFlag,
		},
		Action: sweepAction,
	}
}

func sweepAction(c *cli.Context) error {
	specs, ins := repeatedValues(c, "vary"), repeatedValues(c, "in")
	switch {
	case len(specs) == 0:
		return usageErr("sweep needs --vary INPUT (twice for a two-way strategy map)")
	case len(specs) > 2:
		return usageErr("sweep varies one input, or two for a strategy map; got %d --vary", len(specs))
	case len(ins) > len(specs):
		return usageErr("%d --in for %d --vary: give one range for each input, in order", len(ins), len(specs))
	case c.Bool("csv") && c.Bool("json"):
		return usageErr("--csv and --json: choose one")
	}
	if c.Int("steps") < 1 {
		return usageErr("--steps %d: give at least 1", c.Int("steps"))
	}
	var vrs []eval.VaryRange
	for k, s := range specs {
		vr, err := parseVaryRange(s)
		if err != nil {
			return usageErr("--vary: %v", err)
		}
		if k < len(ins) {
			if vr.Low != nil {
				return usageErr("--vary %s already has a range; drop its --in, or the range after =", shown(s))
			}
			lo, hi, err := parseRange(ins[k])
			if err != nil {
				return usageErr("--in: %v", err)
			}
			vr.Low, vr.High = &lo, &hi
		}
		vrs = append(vrs, vr)
	}
	out, err := chartTarget(c, "chart")
	if err != nil {
		return err
	}
	l, err := loadModel(c)
	if err != nil {
		return err
	}
	l.printWarnings(c)
	if !hasDecision(l.Compiled) {
		return usageErr("%s has no decision, so a sweep has no options to compare; to see how its expected value moves with %s, run\n  forkcast sensitivity %s --vary %s --spider spider.svg",
			l.Name, vrs[0].Vary, shellWord(fileArgOf(c)), shellWord(specs[0]))
	}
	names := report.SweepOptions{Names: flagNames()}
	if len(vrs) == 1 {
		prog, stop := progress(c, "sweep: points done")
		sw, err := eval.SweepInput(c.Context, l.Compiled, eval.SweepOptions{Vary: vrs[0], Steps: c.Int("steps"), At: c.String("at"), MaxSamples: c.Int("max-samples"), Progress: prog})
		stop()
		if err != nil {
			return analysisErr(err)
		}
		r := report.Sweep(l.Compiled, sw, names)
		if err := out.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteSweep(w, r.Chart(), o) }); err != nil {
			return err
		}
		if c.Bool("csv") {
			return r.WriteCSV(c.App.Writer)
		}
		return show(c, r)
	}
	if c.Int("steps") > eval.MaxMapSteps {
		return usageErr("--steps %d: a strategy map takes at most %d", c.Int("steps"), eval.MaxMapSteps)
	}
	prog, stop := progress(c, "strategy map: grid lines done")
	mp, err := eval.MapStrategies(c.Context, l.Compiled, eval.MapOptions{X: vrs[0], Y: vrs[1], Steps: c.Int("steps"), At: c.String("at"), MaxSamples: c.Int("max-samples"), Progress: prog})
	stop()
	if err != nil {
		return analysisErr(err)
	}
	r := report.StrategyMap(l.Compiled, mp, names)
	if err := out.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteStrategyMap(w, r.Chart(), o) }); err != nil {
		return err
	}
	if c.Bool("csv") {
		return r.WriteCSV(c.App.Writer)
	}
	return show(c, r)
}

// hasDecision reports whether the model has a decision node.
func hasDecision(c *compiled.Model) bool {
	for i := 0; i < c.Len(); i++ {
		if c.Kind(i) == tree.KindDecision {
			return true
		}
	}
	return false
}

// fileArgOf is the FILE argument as given.
func fileArgOf(c *cli.Context) string { return c.Args().First() }

// shellWord quotes s for a shell when it holds anything but plain
// characters, so that a command quoted in a message can be pasted.
func shellWord(s string) string {
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("-_./=%:,+", r)) {
			return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
		}
	}
	return s
}

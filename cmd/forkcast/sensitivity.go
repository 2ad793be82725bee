package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

// defaultSpiderPoints is how many intervals each spider line is drawn
// over when --points is not given.
const defaultSpiderPoints = 20

func sensitivityCommand() *cli.Command {
	return &cli.Command{
		Name:      "sensitivity",
		Usage:     "which inputs the expected value hangs on: a table, a tornado and a spider diagram",
		ArgsUsage: "FILE",
		UsageText: "forkcast sensitivity [--vary INPUT[=LOW..HIGH]]... [--pct N] [--at DECISION]\n" +
			"       [--json] [--tornado FILE.svg|.png] [--spider FILE.svg|.png] FILE\n\n" +
			"   forkcast sensitivity examples/sourcing.fork\n" +
			"   forkcast sensitivity examples/sourcing.fork --pct 20 --tornado tornado.svg\n" +
			"   forkcast sensitivity examples/release.fork --vary 'defect:Defective=5%..40%' --spider spider.png\n" +
			"   forkcast sensitivity examples/expansion.fork --vary demand:Strong=25%..55% --json",
		Description: "Moves each input from its low to its high value, one at a time with the others\n" +
			"at their base values, and reports what that does to the expected value: the\n" +
			"value at each end with every decision re-optimised, the swing between them\n" +
			"(largest first), where inside the range the best option changes (exactly, as\n" +
			"breakeven finds it) and which option is best on each side, and the value of\n" +
			"today's policy held fixed at each end: the difference is what re-deciding\n" +
			"would be worth.\n\n" +
			"Inputs varied: every `let` with a range (`in LOW .. HIGH`); with --pct N also\n" +
			"every `let` without one, by ±N% of its value; and each --vary:\n" +
			"   NAME                a `let` parameter (over its own range, or ±N%)\n" +
			"   UNCERTAINTY:STATE   the probability of a state of a named uncertainty\n" +
			"   NODE/BRANCH         the probability of a branch of a plain chance node\n" +
			"A range may follow after =, e.g. --vary 'delivery:Late=20%..50%'; without one a\n" +
			"probability moves by ±N% of its value with --pct, else over 0 to 100%. When a\n" +
			"probability moves, the sibling marked `rest` takes up the difference (without\n" +
			"one the others are rescaled in proportion); a range is cut where the model\n" +
			"would stop being valid, and the output says so.\n\n" +
			"The value is the root's expected value, or with --at the value of that\n" +
			"decision; the best option is watched at --at, else at the root (or the first\n" +
			"decision on the best path). A tree with no decision works too: its expected\n" +
			"value is varied, and there is no best option to change.\n\n" +
			"--tornado draws one bar per input from its value at low to its value at high\n" +
			"around the base value, largest swing on top, a mark where the best option\n" +
			"changes. --spider draws the value against each input's change from its base\n" +
			"value (in % of base). Both are written as SVG or PNG by the file's extension.",
		Flags: []cli.Flag{
			&cli.GenericFlag{Name: "vary", Value: &repeated{}, Usage: "also vary `INPUT` (NAME, UNCERTAINTY:STATE or NODE/BRANCH), with an optional =LOW..HIGH; repeat it for several"},
			&cli.StringFlag{Name: "pct", Usage: "vary every input with no range by ±`N`% of its value (e.g. 20)"},
			&cli.StringFlag{Name: "at", Usage: "report the value of the decision with this `LABEL` and watch its best option"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON, every figure an exact decimal string"},
			&cli.StringFlag{Name: "tornado", Usage: "write the tornado diagram to `FILE` (.svg or .png)"},
			&cli.StringFlag{Name: "spider", Usage: "write the spider diagram to `FILE` (.svg or .png)"},
			&cli.IntFlag{Name: "points", Usage: "work out each input's value curve at `N`+1 evenly spaced values as well as the ends, the base and the switches",
				DefaultText: fmt.Sprintf("%d with --spider, else 0", defaultSpiderPoints)},
			&cli.IntFlag{Name: "max-samples", Value: eval.DefaultSensitivityMaxSamples, Usage: "stop after `N` rollbacks in all"},
			setFlag(),
			maxNodesFlag,
		},
		Action: sensitivityAction,
	}
}

func sensitivityAction(c *cli.Context) error {
	opts := eval.SensitivityOptions{At: c.String("at"), MaxSamples: c.Int("max-samples"), Points: c.Int("points")}
	for _, s := range repeatedValues(c, "vary") {
		vr, err := parseVaryRange(s)
		if err != nil {
			return usageErr("--vary: %v", err)
		}
		opts.Vary = append(opts.Vary, vr)
	}
	if c.IsSet("pct") {
		p, err := parsePercent(c.String("pct"))
		if err != nil {
			return usageErr("--pct: %v", err)
		}
		opts.Pct = &p
	}
	if opts.Points > eval.MaxCurvePoints {
		return usageErr("--points %d: give at most %d", opts.Points, eval.MaxCurvePoints)
	}
	tornado, err := chartTarget(c, "tornado")
	if err != nil {
		return err
	}
	spider, err := chartTarget(c, "spider")
	if err != nil {
		return err
	}
	if spider != nil && !c.IsSet("points") {
		opts.Points = defaultSpiderPoints
	}
	l, err := loadModel(c)
	if err != nil {
		return err
	}
	l.printWarnings(c)
	var stop func()
	opts.Progress, stop = progress(c, "sensitivity: inputs done")
	s, err := eval.AnalyseSensitivity(c.Context, l.Compiled, opts)
	stop()
	if err != nil {
		return analysisErr(err)
	}
	r := report.Sensitivity(l.Compiled, s, report.SensitivityOptions{Names: flagNames()})
	if err := tornado.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteTornado(w, r.Tornado(), o) }); err != nil {
		return err
	}
	if err := spider.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteSpider(w, r.Spider(), o) }); err != nil {
		return err
	}
	return show(c, r)
}

// parseVaryRange reads INPUT or INPUT=LOW..HIGH; the = that starts the
// range is the last one outside double quotes (inside them a backslash
// escapes the next character, as eval.ParseVary reads them).
func parseVaryRange(s string) (eval.VaryRange, error) {
	spec, rng, hasRange := s, "", false
	inQuote := false
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case '\\':
			if inQuote {
				i++
			}
		case '"':
			inQuote = !inQuote
		case '=':
			if !inQuote {
				spec, rng, hasRange = s[:i], s[i+1:], true
			}
		}
	}
	v, err := eval.ParseVary(spec)
	if err != nil {
		return eval.VaryRange{}, err
	}
	vr := eval.VaryRange{Vary: v}
	if hasRange {
		lo, hi, err := parseRange(rng)
		if err != nil {
			return eval.VaryRange{}, fmt.Errorf("%s: %v", shown(s), err)
		}
		vr.Low, vr.High = &lo, &hi
	}
	return vr, nil
}

// parsePercent reads a percentage: 20 or 20% both mean a fifth.
func parsePercent(s string) (decimal.Decimal, error) {
	s = strings.TrimSpace(s)
	p, err := parseNumber(s)
	if err != nil {
		return p, err
	}
	if !strings.HasSuffix(s, "%") {
		p = p.Shift(-2)
	}
	if !p.IsPositive() {
		return p, fmt.Errorf("%s: give a percentage above 0, e.g. 20 for ±20%%", shown(s))
	}
	return p, nil
}

package main

import (
	"io"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func profileCommand() *cli.Command {
	return &cli.Command{
		Name:      "profile",
		Usage:     "risk profiles: the spread of outcomes of each option, and which options dominate",
		ArgsUsage: "FILE",
		UsageText: "forkcast profile [--at DECISION] [--threshold X] [--json] [--chart FILE [--bars]] FILE\n\n" +
			"   forkcast profile examples/tender.fork\n" +
			"   forkcast profile examples/tender.fork --chart profile.svg\n" +
			"   forkcast profile examples/sourcing.fork --chart mass.png --bars\n" +
			"   forkcast profile examples/release.fork --at Release --threshold 100_000 --json",
		Description: "For each option of a decision, the exact probability distribution of the\n" +
			"payoff when the option is taken and the best choices are made after it: every\n" +
			"distinct payoff with its probability, and in a table the expected value (the\n" +
			"option's EMV exactly), standard deviation, minimum, maximum, the percentiles\n" +
			"P5, P10, P50, P90 and P95 (each the smallest payoff whose cumulative\n" +
			"probability reaches 5%, 10%, …), and the chance of a loss: of a payoff below\n" +
			"0, or under `objective min` of a cost above 0 (--threshold moves that line).\n" +
			"Payoffs are counted from the decision on: the option's own cash and all after\n" +
			"it. A tree with no decision gets one profile, of the whole tree.\n\n" +
			"Then every pair of options is compared by stochastic dominance: first order\n" +
			"(better for every decision maker who prefers more to less) and second order\n" +
			"(better for every one who also is averse to risk).\n\n" +
			"--at names the decision (default: the root, or the first decision on the best\n" +
			"path when the root is not a decision), as in breakeven: LABEL, or\n" +
			"BRANCH/DECISION when several decisions share a label.\n\n" +
			"--chart FILE.svg or FILE.png draws the cumulative risk profiles of the options\n" +
			"on one chart (one step line each: the chance of this payoff or less); with\n" +
			"--bars it draws the probability of each payoff as bars instead.\n\n" +
			"With a risk tolerance (the model's `risk tolerance` line, or --risk-tolerance)\n" +
			"the choices after the decision are the risk-averse ones, and each option's\n" +
			"certainty equivalent and risk premium are added (rounded; see docs/risk.md).\n" +
			"--json carries every payoff, probability and summary figure as an exact\n" +
			"decimal string (the standard deviation and certainty equivalents rounded, and\n" +
			"said so).",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "at", Usage: "profile the options of the decision with this `LABEL`"},
			&cli.StringFlag{Name: "threshold", Usage: "a loss is a payoff below `X` (a cost above X under objective min)", Value: "0"},
			&cli.BoolFlag{Name: "json", Usage: "print the profiles as JSON: every payoff and probability, exact"},
			&cli.StringFlag{Name: "chart", Usage: "draw the cumulative risk profiles to `FILE` (.svg or .png)"},
			&cli.BoolFlag{Name: "bars", Usage: "with --chart, draw the probability of each payoff as bars"},
			&cli.IntFlag{Name: "outcomes", Value: report.DefaultOutcomes, Usage: "list at most `N` payoffs per option in the text (0: none, -1: all)"},
			setFlag(),
			riskToleranceFlag(),
			&cli.IntFlag{Name: "max-paths", Value: eval.DefaultMaxOutcomes, Usage: "stop after `N` paths"},
			maxNodesFlag,
		},
		Action: profileAction,
	}
}

func profileAction(c *cli.Context) error {
	threshold, err := parseNumber(c.String("threshold"))
	if err != nil {
		return usageErr("--threshold: %v", err)
	}
	target, err := chartTarget(c, "chart")
	if err != nil {
		return err
	}
	if c.Bool("bars") && target == nil {
		return usageErr("--bars draws the chart of --chart FILE; give both")
	}
	l, sol, err := loadAndSolve(c)
	if err != nil {
		return err
	}
	rs, err := riskSolution(c, l, sol)
	if err != nil {
		return err
	}
	if rs != nil {
		sol = rs.Averse // the risk-averse choices after the decision
	}
	ps, err := eval.RiskProfiles(c.Context, sol, eval.ProfileOptions{At: c.String("at"), Threshold: &threshold, MaxOutcomes: c.Int("max-paths")})
	if err != nil {
		return analysisErr(err)
	}
	if target != nil {
		pr := profileChart(l.Model, ps)
		draw := chart.WriteProfiles
		if c.Bool("bars") {
			draw = chart.WriteMass
		}
		if err := target.write(c, func(w io.Writer, opt chart.Options) error { return draw(w, pr, opt) }); err != nil {
			return err
		}
	}
	return show(c, report.Profile(l.Compiled, ps, report.ProfileOptions{Risk: rs, Outcomes: c.Int("outcomes"), NoOutcomes: c.Int("outcomes") == 0, Names: flagNames()}))
}

// profileChart is the chart data of the profiles.
func profileChart(m *tree.Model, ps *eval.Profiles) chart.Profiles {
	what := "Payoff"
	if m.Objective == tree.Min {
		what = "Cost"
	}
	if ps.Decision != nil {
		what += " from the decision on"
	}
	if m.Currency != "" {
		what += " (" + strings.TrimSpace(strings.TrimPrefix(render.Money(decimal.Zero, m.Currency), render.Amount(decimal.Zero, m.Currency))) + ")"
	}
	title := "Risk profile of the whole tree"
	if ps.Decision != nil {
		title = "Risk profiles: " + ps.Decision.Display()
	}
	pr := chart.Profiles{Title: title, Value: chart.Axis{Label: what}}
	lo, hi := 0.0, 0.0
	for k, p := range ps.Options {
		d := chart.Distribution{Label: p.Label}
		if ps.Decision == nil {
			d.Label = "whole tree"
		}
		for _, o := range p.Outcomes {
			d.Outcomes = append(d.Outcomes, chart.Outcome{Value: o.Value.InexactFloat64(), Probability: o.Probability.InexactFloat64()})
		}
		pmin, pmax := p.Min.InexactFloat64(), p.Max.InexactFloat64()
		if k == 0 || pmin < lo {
			lo = pmin
		}
		if k == 0 || pmax > hi {
			hi = pmax
		}
		pr.Options = append(pr.Options, d)
	}
	// The loss threshold, where it falls among the payoffs (a line far
	// outside them would squeeze the chart).
	if t := ps.Threshold.InexactFloat64(); t > lo && t < hi {
		pr.References = append(pr.References, chart.Mark{At: t, Label: "loss threshold"})
	}
	return pr
}

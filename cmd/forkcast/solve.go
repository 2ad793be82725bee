package main

import (
	"github.com/forkcast/forkcast/report"
	"github.com/urfave/cli/v2"
)

func solveCommand() *cli.Command {
	return &cli.Command{
		Name:      "solve",
		Usage:     "roll the tree back: the best policy and its expected value",
		ArgsUsage: "FILE",
		UsageText: "forkcast solve [--json] [--no-tree] [--set NAME=VALUE]... [--risk-tolerance AMOUNT] FILE\n\n" +
			"   forkcast solve examples/sourcing.fork\n" +
			"   forkcast solve example:sourcing --set licence=280_000    as if the licence cost 280,000\n" +
			"   forkcast solve example:release --json > solved.json\n" +
			"   cat model.json | forkcast solve -",
		Description: "Reads the model, rolls the tree back with exact decimal arithmetic and prints:\n" +
			"the expected value (EV) of the whole tree; the recommended policy, decision by\n" +
			"decision, with the EV of every option and the margin of the best over the\n" +
			"runner-up; and the tree as indented text, where each figure says what it counts:\n" +
			"   EV from here   at a node: what follows it, not the cash on the branch into it\n" +
			"   option EV      at each option of a decision: its value with its own cash;\n" +
			"                  the figures the decision compares\n" +
			"   path total     at an end: all the cash from the root to it, beside the\n" +
			"                  path probability (the chance of ending there when every\n" +
			"                  decision on the way is taken as the path takes it)\n" +
			"(under objective min: expected cost from here, option expected cost, path\n" +
			"total cost). * marks the option the policy takes, = one tied with it, x one it\n" +
			"rejects.\n\n" +
			"--set NAME=VALUE answers for the model with an input (a `let`) at another\n" +
			"value, exactly as if its `let` line said so; give it once per input.\n\n" +
			"Money is rounded to the currency's minor unit for display; --json carries the\n" +
			"full exact values. An expected value is a long-run average over many such\n" +
			"decisions, not the outcome of this one: the path totals show the spread, and\n" +
			"forkcast profile shows it option by option.\n\n" +
			"With a risk tolerance (the model's `risk tolerance AMOUNT` line, or\n" +
			"--risk-tolerance) the tree is rolled back on certainty equivalents of an\n" +
			"exponential utility instead: every decision takes the option with the largest\n" +
			"certainty equivalent, every option shows its expected value, certainty\n" +
			"equivalent and risk premium, and the report says where the risk-averse policy\n" +
			"differs from the expected-value one and what that caution costs. Certainty\n" +
			"equivalents are rounded to 15 significant digits (exp and ln in float64).",
		Flags: []cli.Flag{
			&cli.BoolFlag{Name: "json", Usage: "print the solved tree as JSON (the interchange format, every node with \"value\", every decision with \"best\")"},
			&cli.BoolFlag{Name: "no-tree", Usage: "leave out the indented tree (for big models)"},
			setFlag(),
			riskToleranceFlag(),
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			l, sol, err := loadAndSolve(c)
			if err != nil {
				return err
			}
			rs, err := riskSolution(c, l, sol)
			if err != nil {
				return err
			}
			return show(c, report.Solve(sol, report.SolveOptions{OmitTree: c.Bool("no-tree"), Risk: rs}))
		},
	}
}

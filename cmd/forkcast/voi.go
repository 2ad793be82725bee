package main

import (
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/report"
	"github.com/urfave/cli/v2"
)

func voiCommand() *cli.Command {
	return &cli.Command{
		Name:      "voi",
		Usage:     "value of information: what it is worth to know more before deciding (EVPI, EVSI)",
		ArgsUsage: "FILE",
		UsageText: "forkcast voi [--json] [--set NAME=VALUE]... FILE\n\n" +
			"   forkcast voi examples/release.fork\n" +
			"   forkcast voi example:release --json\n" +
			"   forkcast voi example:release --set p_defect=10%    is the test worth it at a 10% defect rate?",
		Description: "Prints what information is worth before the first decision, in the model's\n" +
			"money (a saving under `objective min`):\n\n" +
			"EVPI, the expected value of perfect information: for everything uncertain\n" +
			"together and for each named uncertainty, how much better the tree would be if\n" +
			"the uncertainty were known before the first decision, over the best plan in\n" +
			"the tree. It is an upper bound: no test, survey or study of that uncertainty\n" +
			"can be worth more. (\"Everything\" is every named uncertainty and every plain\n" +
			"chance node, each its own event; when that is too much work, the named\n" +
			"uncertainties only, and the output says so.)\n\n" +
			"For each `test` declared in the model: Bayes' rule at the prior (likelihoods\n" +
			"P(reading | state), joint and marginal probabilities, posteriors), and at each\n" +
			"decision with a branch that runs the test:\n" +
			"   EVSI                 the expected value of the test's information alone:\n" +
			"                        what the decision is worth with it, before any cost,\n" +
			"                        over the best other branch\n" +
			"   other cost           money on the testing branch that is not the test's\n" +
			"                        (a delay, a set-up), shown apart when there is some\n" +
			"   net gain of testing  EVSI minus the test's cost and the other costs\n" +
			"   most worth paying    the test's cost at which testing breaks even\n" +
			"   efficiency           EVSI / EVPI of the tested uncertainty at that decision\n" +
			"and the recommendation: test or not.\n\n" +
			"The figures are exact; money is shown rounded to the currency's minor unit and\n" +
			"--json carries every value in full.",
		Flags: []cli.Flag{
			&cli.BoolFlag{Name: "json", Usage: "print the analysis as JSON: \"evpi\" (the total), \"uncertainties\" and \"tests\", values as exact decimal strings"},
			&cli.IntFlag{Name: "max-scenarios", Value: eval.DefaultMaxScenarios, Usage: "enumerate at most `N` joint states of the named uncertainties for the total EVPI"},
			&cli.IntFlag{Name: "max-work", Value: eval.DefaultMaxWork, Usage: "stop each part of the analysis after `N` node evaluations"},
			setFlag(),
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			_, sol, err := loadAndSolve(c)
			if err != nil {
				return err
			}
			info, err := eval.ValueOfInformation(c.Context, sol, eval.VOIOptions{MaxScenarios: c.Int("max-scenarios"), MaxWork: c.Int("max-work")})
			if err != nil {
				return analysisErr(err)
			}
			return show(c, report.VOI(sol, info, report.VOIOptions{Names: flagNames()}))
		},
	}
}

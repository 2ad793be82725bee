package main

import (
	"context"
	"errors"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/report"
	"github.com/urfave/cli/v2"
)

// flagNames are the command-line flags that stand for the library options
// the analyses' messages name, so that a note or an error tells a user of
// the command line what to type.
func flagNames() report.OptionNames {
	return report.OptionNames{
		"VOIOptions.MaxScenarios":       "--max-scenarios",
		"VOIOptions.MaxWork":            "--max-work",
		"BreakevenOptions.MaxSamples":   "--max-samples",
		"BreakevenOptions.Low and High": "--in LOW..HIGH",
		"SensitivityOptions.MaxSamples": "--max-samples",
		"SensitivityOptions.Pct":        "--pct N",
		"SensitivityOptions.Vary":       "--vary",
		"SweepOptions.MaxSamples":       "--max-samples",
		"ToleranceOptions.MaxSamples":   "--max-samples",
		"ProfileOptions.MaxOutcomes":    "--max-paths",
	}
}

// show prints a report: its JSON with --json, else its text; nothing when
// the command was interrupted meanwhile.
func show(c *cli.Context, r report.Report) error {
	if c.Context.Err() != nil {
		return interruptedErr()
	}
	if c.Bool("json") {
		return r.WriteJSON(c.App.Writer)
	}
	return r.WriteText(c.App.Writer)
}

// analysisErr is the exit error for an analysis that stopped: interrupted
// (Ctrl-C), a request that does not fit the model (a usage error), or a
// problem with the model; messages name the flags, not the library's
// options.
func analysisErr(err error) error {
	var re *eval.RequestError
	switch {
	case errors.Is(err, context.Canceled):
		return interruptedErr()
	case errors.As(err, &re):
		return usageErr("%s", flagNames().Apply(re.Error()))
	}
	return modelErr("%s", flagNames().Apply(err.Error()))
}

// interruptedErr is the exit error of a command stopped by Ctrl-C.
func interruptedErr() error {
	return cli.Exit("interrupted; nothing was written", exitInterrupted)
}

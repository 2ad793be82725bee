package main

import (
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/report"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

// riskToleranceFlag decides as a risk-averse decision maker, overriding
// the model's own `risk tolerance`.
func riskToleranceFlag() *cli.StringFlag {
	return &cli.StringFlag{Name: "risk-tolerance", Usage: "decide on certainty equivalents of an exponential utility with risk tolerance `AMOUNT` (overrides the model's `risk tolerance` line; see docs/risk.md)"}
}

// riskTolerance is the risk tolerance to decide with: --risk-tolerance,
// else the model's own; nil for none.
func riskTolerance(c *cli.Context, l *loaded) (*decimal.Decimal, error) {
	if c.IsSet("risk-tolerance") {
		r, err := parseNumber(c.String("risk-tolerance"))
		if err != nil {
			return nil, usageErr("--risk-tolerance: %v", err)
		}
		if isPercentage(c.String("risk-tolerance")) {
			return nil, usageErr("--risk-tolerance %s: %s", shown(c.String("risk-tolerance")), notPercentage)
		}
		if r.Sign() <= 0 {
			return nil, usageErr("--risk-tolerance %s: a risk tolerance is a positive amount of money", shown(c.String("risk-tolerance")))
		}
		return &r, nil
	}
	if rt := l.Model.RiskTolerance; rt != nil {
		v := rt.Value()
		return &v, nil
	}
	return nil, nil
}

// notPercentage says why a risk tolerance written as a share is refused,
// as the model's `risk tolerance` line refuses one.
const notPercentage = "a risk tolerance is an amount of money, not a percentage: write e.g. 250_000"

// isPercentage reports whether a number (or a range of them) was written
// with %: ParseNumber reads 10% as 0.1, which is no amount of money.
func isPercentage(s string) bool { return strings.Contains(s, "%") }

// riskSolution solves sol on certainty equivalents when a risk tolerance
// is given (nil otherwise).
func riskSolution(c *cli.Context, l *loaded, sol *eval.Solution) (*eval.RiskSolution, error) {
	r, err := riskTolerance(c, l)
	if err != nil || r == nil {
		return nil, err
	}
	rs, err := eval.SolveRiskAverse(sol, *r)
	if err != nil {
		return nil, analysisErr(err)
	}
	return rs, nil
}

// varyTolerance reports whether --vary names the risk tolerance:
// risk-tolerance, or risk_tolerance when the model has no input of that
// name.
func varyTolerance(vary string, l *loaded) bool {
	v := strings.TrimSpace(vary)
	if v == "risk-tolerance" {
		return true
	}
	if v != "risk_tolerance" {
		return false
	}
	_, isInput := l.Compiled.InputNamed(v)
	return !isInput
}

// toleranceBreakeven runs `breakeven --vary risk-tolerance`.
func toleranceBreakeven(c *cli.Context, l *loaded) error {
	opts := eval.ToleranceOptions{At: c.String("at"), MaxSamples: c.Int("max-samples")}
	if c.IsSet("in") {
		lo, hi, err := parseRange(c.String("in"))
		if err != nil {
			return usageErr("--in: %v", err)
		}
		if isPercentage(c.String("in")) {
			return usageErr("--in %s: %s", shown(c.String("in")), notPercentage)
		}
		opts.Low, opts.High = &lo, &hi
	}
	sol, err := eval.Solve(l.Compiled)
	if err != nil {
		return modelErr("%v", err)
	}
	tb, err := eval.FindToleranceBreakeven(c.Context, sol, opts)
	if err != nil {
		return analysisErr(err)
	}
	return show(c, report.Tolerance(l.Compiled, tb, report.BreakevenOptions{Names: flagNames()}))
}

// noteRiskIgnored says, on standard error, that a command which compares
// expected values leaves the model's risk tolerance aside, so that nobody
// takes its answer for the risk-averse one.
func noteRiskIgnored(c *cli.Context, l *loaded) {
	if l.Model.RiskTolerance == nil {
		return
	}
	switch c.Command.Name {
	case "solve", "profile", "check":
		return
	case "breakeven":
		if v := strings.TrimSpace(c.String("vary")); v == "risk-tolerance" || v == "risk_tolerance" {
			return
		}
	}
	fmt.Fprintf(c.App.ErrWriter, "%s: note: %s compares expected values; the model's risk tolerance is used by solve and profile only\n", l.Name, c.Command.Name)
}

// Package report turns the results of forkcast's analyses into reports:
// values that write a plain-text report for people (WriteText) and the
// documented JSON shape for programs (WriteJSON, or encoding/json through
// MarshalJSON). The command line prints these same values, so a program
// that embeds forkcast shows its users exactly what `forkcast solve`,
// `forkcast voi` and `forkcast breakeven` show.
//
//	sol, _ := eval.Solve(c)
//	report.Solve(sol, report.SolveOptions{}).WriteText(os.Stdout)
//
// One file per analysis: solve.go (the policy and the tree), voi.go (value
// of information), breakeven.go (where the best option changes). Text
// rounds money to the currency's minor unit; JSON carries every figure as
// an exact decimal string. The same result gives byte-identical output.
//
// Nothing in the package prints on its own or keeps state between calls.
package report

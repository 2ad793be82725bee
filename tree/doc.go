// Package tree holds the decision-tree model that every other part of
// forkcast works on: decision, chance and end nodes, branches with
// probabilities and cash flows, named parameters, named uncertainties and
// imperfect tests on them.
//
// A model is built from text by package lang, from JSON by package interchange, or by
// a Go program with the builder functions ([Decision], [Chance], [Choice],
// [Outcome]). Numbers are held as expressions ([Expr]) so that an analysis can
// vary a parameter and resolve the model again; [Model.Resolve] turns them
// into exact decimals and reports every problem it finds as a [Diagnostic]
// with a source position.
//
// Cash flows are stored in the objective's own terms: a payoff under
// [Max], a cost under [Min]. The package imports no other forkcast package
// and has no package-level mutable state.
package tree

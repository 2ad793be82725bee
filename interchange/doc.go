// Package interchange reads and writes decision models in forkcast's JSON
// interchange format, for programs that generate or consume models
// (docs/json.md describes the format, every key and the limits).
//
// The format carries everything the text language does: inputs with their
// ranges, named uncertainties, imperfect tests and the tree, every figure
// either a plain number or a calculation written in the text language's
// syntax (read with lang.ParseExpr). [Read] reads a model as a stream, in
// memory proportional to the model it builds, with the line and column of
// the JSON text on every problem; [Write] writes one, and with a compiled
// model and a solution it writes what `forkcast solve --json` prints, which
// reads back as the same model.
//
//	m, ds := interchange.ReadBytes(src, interchange.Options{})
//	if !ds.HasErrors() {
//		c, cs := compiled.Compile(m)
//		...
//	}
//
// Numbers are exact: never read through float64. The package has no
// mutable global state.
package interchange

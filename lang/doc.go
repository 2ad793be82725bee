// Package lang reads forkcast's text language: the `.fork` files in which a
// decision model is written (docs/language.md describes the language).
//
// [Parse] turns a file's text into a [tree.Model] and reports every
// syntax and structure problem in it, each with a position, a caret span and
// usually a hint; [Load] then compiles the model with [compiled.Compile],
// so that one call gives a checked model ready to solve and every
// diagnostic, errors and warnings together:
//
//	c, ds := lang.Load(src, lang.Options{})
//	if ds.HasErrors() {
//		ds.Print(os.Stderr, "model.fork", src)
//		return
//	}
//
// Reading works in three steps. A scanner splits the file into logical
// lines, measuring indentation and reporting tabs; a lexer splits each line
// into tokens (labels, numbers, words, signs), reporting stray characters
// and unterminated labels; then each line is parsed on its own, by a
// participle grammar chosen by the line's first word (with hand-written
// parts for expressions and for branch lines, which large models are made
// of), and a builder places it in the tree by its indentation. Because
// lines are parsed separately, a mistake on one line does not hide the
// mistakes on others, and no input can make the parser recurse deeply.
//
// Subtrees (`subtree` and `use`) are expanded by copying, after a check for
// cycles and a count of the nodes the expansion would make against
// [Options.NodeLimit]; nothing is built past the limit. All of this is
// iterative, so very deep trees read without exhausting the stack.
//
// A model may also hold risk registers (`register NAME` blocks, with
// their threats and opportunities), alone or beside a tree; a `let` may
// take a register's total or one risk as an input of the tree. Load
// compiles those inputs and checks every register's figures with package
// register, whose FromModel gives a register ready to analyse.
//
// Numbers are read exactly, as decimals. The package has no mutable global
// state; Parse and Load may be called concurrently.
package lang

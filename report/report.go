package report

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/tree"
)

// Report is an analysis result ready to show: a text report for people
// and a JSON document for programs. SolveReport, VOIReport and
// BreakevenReport are Reports.
type Report interface {
	// WriteText writes the report as plain text, money rounded to the
	// currency's minor unit.
	WriteText(w io.Writer) error
	// WriteJSON writes the report's JSON shape, indented, every figure an
	// exact decimal string, followed by a newline.
	WriteJSON(w io.Writer) error
	json.Marshaler
}

// OptionNames maps the names of library options that a message mentions
// (such as "VOIOptions.MaxScenarios") to the names the reader knows them
// by: a command-line flag, a field of a form. The analyses name their own
// options in the notes they attach to results; a program that shows the
// report to its users renames them here. Names not in the map are shown
// as they are.
type OptionNames map[string]string

// Apply rewrites msg with every option name in n replaced, the longest
// names first so that one name inside another is not replaced in part.
func (n OptionNames) Apply(msg string) string {
	if len(n) == 0 {
		return msg
	}
	keys := make([]string, 0, len(n))
	for k := range n {
		if k != "" {
			keys = append(keys, k)
		}
	}
	sort.Slice(keys, func(i, j int) bool {
		if len(keys[i]) != len(keys[j]) {
			return len(keys[i]) > len(keys[j])
		}
		return keys[i] < keys[j]
	})
	pairs := make([]string, 0, 2*len(keys))
	for _, k := range keys {
		pairs = append(pairs, k, n[k])
	}
	return strings.NewReplacer(pairs...).Replace(msg)
}

// textOut buffers a text report and keeps the first write error, so that
// the writing code reads as a list of lines.
type textOut struct {
	*bufio.Writer
}

func newTextOut(w io.Writer) textOut { return textOut{bufio.NewWriter(w)} }

func (t textOut) f(format string, args ...any) { fmt.Fprintf(t.Writer, format, args...) }
func (t textOut) ln(args ...any)               { fmt.Fprintln(t.Writer, args...) }

// writeJSON writes v indented, with &, < and > as they are (the output is
// read by programs and people, not embedded in HTML).
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

// marshalJSON is the compact form of what a report's WriteJSON writes.
func marshalJSON(write func(io.Writer) error) ([]byte, error) {
	var b bytes.Buffer
	if err := write(&b); err != nil {
		return nil, err
	}
	var out bytes.Buffer
	if err := json.Compact(&out, b.Bytes()); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// objectiveText says what the model asks for.
func objectiveText(m *tree.Model) string {
	if m.Objective == tree.Min {
		return "minimise expected cost"
	}
	return "maximise expected net value"
}

func quoted(s string) string { return strconv.Quote(s) }

// afterPath is ` (after "A" → "B")` for the branches taken from the root
// to a watched decision, and "" for a decision at the root.
func afterPath(path []string) string {
	if len(path) == 0 {
		return ""
	}
	return " (after " + strings.Join(quotedAll(path), " → ") + ")"
}

// quotedAll quotes each of xs.
func quotedAll(xs []string) []string {
	out := make([]string, len(xs))
	for i, x := range xs {
		out[i] = quoted(x)
	}
	return out
}

// textTable lays out rows in columns: each column as wide as its widest
// cell, cells left-aligned except in the columns marked right, columns
// gapped by gap spaces, no trailing blanks. A row of one cell (a heading)
// takes no part in the widths.
func textTable(w textOut, indent string, gap int, right []bool, rows [][]string) {
	var width []int
	for _, r := range rows {
		if len(r) < 2 {
			continue
		}
		for i, c := range r {
			if i >= len(width) {
				width = append(width, 0)
			}
			width[i] = max(width[i], len([]rune(c)))
		}
	}
	for _, r := range rows {
		var b strings.Builder
		b.WriteString(indent)
		for i, c := range r {
			if i > 0 {
				b.WriteString(strings.Repeat(" ", gap))
			}
			pad := 0
			if len(r) > 1 {
				pad = width[i] - len([]rune(c))
			}
			if i < len(right) && right[i] {
				b.WriteString(strings.Repeat(" ", pad))
				b.WriteString(c)
			} else {
				b.WriteString(c)
				b.WriteString(strings.Repeat(" ", pad))
			}
		}
		w.ln(strings.TrimRight(b.String(), " "))
	}
}

// chanceLink is, for one node, the nearest chance node above it (node -1
// when there is none) and the index of that node's branch on the way down.
type chanceLink struct{ node, via int }

// nearestChance gives every node's chanceLink in pre-order, in one forward
// sweep, so that a decision's conditions are found without walking up
// through the decisions between.
func nearestChance(sol *eval.Solution) []chanceLink {
	nodes := sol.Nodes()
	up := bulk.Make[chanceLink](len(nodes))
	for i := range nodes {
		up[i] = chanceLink{-1, -1}
		if par := nodes[i].Parent(); par != nil {
			if par.Node.Kind == tree.KindChance {
				up[i] = chanceLink{par.Index(), nodes[i].Via()}
			} else {
				up[i] = up[par.Index()]
			}
		}
	}
	return up
}

// maxConditions is how many chance outcomes a decision's "(if ...)" names,
// the nearest ones; more would make deep trees print the square of their
// depth.
const maxConditions = 4

// conditions is the chance outcomes on the way to s ("Integration = Rework").
func conditions(sol *eval.Solution, up []chanceLink, s *eval.Solved) string {
	nodes := sol.Nodes()
	l := up[s.Index()]
	return conditionText(func() (*eval.Solved, int, bool) {
		if l.node < 0 {
			return nil, 0, false
		}
		ch, via := &nodes[l.node], l.via
		l = up[l.node]
		return ch, via, true
	})
}

// conditionsAbove is conditions for a decision from PolicyDecisions.
func conditionsAbove(c *eval.Condition) string {
	return conditionText(func() (*eval.Solved, int, bool) {
		if c == nil {
			return nil, 0, false
		}
		ch, via := c.Chance, c.Via
		c = c.Up
		return ch, via, true
	})
}

// conditionText writes the chance outcomes that next gives, the nearest
// first, as "Market = High, Integration = Rework": the maxConditions
// nearest, top first, after an ellipsis when there are more.
func conditionText(next func() (chance *eval.Solved, via int, ok bool)) string {
	var parts []string
	for ch, via, ok := next(); ok; ch, via, ok = next() {
		if len(parts) == maxConditions {
			parts = append(parts, "…")
			break
		}
		parts = append(parts, fmt.Sprintf("%s = %s", ch.Node.Display(), quoted(ch.Node.Branches[via].Label)))
	}
	slices.Reverse(parts)
	return strings.Join(parts, ", ")
}

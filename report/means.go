package report

import (
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
)

// Exact analyses (solve, voi, breakeven, sensitivity, sweep, profile) use
// every input written as a distribution at its mean. Their reports say so:
// the text in a block of lines after the heading, the JSON in "means".

// maxMeansShown is how many distributions a text report lists before
// saying how many more there are.
const maxMeansShown = 8

// meanJSON is one distribution an exact analysis used at its mean.
type meanJSON struct {
	Input   string `json:"input"` // "" when it is written inside a calculation
	Written string `json:"written"`
	Mean    string `json:"mean"`
	Exact   bool   `json:"exact"` // false: the mean is irrational and rounded
	// SplitAt lists the three-point chance nodes (`chance NAME by
	// swanson`) below which the input stands at its percentiles instead.
	SplitAt []string `json:"split_at,omitempty"`
}

// meansOf lists the distributions of c for a report's JSON (never nil).
func meansOf(c *compiled.Model) []meanJSON {
	out := []meanJSON{}
	if c == nil {
		return out
	}
	us := atMeans(c)
	if len(us) == 0 {
		return out // no walk of the tree for its splits
	}
	splits, _ := splitNodes(c)
	for _, u := range us {
		out = append(out, meanJSON{Input: u.Input, Written: u.Written(), Mean: u.Mean.String(), Exact: u.Exact, SplitAt: splits[u.Input]})
	}
	return out
}

// splitNodes maps each input split into a three-point chance node to the
// labels of those nodes, each once, in the order of the tree; rules gives
// the rule of the first.
func splitNodes(c *compiled.Model) (out map[string][]string, rules map[string]tree.SplitRule) {
	out, rules = map[string][]string{}, map[string]tree.SplitRule{}
	seen := map[[2]string]bool{}
	var walk func(n *tree.Node)
	walk = func(n *tree.Node) {
		if n == nil {
			return
		}
		if sp := n.Split; sp != nil {
			if k := [2]string{sp.Input, n.Display()}; !seen[k] {
				seen[k] = true
				if len(out[sp.Input]) == 0 {
					rules[sp.Input] = sp.Rule
				}
				out[sp.Input] = append(out[sp.Input], n.Display())
			}
		}
		for _, b := range n.Branches {
			walk(b.Node)
		}
	}
	if m := c.Source(); m != nil {
		walk(m.Root)
	}
	return out, rules
}

// writeMeans writes the note that the distributions of c stand for their
// means, one line each (nothing when there are none).
func writeMeans(w textOut, c *compiled.Model) {
	if c == nil {
		return
	}
	us := atMeans(c)
	if len(us) == 0 {
		return
	}
	splits, rules := splitNodes(c)
	if len(us) == 1 {
		w.ln("means: the distribution stands for its mean here (`forkcast simulate` draws it):")
	} else {
		w.f("means: the %d distributions stand for their means here (`forkcast simulate` draws them):\n", len(us))
	}
	for i, u := range us {
		if i == maxMeansShown && len(us) > maxMeansShown+1 {
			w.f("  … and %d more\n", len(us)-maxMeansShown)
			break
		}
		mean := render.Grouped(u.Mean.String())
		if !u.Exact || len(u.Mean.String()) > 20 {
			mean = "≈" + render.Grouped(u.Mean.Round(6).String())
		}
		if u.Input == "" {
			w.f("  %s (in a calculation): mean %s\n", u.Written(), mean)
			continue
		}
		w.f("  %s = %s: mean %s", u.Input, u.Written(), mean)
		if at := splits[u.Input]; len(at) > 0 {
			points, _, _ := rules[u.Input].Points()
			w.f(", but at its %s, %s and %s below %s", points[0], points[1], points[2], strings.Join(quotedAll(at), ", "))
		}
		w.ln()
	}
}

// atMeans lists the distributions of c that stand for their means: those
// whose input was not set to a value.
func atMeans(c *compiled.Model) []compiled.Uncertain {
	var out []compiled.Uncertain
	for _, u := range c.Uncertain() {
		if !u.Fixed {
			out = append(out, u)
		}
	}
	return out
}

// meansNonEmpty is meansOf, nil when there are none (the key is then left
// out of the JSON).
func meansNonEmpty(c *compiled.Model) []meanJSON {
	if ms := meansOf(c); len(ms) > 0 {
		return ms
	}
	return nil
}

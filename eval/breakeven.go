package eval

import (
	"fmt"
	"sort"
	"strings"
	"unicode"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Breakeven analysis.
//
// FindBreakeven varies one input over a range and finds every value at
// which the optimal choice at a decision changes. The input is a `let`
// parameter, the probability of a state of a named uncertainty, or the
// probability of a branch of a plain chance node (see ParseVary for the
// syntax). The range is sampled on a grid; in each grid interval where the
// best option changes, the crossing of the two options' values is solved
// as if they were linear in the input (they are piecewise linear in one
// probability or cash figure), and checked by solving the tree there: equal
// values make the switch exact. Otherwise the crossing is bracketed and
// narrowed (secant steps, bisection as a safeguard) to tree.DivisionScale
// decimal places and marked approximate. Before that, every grid interval
// across which some option's value is not a straight line is halved until
// it is (see refine), so a switch and back again inside one interval is
// found too; Grid sets how fine the first grid is.

// VaryKind says what kind of input a breakeven search varies.
type VaryKind uint8

const (
	// VaryParam is a `let` parameter, varied through Resolve's overrides.
	VaryParam VaryKind = iota
	// VaryState is the probability of one state of a named uncertainty.
	VaryState
	// VaryBranch is the probability of one branch of the plain chance
	// nodes (not on a named uncertainty) with a given label.
	VaryBranch
)

// Vary names the input a breakeven search varies.
type Vary struct {
	Kind VaryKind
	// Name is the parameter (VaryParam), the uncertainty (VaryState) or
	// the chance node's label (VaryBranch).
	Name string
	// Label is the state (VaryState) or the branch (VaryBranch).
	Label string
}

// ParseVary reads what to vary:
//
//	NAME                   a `let` parameter:           licence
//	UNCERTAINTY:STATE      a state's probability:       defect:Defective
//	NODE/BRANCH            a plain chance branch's:     Integration/Clean
//
// A part may be written in double quotes, which it must be when it holds a
// ':' or '/' of its own: "Phase 1: build"/"Late". Spaces inside a part are
// kept (quote the whole argument in the shell).
func ParseVary(s string) (Vary, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return Vary{}, &RequestError{Msg: "nothing to vary: give a parameter NAME, UNCERTAINTY:STATE or NODE/BRANCH"}
	}
	left, sep, right, err := splitVary(s)
	if err != nil {
		return Vary{}, err
	}
	switch sep {
	case 0:
		if !isIdent(left) {
			return Vary{}, &RequestError{Msg: fmt.Sprintf("%q is not a parameter name; to vary a probability write UNCERTAINTY:STATE (defect:Defective) or NODE/BRANCH (\"Integration\"/\"Clean\")", s)}
		}
		return Vary{Kind: VaryParam, Name: left}, nil
	case ':':
		return Vary{Kind: VaryState, Name: left, Label: right}, nil
	}
	return Vary{Kind: VaryBranch, Name: left, Label: right}, nil
}

// splitVary splits at the first ':' or '/' outside double quotes and
// unquotes both parts.
func splitVary(s string) (left string, sep byte, right string, err error) {
	inQuote := false
	for i := 0; i < len(s); i++ {
		switch c := s[i]; {
		case c == '"':
			inQuote = !inQuote
		case !inQuote && (c == ':' || c == '/'):
			l, err1 := unquotePart(s[:i])
			r, err2 := unquotePart(s[i+1:])
			if err1 != nil {
				return "", 0, "", err1
			}
			if err2 != nil {
				return "", 0, "", err2
			}
			if l == "" || r == "" {
				return "", 0, "", &RequestError{Msg: fmt.Sprintf("%q: both sides of %q need a name or label", s, string(c))}
			}
			return l, c, r, nil
		}
	}
	if inQuote {
		return "", 0, "", &RequestError{Msg: fmt.Sprintf("%q has an unclosed double quote", s)}
	}
	l, err := unquotePart(s)
	return l, 0, "", err
}

func unquotePart(p string) (string, error) {
	p = strings.TrimSpace(p)
	if strings.HasPrefix(p, `"`) {
		if len(p) < 2 || !strings.HasSuffix(p, `"`) || strings.Count(p, `"`) != 2 {
			return "", &RequestError{Msg: fmt.Sprintf("%s: a quoted label runs from one double quote to the next", p)}
		}
		return p[1 : len(p)-1], nil
	}
	if strings.Contains(p, `"`) {
		return "", &RequestError{Msg: fmt.Sprintf("%s: quote a whole label, not part of it", p)}
	}
	return p, nil
}

func isIdent(s string) bool {
	for i, r := range s {
		if !(r == '_' || unicode.IsLetter(r) || (i > 0 && unicode.IsDigit(r))) {
			return false
		}
	}
	return s != ""
}

// String writes the Vary back in ParseVary's syntax.
func (v Vary) String() string {
	q := func(s string) string {
		if strings.ContainsAny(s, `:/"`) || s != strings.TrimSpace(s) {
			return fmt.Sprintf("%q", s)
		}
		return s
	}
	switch v.Kind {
	case VaryState:
		return q(v.Name) + ":" + q(v.Label)
	case VaryBranch:
		return q(v.Name) + "/" + q(v.Label)
	}
	return v.Name
}

// RequestError is a breakeven request that does not fit the model: an
// unknown name, a range outside [0, 1] for a probability, a decision that
// is not there. It is the caller's mistake rather than the model's.
type RequestError struct{ Msg string }

// Error is the explanation, written for the person who made the request.
func (e *RequestError) Error() string { return e.Msg }

func reqErr(format string, args ...any) error {
	return &RequestError{Msg: fmt.Sprintf(format, args...)}
}

// DefaultGrid is the number of intervals FindBreakeven samples the range in.
const DefaultGrid = 64

// BreakevenOptions say what FindBreakeven varies, over what range and at
// which decision.
type BreakevenOptions struct {
	Vary Vary
	// Low and High replace the range; nil takes the parameter's own
	// `in LOW .. HIGH`, or [0, 1] for a probability.
	Low, High *decimal.Decimal
	// At is the label of the decision to watch; "" is the root or, when the
	// root is not a decision, the first decision on the optimal path.
	At string
	// Grid is the number of intervals sampled (DefaultGrid when 0).
	Grid int
}

// Switch is a value of the input at which the optimal choice changes.
type Switch struct {
	// At is where it changes. Exact means the two options' values are
	// equal there exactly; otherwise At is within 10^-tree.DivisionScale
	// of the switch.
	At    decimal.Decimal
	Exact bool
	// Below is the option (branch index of the decision) best just below
	// At, Above the one best just above.
	Below, Above int
	// Values holds every option's value at At, in the objective's terms.
	Values []decimal.Decimal
}

// Segment is a stretch of the range with one best option (ties go to the
// first option in model order).
type Segment struct {
	From, To decimal.Decimal
	Best     int
}

// Breakeven is the result of FindBreakeven.
type Breakeven struct {
	Vary Vary
	// What describes the input for people.
	What string
	// Current is the input's value in the model.
	Current decimal.Decimal
	// Low and High are the range searched, after any narrowing.
	Low, High decimal.Decimal
	// Adjust says how the other probabilities make room when a
	// probability is varied ("" for a parameter).
	Adjust string
	// Narrowed is set when the range was cut to keep every probability in
	// [0, 1]; the Notes say how.
	Narrowed bool
	// Decision is the decision watched and Path the branch labels from
	// the root to it.
	Decision *tree.Node
	Path     []string
	// Options are the decision's branch labels.
	Options []string
	// Segments cover [Low, High] in order; Switches are the points between
	// them. No switch means one option is best over the whole range.
	Segments []Segment
	Switches []Switch
	// Notes explain choices made along the way.
	Notes []string
}

// FindBreakeven varies one input of m over a range and finds where the
// optimal choice at a decision changes. m is not changed: the search works
// on a copy. m need not be resolved.
func FindBreakeven(m *tree.Model, opts BreakevenOptions) (*Breakeven, error) {
	c := m.Clone()
	if ds := c.Resolve(nil); ds.HasErrors() {
		return nil, fmt.Errorf("eval: the model has errors: %w", ds.Err())
	}
	s := &search{m: c, obj: c.Objective, be: &Breakeven{Vary: opts.Vary}}
	if err := s.target(opts); err != nil {
		return nil, err
	}
	base, err := s.eval(s.be.Current)
	if err != nil {
		return nil, err
	}
	if err := s.decision(base, opts.At); err != nil {
		return nil, err
	}
	return s.run(opts)
}

// search is one breakeven search.
type search struct {
	m   *tree.Model
	obj tree.Objective
	be  *Breakeven
	// apply sets the input to x before a Resolve; over holds parameter
	// overrides.
	apply func(x decimal.Decimal)
	over  map[string]decimal.Decimal
	node  int // pre-order index of the decision watched
	evals int
}

// sample is the decision's state at one value of the input.
type sample struct {
	x      decimal.Decimal
	values []decimal.Decimal
	best   int
}

var (
	ulp  = decimal.New(1, -tree.DivisionScale)
	half = decimal.New(5, -1)
)

// target finds the input, its current value, its range and how the rest
// of its siblings adjust.
func (s *search) target(opts BreakevenOptions) error {
	v := opts.Vary
	be := s.be
	m := s.m
	var lo, hi decimal.Decimal
	switch v.Kind {
	case VaryParam:
		p := m.Param(v.Name)
		if p == nil {
			return s.unknown(v)
		}
		be.What = "parameter " + p.Name
		be.Current = p.Value
		s.over = map[string]decimal.Decimal{}
		s.apply = func(x decimal.Decimal) { s.over[p.Name] = x }
		switch {
		case opts.Low != nil && opts.High != nil:
			lo, hi = *opts.Low, *opts.High
		case p.HasRange():
			lo, hi = p.LowValue, p.HighValue
		default:
			return reqErr("parameter %q has no range: give one with --in LOW..HIGH, or write `let %s = ... in LOW .. HIGH` in the model", p.Name, p.Name)
		}
		if lo.GreaterThan(hi) {
			return reqErr("the range %s..%s runs downwards: write the smaller bound first", lo, hi)
		}
		be.Low, be.High = lo, hi
		return nil
	case VaryState:
		u := m.Uncertainty(v.Name)
		if u == nil {
			return s.unknown(v)
		}
		si := u.StateIndex(v.Label)
		if si < 0 {
			return reqErr("uncertainty %q has no state %q; its states are %s", u.Name, v.Label, quoteAll(stateNames(u)))
		}
		be.What = fmt.Sprintf("P(%q), uncertainty %s", v.Label, u.Name)
		be.Current = u.States[si].P
		sib := make([]probSlot, len(u.States))
		for j, st := range u.States {
			st := st
			sib[j] = probSlot{label: st.Label, p: st.P, rest: st.Prob == nil,
				set: func(e tree.Expr, _ bool) { st.Prob = e }}
		}
		adj, err := s.siblings([][]probSlot{sib}, si, "state", opts)
		if err != nil {
			return err
		}
		be.Adjust = adj
		return nil
	}
	// VaryBranch
	var groups [][]probSlot
	at := -1
	labelled := 0
	tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
		if n.Kind != tree.KindChance || n.Label != v.Name {
			return true
		}
		labelled++
		if n.Uncertainty != "" || n.Test != "" {
			return true
		}
		bi := -1
		for j, b := range n.Branches {
			if b.Label == v.Label {
				bi = j
			}
		}
		if bi < 0 {
			return true
		}
		at = bi
		sib := make([]probSlot, len(n.Branches))
		for j, b := range n.Branches {
			b := b
			sib[j] = probSlot{label: b.Label, p: b.P, rest: b.Rest,
				set: func(e tree.Expr, rest bool) { b.Prob, b.Rest = e, rest }}
		}
		// Keep the varied branch first in a stable place: index bi.
		groups = append(groups, sib)
		return true
	})
	if len(groups) == 0 {
		return s.unknown(v)
	}
	be.What = fmt.Sprintf("P(%q) at chance node %q", v.Label, v.Name)
	if len(groups) > 1 {
		be.What += fmt.Sprintf(" (all %d copies)", len(groups))
		be.Notes = append(be.Notes, fmt.Sprintf("%d chance nodes are labelled %q; the probability is varied in all of them together", len(groups), v.Name))
	}
	be.Current = groups[0][at].p
	adj, err := s.siblings(groups, at, "branch", opts)
	if err != nil {
		return err
	}
	be.Adjust = adj
	return nil
}

// probSlot is one sibling probability: its label, resolved value, whether
// it is the rest, and how to set its expression.
type probSlot struct {
	label string
	p     decimal.Decimal
	rest  bool
	set   func(e tree.Expr, rest bool)
}

// siblings sets up varying slot vi of every group (a state of an
// uncertainty, or a branch of each chance node with the label) and returns
// how the others make room.
func (s *search) siblings(groups [][]probSlot, vi int, kind string, opts BreakevenOptions) (string, error) {
	be := s.be
	lo, hi := decimal.Zero, one
	if opts.Low != nil && opts.High != nil {
		lo, hi = *opts.Low, *opts.High
		if lo.IsNegative() || hi.GreaterThan(one) {
			return "", reqErr("a probability lies in [0, 1] (0%% to 100%%): the range %s..%s goes outside it", lo, hi)
		}
		if lo.GreaterThan(hi) {
			return "", reqErr("the range %s..%s runs downwards: write the smaller bound first", lo, hi)
		}
	}
	restAt := -1
	for j, sl := range groups[0] {
		if sl.rest && j != vi {
			restAt = j
		}
	}
	var adjust string
	var applies []func(x decimal.Decimal)
	limit := one // the largest value that keeps every sibling in [0, 1]
	if restAt >= 0 {
		adjust = fmt.Sprintf("the rest %s %q takes up the difference", kind, groups[0][restAt].label)
		for _, g := range groups {
			others := decimal.Zero
			for j, sl := range g {
				if j != vi && j != restAt {
					others = others.Add(sl.p)
				}
			}
			if l := one.Sub(others); l.LessThan(limit) {
				limit = l
			}
			g := g
			applies = append(applies, func(x decimal.Decimal) { g[vi].set(tree.Num(x), false) })
		}
	} else {
		adjust = fmt.Sprintf("the other %s are rescaled in proportion (none of them is the rest)", plural(kind))
		for _, g := range groups {
			left := one.Sub(g[vi].p)
			if left.Sign() <= 0 {
				return "", reqErr("the other %s of %q have probability 0, so there is nothing to rescale: make one of them `rest`", plural(kind), be.Vary.Name)
			}
			// q[j] = p[j] / (1 − p[vi]); the last sibling becomes the
			// rest so that the probabilities still sum to 1 exactly.
			last := -1
			q := make([]decimal.Decimal, len(g))
			for j, sl := range g {
				if j != vi {
					q[j] = tree.Div(sl.p, left, true).D
					last = j
				}
			}
			g := g
			applies = append(applies, func(x decimal.Decimal) {
				g[vi].set(tree.Num(x), false)
				for j := range g {
					switch {
					case j == vi:
					case j == last:
						g[j].set(nil, true)
					default:
						g[j].set(tree.Num(q[j].Mul(one.Sub(x))), false)
					}
				}
			})
		}
	}
	if hi.GreaterThan(limit) {
		if lo.GreaterThan(limit) {
			return "", reqErr("over %s..%s the other probabilities would need to be negative: %s can be at most %s", lo, hi, be.What, limit)
		}
		be.Notes = append(be.Notes, fmt.Sprintf("the range is cut at %s%% (%s) so that the rest stays at 0 or above", limit.Shift(2), limit))
		hi, be.Narrowed = limit, true
	}
	be.Low, be.High = lo, hi
	s.apply = func(x decimal.Decimal) {
		for _, f := range applies {
			f(x)
		}
	}
	return adjust, nil
}

// unknown explains a name that is not in the model.
func (s *search) unknown(v Vary) error {
	m := s.m
	var params, uncs []string
	for _, p := range m.Params {
		params = append(params, p.Name)
	}
	for _, u := range m.Uncertainties {
		uncs = append(uncs, u.Name)
	}
	switch v.Kind {
	case VaryParam:
		if u := m.Uncertainty(v.Name); u != nil {
			var opts []string
			for _, st := range u.States {
				opts = append(opts, Vary{Kind: VaryState, Name: u.Name, Label: st.Label}.String())
			}
			return reqErr("%q is an uncertainty: vary the probability of one of its states, %s", v.Name, strings.Join(opts, " or "))
		}
		msg := fmt.Sprintf("no parameter %q in the model", v.Name)
		if len(params) > 0 {
			msg += "; the parameters are " + strings.Join(params, ", ")
		}
		return reqErr("%s (a probability is UNCERTAINTY:STATE or NODE/BRANCH)", msg)
	case VaryState:
		msg := fmt.Sprintf("no uncertainty %q in the model", v.Name)
		if len(uncs) > 0 {
			msg += "; the uncertainties are " + strings.Join(uncs, ", ")
		}
		return reqErr("%s (a plain chance branch is NODE/BRANCH)", msg)
	}
	// A branch: say what is there.
	var found *tree.Node
	tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
		if found == nil && n.Kind == tree.KindChance && n.Label == v.Name {
			found = n
		}
		return true
	})
	switch {
	case found == nil:
		return reqErr("no chance node labelled %q in the model", v.Name)
	case found.Uncertainty != "":
		return reqErr("chance node %q samples uncertainty %s: vary %s instead", v.Name, found.Uncertainty, Vary{Kind: VaryState, Name: found.Uncertainty, Label: v.Label})
	case found.Test != "":
		return reqErr("chance node %q is test %s: its probabilities come from Bayes' rule; vary the test's uncertainty instead", v.Name, found.Test)
	}
	var labels []string
	for _, b := range found.Branches {
		labels = append(labels, b.Label)
	}
	return reqErr("chance node %q has no branch %q; its branches are %s", v.Name, v.Label, quoteAll(labels))
}

func plural(kind string) string {
	if strings.HasSuffix(kind, "h") {
		return kind + "es"
	}
	return kind + "s"
}

func stateNames(u *tree.Uncertainty) []string {
	out := make([]string, len(u.States))
	for i, s := range u.States {
		out[i] = s.Label
	}
	return out
}

func quoteAll(xs []string) string {
	q := make([]string, len(xs))
	for i, x := range xs {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}

// pathHas reports whether a branch labelled via lies on the path from the
// root to s.
func pathHas(s *Solved, via string) bool {
	for c := s; c.Parent() != nil; c = c.Parent() {
		if c.Parent().Node.Branches[c.Via()].Label == via {
			return true
		}
	}
	return false
}

// decision picks the decision to watch, on the solution at the current
// value.
func (s *search) decision(base *Solution, at string) error {
	nodes := base.Nodes()
	pick := -1
	switch {
	case at != "":
		var all []int
		for i := range nodes {
			if n := nodes[i].Node; n.Kind == tree.KindDecision && n.Label == at {
				all = append(all, i)
			}
		}
		if len(all) == 0 {
			// BRANCH/DECISION: the decision with that label reached
			// through a branch with that label, to tell apart decisions
			// that share a label (a subtree used in several places).
			if i := strings.LastIndex(at, "/"); i > 0 {
				via, errV := unquotePart(at[:i])
				label, errL := unquotePart(at[i+1:])
				if errV == nil && errL == nil {
					for j := range nodes {
						if n := nodes[j].Node; n.Kind == tree.KindDecision && n.Label == label && pathHas(&nodes[j], via) {
							all = append(all, j)
						}
					}
				}
			}
		}
		if len(all) == 0 {
			var labels []string
			seen := map[string]bool{}
			for i := range nodes {
				if n := nodes[i].Node; n.Kind == tree.KindDecision && !seen[n.Label] {
					seen[n.Label] = true
					labels = append(labels, n.Label)
				}
			}
			return reqErr("no decision labelled %q; the decisions are %s", at, quoteAll(labels))
		}
		pick = all[0]
		for _, i := range all {
			if nodes[i].OnPolicy() {
				pick = i
				break
			}
		}
		if len(all) > 1 {
			s.be.Notes = append(s.be.Notes, fmt.Sprintf("%d decisions are labelled %q; watching the first one the optimal policy reaches (after %s)", len(all), at, pathText(&nodes[pick])))
		}
	case nodes[0].Node.Kind == tree.KindDecision:
		pick = 0
	default:
		for i := range nodes {
			if nodes[i].Node.Kind == tree.KindDecision && nodes[i].OnPolicy() {
				pick = i
				break
			}
		}
		if pick < 0 {
			return reqErr("the model has no decision to watch")
		}
		s.be.Notes = append(s.be.Notes, fmt.Sprintf("the root is not a decision; watching the first decision on the optimal path, %q (after %s)", nodes[pick].Node.Label, pathText(&nodes[pick])))
	}
	s.node = pick
	d := &nodes[pick]
	s.be.Decision = d.Node
	for _, b := range d.Path() {
		s.be.Path = append(s.be.Path, b.Label)
	}
	for _, b := range d.Node.Branches {
		s.be.Options = append(s.be.Options, b.Label)
	}
	return nil
}

func pathText(s *Solved) string {
	var labels []string
	for _, b := range s.Path() {
		labels = append(labels, fmt.Sprintf("%q", b.Label))
	}
	if len(labels) == 0 {
		return "nothing: it is the root"
	}
	return joinPath(labels)
}

// eval resolves and solves the model with the input at x.
func (s *search) eval(x decimal.Decimal) (*Solution, error) {
	s.apply(x)
	s.evals++
	if ds := s.m.Resolve(s.over); ds.HasErrors() {
		first := ds.Errors()[0]
		where := ""
		if first.Pos.IsValid() {
			where = fmt.Sprintf(" at line %d, column %d", first.Pos.Line, first.Pos.Col)
		}
		return nil, fmt.Errorf("with %s = %s the model has errors (first%s: %s); narrow the range with --in", s.be.Vary, x, where, first.Summary)
	}
	return Solve(s.m)
}

func (s *search) sample(x decimal.Decimal) (*sample, error) {
	sol, err := s.eval(x)
	if err != nil {
		return nil, err
	}
	d := &sol.Nodes()[s.node]
	sm := &sample{x: x, best: d.Chosen(), values: make([]decimal.Decimal, len(d.Node.Branches))}
	for j := range sm.values {
		sm.values[j] = d.BranchValue(j)
	}
	return sm, nil
}

// valid reports whether the model resolves without errors with the input
// at x.
func (s *search) valid(x decimal.Decimal) bool {
	s.apply(x)
	s.evals++
	return !s.m.Resolve(s.over).HasErrors()
}

// feasible narrows a parameter's range to where the model is valid (a
// parameter used as a probability must keep its siblings in [0, 1]),
// searching outwards from the current value. The bound found is the
// shortest decimal within 10^-(DivisionScale-5) of the true one that is
// still valid.
func (s *search) feasible() error {
	be := s.be
	cur := be.Current
	for _, end := range []*decimal.Decimal{&be.Low, &be.High} {
		if s.valid(*end) {
			continue
		}
		if cur.LessThan(be.Low) || cur.GreaterThan(be.High) || !s.valid(cur) {
			_, err := s.eval(*end)
			return &RequestError{Msg: err.Error()}
		}
		good, bad := cur, *end
		for good.Sub(bad).Abs().GreaterThan(ulp) {
			mid := good.Add(bad).Mul(half).Round(tree.DivisionScale)
			if mid.Equal(good) || mid.Equal(bad) {
				break
			}
			if s.valid(mid) {
				good = mid
			} else {
				bad = mid
			}
		}
		bound := good
		tol := decimal.New(1, -(tree.DivisionScale - 5))
		for places := int32(0); places < tree.DivisionScale; places++ {
			r := good.Round(places)
			if r.Sub(good).Abs().LessThanOrEqual(tol) && s.valid(r) {
				bound = r
				break
			}
		}
		side := "top"
		if end == &be.Low {
			side = "bottom"
		}
		be.Notes = append(be.Notes, fmt.Sprintf("the %s of the range is cut from %s to %s, where the model stops being valid (as when a probability would leave [0, 1])", side, *end, bound))
		*end, be.Narrowed = bound, true
	}
	return nil
}

// g is a value as goodness: higher is better.
func (s *search) g(v decimal.Decimal) decimal.Decimal {
	if s.obj == tree.Min {
		return v.Neg()
	}
	return v
}

func (s *search) run(opts BreakevenOptions) (*Breakeven, error) {
	be := s.be
	if be.Vary.Kind == VaryParam {
		if err := s.feasible(); err != nil {
			return nil, err
		}
	}
	n := opts.Grid
	if n <= 0 {
		n = DefaultGrid
	}
	if be.Low.Equal(be.High) {
		n = 0
	}
	width := be.High.Sub(be.Low)
	grid := make([]*sample, 0, n+1)
	for i := 0; i <= n; i++ {
		x := be.High
		if i < n {
			x = be.Low.Add(width.Mul(decimal.NewFromInt(int64(i))).DivRound(decimal.NewFromInt(int64(n)), tree.DivisionScale))
		}
		sm, err := s.sample(x)
		if err != nil {
			return nil, err
		}
		grid = append(grid, sm)
	}
	cells, err := s.refine(grid)
	if err != nil {
		return nil, err
	}
	for _, c := range cells {
		if c.a.best == c.b.best {
			continue
		}
		sw, err := s.between(c.a, c.b)
		if err != nil {
			return nil, err
		}
		be.Switches = append(be.Switches, sw...)
	}
	sort.SliceStable(be.Switches, func(a, b int) bool { return be.Switches[a].At.LessThan(be.Switches[b].At) })
	seg := Segment{From: be.Low, Best: grid[0].best}
	for _, sw := range be.Switches {
		seg.To = sw.At
		be.Segments = append(be.Segments, seg)
		seg = Segment{From: sw.At, Best: sw.Above}
	}
	seg.To = be.High
	be.Segments = append(be.Segments, seg)
	return be, nil
}

// Refinement limits: how often a grid interval may be halved where the
// options' values bend, and how many extra tree solves that may cost in all.
const (
	maxRefineDepth   = 24
	maxRefineSamples = 4096
)

// bendTolerance is how far from a straight line a value may sit and still
// count as straight: posteriors rounded at DivisionScale leave noise far
// below it, while any real bend in money is far above it.
var bendTolerance = decimal.New(1, -30)

type cell struct {
	a, b  *sample
	depth int
}

// refine splits the grid intervals until every option's value is a
// straight line across each of them (checked at the midpoint), so that a
// switch and a switch back inside one interval cannot hide: where every
// option is linear across an interval, an option best at both ends is best
// throughout. The intervals come back in order.
func (s *search) refine(grid []*sample) ([]cell, error) {
	var out []cell
	work := make([]cell, 0, len(grid))
	for i := len(grid) - 2; i >= 0; i-- {
		work = append(work, cell{grid[i], grid[i+1], 0})
	}
	extra := 0
	for len(work) > 0 {
		c := work[len(work)-1]
		work = work[:len(work)-1]
		if c.depth >= maxRefineDepth {
			// A bend inside an interval this small (the range / 64 / 2^24)
			// is a kink of some inner decision; nothing fits inside it.
			out = append(out, c)
			continue
		}
		if extra >= maxRefineSamples {
			s.noteRefineLimit()
			out = append(out, c)
			continue
		}
		m, err := s.sample(c.a.x.Add(c.b.x).Mul(half).Round(tree.DivisionScale))
		if err != nil {
			return nil, err
		}
		extra++
		if straight(c.a, m, c.b) {
			out = append(out, c)
			continue
		}
		work = append(work, cell{m, c.b, c.depth + 1}, cell{c.a, m, c.depth + 1})
	}
	return out, nil
}

// straight reports whether every option's value at m is the mean of its
// values at a and b.
func straight(a, m, b *sample) bool {
	for i := range m.values {
		bend := a.values[i].Add(b.values[i]).Sub(m.values[i].Mul(decimal.NewFromInt(2))).Abs()
		if bend.GreaterThan(bendTolerance) {
			return false
		}
	}
	return true
}

// noteRefineLimit records, once, that the refinement stopped before every
// interval was straight.
func (s *search) noteRefineLimit() {
	const note = "the values bend too often to check every interval; a switch and back within a very small interval may be missed"
	for _, n := range s.be.Notes {
		if n == note {
			return
		}
	}
	s.be.Notes = append(s.be.Notes, note)
}

// between finds the switches between two samples whose best options
// differ.
func (s *search) between(a, b *sample) ([]Switch, error) {
	var out []Switch
	type pair struct{ a, b *sample }
	work := []pair{{a, b}}
	for len(work) > 0 {
		p := work[len(work)-1]
		work = work[:len(work)-1]
		sw, split, err := s.narrow(p.a, p.b)
		if err != nil {
			return nil, err
		}
		if split != nil {
			work = append(work, pair{split, p.b}, pair{p.a, split})
			continue
		}
		if sw != nil {
			out = append(out, *sw)
		}
	}
	return out, nil
}

// narrow closes in on the switch between a and b (best options A and B).
// It returns the switch, or a sample in between where a third option is
// best (split there and look on both sides).
func (s *search) narrow(a, b *sample) (*Switch, *sample, error) {
	A, B := a.best, b.best
	slow := 0
	for iter := 0; ; iter++ {
		if a.best == b.best {
			return nil, nil, nil
		}
		width := b.x.Sub(a.x)
		if width.LessThanOrEqual(ulp) || iter > 4*tree.DivisionScale+200 {
			x := a.x.Add(b.x).Mul(half).Round(tree.DivisionScale)
			m, err := s.sample(x)
			if err != nil {
				return nil, nil, err
			}
			return &Switch{At: x, Below: A, Above: B, Values: m.values}, nil, nil
		}
		da := s.g(a.values[A]).Sub(s.g(a.values[B])) // ≥ 0: A is best at a
		db := s.g(b.values[A]).Sub(s.g(b.values[B])) // ≤ 0: B is best at b
		den := da.Sub(db)
		var x decimal.Decimal
		switch {
		case slow >= 2 || den.Sign() <= 0:
			x = a.x.Add(b.x).Mul(half).Round(tree.DivisionScale)
			slow = 0
		default:
			x = a.x.Add(tree.Div(width.Mul(da), den, true).D)
		}
		if x.LessThan(a.x) {
			x = a.x
		}
		if x.GreaterThan(b.x) {
			x = b.x
		}
		// A crossing at an end: the two options tie there. Check that the
		// option on the other side is best just inside, then it is exact.
		if x.Equal(a.x) || x.Equal(b.x) {
			mid, err := s.sample(a.x.Add(b.x).Mul(half).Round(tree.DivisionScale))
			if err != nil {
				return nil, nil, err
			}
			if mid.best != A && mid.best != B {
				return nil, mid, nil
			}
			end := a
			if x.Equal(b.x) {
				end = b
			}
			if (end == a && mid.best == B) || (end == b && mid.best == A) {
				return &Switch{At: end.x, Exact: true, Below: A, Above: B, Values: end.values}, nil, nil
			}
			if mid.best == A {
				a = mid
			} else {
				b = mid
			}
			continue
		}
		m, err := s.sample(x)
		if err != nil {
			return nil, nil, err
		}
		if m.best != A && m.best != B {
			return nil, m, nil
		}
		if m.values[A].Equal(m.values[B]) {
			return &Switch{At: x, Exact: true, Below: A, Above: B, Values: m.values}, nil, nil
		}
		// Rounded: look one place either side before narrowing further.
		nb := x.Add(ulp)
		if m.best == B {
			nb = x.Sub(ulp)
		}
		if nb.GreaterThan(a.x) && nb.LessThan(b.x) {
			n, err := s.sample(nb)
			if err != nil {
				return nil, nil, err
			}
			if n.best != m.best && (n.best == A || n.best == B) {
				return &Switch{At: x, Below: A, Above: B, Values: m.values}, nil, nil
			}
		}
		old := width
		if m.best == A {
			a = m
		} else {
			b = m
		}
		if b.x.Sub(a.x).Mul(decimal.NewFromInt(2)).GreaterThan(old) {
			slow++
		} else {
			slow = 0
		}
	}
}

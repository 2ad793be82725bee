package eval

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"github.com/forkcast/forkcast/compiled"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Breakeven analysis.
//
// FindBreakeven varies one input over a range and finds every value at
// which the optimal choice at a decision changes. The input is a `let`
// parameter, the probability of a state of a named uncertainty, or the
// probability of a branch of a plain chance node (see ParseVary for the
// syntax). Every sample is the compiled model with the input changed
// (compiled.Model.With re-evaluates only the figures that depend on it) and
// one rollback.
//
// The range is sampled on a grid, and every grid interval in which some
// option might rise above the best one unseen (bounds from convexity, see
// refine) is split until none can, so a switch and back again inside one
// interval is found too.
// Where the best option changes inside an interval, the interval is
// narrowed until both options are straight lines across it; their crossing
// is then a rational number computed exactly, and confirmed by solving the
// tree at it (or, when it is no finite decimal, just either side of it):
// such a switch is exact. Where the switch sits exactly at a bend of one
// option (an inner decision changes at the same point), no interval around
// it is straight; there the lines from each side, each checked straight up
// to the point, must cross at the same point, which is confirmed the same
// way. The values of a decision are piecewise linear in
// one cash figure or one probability — the pieces are where inner
// decisions change — so switches are exact unless the input enters the
// values non-linearly (a probability used twice on one path); then the
// crossing is narrowed to compiled.DivisionScale decimal places and marked
// approximate.

// VaryKind says what kind of input a breakeven search varies.
type VaryKind uint8

const (
	// VaryParam is a `let` parameter.
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
		case inQuote && c == '\\':
			i++ // an escaped character inside quotes
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
		// Escapes as Go writes them (String uses strconv.Quote) are read
		// back; a label typed in quotes with no escapes reads as it is.
		if u, err := strconv.Unquote(p); err == nil {
			return u, nil
		}
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

// String writes the Vary back in ParseVary's syntax: a part that holds a
// ':', '/', '"' or '=' (which the command line uses to give a range), or
// starts or ends with a space, quoted as Go quotes strings (ParseVary reads
// the escapes back).
func (v Vary) String() string {
	q := func(s string) string {
		if strings.ContainsAny(s, `:/"=`) || s != strings.TrimSpace(s) {
			return strconv.Quote(s)
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

// DefaultMaxSamples caps the rollbacks one breakeven search may run.
const DefaultMaxSamples = 20_000

// BreakevenOptions say what FindBreakeven varies, over what range and at
// which decision.
type BreakevenOptions struct {
	Vary Vary
	// Low and High replace the range; nil takes the parameter's own
	// `in LOW .. HIGH`, or [0, 1] for a probability.
	Low, High *decimal.Decimal
	// At is the label of the decision to watch (or BRANCH/DECISION to tell
	// apart decisions that share a label); "" is the root or, when the root
	// is not a decision, the first decision on the optimal path.
	At string
	// Grid is the number of intervals sampled (DefaultGrid when 0).
	Grid int
	// MaxSamples caps the rollbacks (DefaultMaxSamples when 0).
	MaxSamples int
}

// Switch is a value of the input at which the optimal choice changes.
type Switch struct {
	// At is where it changes. When Exact, the two options' values are
	// equal there exactly and Fraction holds the point as a fraction; At is
	// then that fraction, rounded at compiled.DivisionScale places when it
	// is no finite decimal. Otherwise At is within
	// 10^-compiled.DivisionScale of the switch.
	At       decimal.Decimal
	Exact    bool
	Fraction *big.Rat
	// Below is the option (branch index of the decision) best just below
	// At, Above the one best just above.
	Below, Above int
	// Values holds every option's value at At, in the objective's terms.
	Values []decimal.Decimal
}

// IsDecimal reports whether an exact switch point is a finite decimal (At
// is then exactly the switch).
func (sw Switch) IsDecimal() bool {
	return sw.Fraction != nil && sw.At.Rat().Cmp(sw.Fraction) == 0
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
	// Narrowed is set when the range was cut to keep the model valid; the
	// Notes say how.
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
	// Samples is the number of rollbacks the search ran.
	Samples int
	// Notes explain choices made along the way.
	Notes []string
}

// FindBreakeven varies one input of c over a range and finds where the
// optimal choice at a decision changes. It stops with ctx.
func FindBreakeven(ctx context.Context, c *compiled.Model, opts BreakevenOptions) (*Breakeven, error) {
	if c == nil {
		return nil, ErrNoModel
	}
	if ctx == nil {
		ctx = context.Background()
	}
	s := &search{ctx: ctx, c: c, obj: c.Objective(), be: &Breakeven{Vary: opts.Vary}, maxSamples: opts.MaxSamples}
	if s.maxSamples <= 0 {
		s.maxSamples = DefaultMaxSamples
	}
	if err := s.target(opts); err != nil {
		return nil, err
	}
	base, err := Solve(c)
	if err != nil {
		return nil, err
	}
	if err := s.decision(base, opts.At); err != nil {
		return nil, err
	}
	if s.be.Vary.Kind == VaryParam {
		if err := s.feasible(); err != nil {
			return nil, err
		}
	}
	return s.run(opts)
}

// search is one breakeven search.
type search struct {
	ctx context.Context
	c   *compiled.Model
	obj tree.Objective
	be  *Breakeven
	// settings gives the input the value x.
	settings   func(x decimal.Decimal) []compiled.Setting
	node       int // compiled number of the decision watched
	maxSamples int
	// used is the rollbacks spent before this search by the analysis it
	// is part of, counted against maxSamples; budgetOption names the
	// option that raises the budget ("" for BreakevenOptions.MaxSamples).
	used         int
	budgetOption string
	// spare is the last sample's rollback, whose arrays the next sample
	// reuses: a sweep of a large tree otherwise allocates them at every
	// point.
	spare *compiled.Rollback
	// prev is the last sample's model, done with, whose arrays the next
	// one may take over (compiled.Model.WithInto).
	prev *compiled.Model
}

// sample is the watched decision at one value of the input: every option's
// T (mass × value, exact) and value (net), and the best option.
type sample struct {
	x      decimal.Decimal
	mass   decimal.Decimal
	t      []decimal.Decimal
	values []decimal.Decimal
	exact  bool // the values are exact (no rounded division)
	best   int
}

// y is what straightness and crossings are computed on between samples:
// T where the decision's mass is the same at all of them (T is exact and
// linear where the value is), the value otherwise.
func y(ss ...*sample) func(s *sample, j int) decimal.Decimal {
	for _, s := range ss[1:] {
		if !s.mass.Equal(ss[0].mass) {
			return func(s *sample, j int) decimal.Decimal { return s.values[j] }
		}
	}
	return func(s *sample, j int) decimal.Decimal { return s.t[j] }
}

// yExact reports whether the figures y uses are exact.
func yExact(ss ...*sample) bool {
	for _, s := range ss[1:] {
		if !s.mass.Equal(ss[0].mass) {
			for _, s := range ss {
				if !s.exact {
					return false
				}
			}
			return true
		}
	}
	return true
}

var (
	ulp  = decimal.New(1, -compiled.DivisionScale)
	half = decimal.New(5, -1)
	two  = decimal.NewFromInt(2)
)

// target finds the input, its current value, its range and how the rest
// of its siblings adjust.
func (s *search) target(opts BreakevenOptions) error {
	v := opts.Vary
	be := s.be
	c := s.c
	switch v.Kind {
	case VaryParam:
		in, ok := c.InputNamed(v.Name)
		if !ok {
			return s.unknown(v)
		}
		be.What = "parameter " + in.Name
		be.Current = in.Value
		t, _ := c.InputTarget(in.Name)
		s.settings = func(x decimal.Decimal) []compiled.Setting { return []compiled.Setting{{Target: t, Value: x}} }
		var lo, hi decimal.Decimal
		switch {
		case opts.Low != nil && opts.High != nil:
			lo, hi = *opts.Low, *opts.High
		case in.HasRange:
			lo, hi = in.Low, in.High
		default:
			return reqErr("parameter %q has no range: give BreakevenOptions.Low and High, or write `let %s = ... in LOW .. HIGH` in the model", in.Name, in.Name)
		}
		if lo.GreaterThan(hi) {
			return reqErr("the range %s..%s runs downwards: write the smaller bound first", lo, hi)
		}
		be.Low, be.High = lo, hi
		return nil
	case VaryState:
		u := c.Uncertainty(v.Name)
		if u < 0 {
			return s.unknown(v)
		}
		un := c.Uncertainties()[u]
		si := un.StateIndex(v.Label)
		if si < 0 {
			return reqErr("uncertainty %q has no state %q; its states are %s", un.Name, v.Label, quoteAll(stateNames(un)))
		}
		be.What = fmt.Sprintf("P(%q), uncertainty %s", v.Label, un.Name)
		be.Current = c.Prior(u, si)
		sib := make([]probSlot, len(un.States))
		for j, st := range un.States {
			sib[j] = probSlot{label: st.Label, p: c.Prior(u, j), rest: st.Prob == nil, target: c.StateTarget(u, j)}
		}
		adj, err := s.siblings([][]probSlot{sib}, si, "state", opts)
		if err != nil {
			return err
		}
		be.Adjust = adj
		return nil
	}
	// VaryBranch: every plain chance node with that label.
	var groups [][]probSlot
	at := -1
	for i := 0; i < c.Len(); i++ {
		n := c.Node(i)
		if c.Kind(i) != tree.KindChance || n.Label != v.Name || c.SamplesUncertainty(i) >= 0 || c.RunsTest(i) >= 0 {
			continue
		}
		bi := -1
		for j, b := range n.Branches {
			if b.Label == v.Label {
				bi = j
			}
		}
		if bi < 0 {
			continue
		}
		at = bi
		sib := make([]probSlot, len(n.Branches))
		for j, b := range n.Branches {
			k := c.Child(i, j)
			sib[j] = probSlot{label: b.Label, p: c.Prob(k), rest: b.Rest, target: c.BranchTarget(k)}
		}
		groups = append(groups, sib)
	}
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

// probSlot is one sibling probability: its label, value, whether it is the
// rest, and the figure to set.
type probSlot struct {
	label  string
	p      decimal.Decimal
	rest   bool
	target compiled.Target
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
	var parts []func(x decimal.Decimal) []compiled.Setting
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
			t := g[vi].target
			parts = append(parts, func(x decimal.Decimal) []compiled.Setting { return []compiled.Setting{{Target: t, Value: x}} })
		}
	} else {
		adjust = fmt.Sprintf("the other %s are rescaled in proportion (none of them is the rest)", plural(kind))
		for _, g := range groups {
			left := one.Sub(g[vi].p)
			if left.Sign() <= 0 {
				return "", reqErr("the other %s of %q have probability 0, so there is nothing to rescale: make one of them `rest`", plural(kind), be.Vary.Name)
			}
			// q[j] = p[j] / (1 − p[vi]); the last sibling takes what the
			// others leave, so that the probabilities sum to 1 exactly.
			last := -1
			q := make([]decimal.Decimal, len(g))
			for j, sl := range g {
				if j != vi {
					q[j], _ = divide(sl.p, left)
					last = j
				}
			}
			g := g
			parts = append(parts, func(x decimal.Decimal) []compiled.Setting {
				out := make([]compiled.Setting, 0, len(g))
				sum := x
				for j := range g {
					switch {
					case j == vi:
						out = append(out, compiled.Setting{Target: g[j].target, Value: x})
					case j != last:
						p := q[j].Mul(one.Sub(x))
						sum = sum.Add(p)
						out = append(out, compiled.Setting{Target: g[j].target, Value: p})
					}
				}
				return append(out, compiled.Setting{Target: g[last].target, Value: one.Sub(sum)})
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
	s.settings = func(x decimal.Decimal) []compiled.Setting {
		var out []compiled.Setting
		for _, f := range parts {
			out = append(out, f(x)...)
		}
		return out
	}
	return adjust, nil
}

// unknown explains a name that is not in the model.
func (s *search) unknown(v Vary) error {
	c := s.c
	var params, uncs []string
	for _, in := range c.Inputs() {
		params = append(params, in.Name)
	}
	for _, u := range c.Uncertainties() {
		uncs = append(uncs, u.Name)
	}
	switch v.Kind {
	case VaryParam:
		if u := c.Uncertainty(v.Name); u >= 0 {
			var opts []string
			for _, st := range c.Uncertainties()[u].States {
				opts = append(opts, Vary{Kind: VaryState, Name: v.Name, Label: st.Label}.String())
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
	found := -1
	for i := 0; i < c.Len() && found < 0; i++ {
		if c.Kind(i) == tree.KindChance && c.Node(i).Label == v.Name {
			found = i
		}
	}
	switch {
	case found < 0:
		return reqErr("no chance node labelled %q in the model", v.Name)
	case c.Node(found).Uncertainty != "":
		return reqErr("chance node %q samples uncertainty %s: vary %s instead", v.Name, c.Node(found).Uncertainty, Vary{Kind: VaryState, Name: c.Node(found).Uncertainty, Label: v.Label})
	case c.Node(found).Test != "":
		return reqErr("chance node %q is test %s: its probabilities come from Bayes' rule; vary the test's uncertainty instead", v.Name, c.Node(found).Test)
	}
	var labels []string
	for _, b := range c.Node(found).Branches {
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

func quoteAll(xs []string) string { return tree.QuoteList(xs) }

// decision picks the decision to watch, on the solution at the current
// value (see WatchedDecision).
func (s *search) decision(base *Solution, at string) error {
	d, notes, err := WatchedDecision(base, at)
	if err != nil {
		return err
	}
	if d == nil {
		return reqErr("the model has no decision to watch")
	}
	s.be.Notes = append(s.be.Notes, notes...)
	s.node = d.Number()
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

// with is the compiled model with the input at x.
func (s *search) with(x decimal.Decimal) (*compiled.Model, error) {
	if s.used+s.be.Samples >= s.maxSamples {
		opt := s.budgetOption
		if opt == "" {
			opt = "BreakevenOptions.MaxSamples"
		}
		return nil, &BudgetError{What: fmt.Sprintf("more than %d rollbacks", s.maxSamples), Option: opt}
	}
	if err := s.ctx.Err(); err != nil {
		return nil, err
	}
	s.be.Samples++
	prev := s.prev
	s.prev = nil
	cs, err := s.c.WithInto(prev, s.settings(x)...)
	if err != nil {
		var inv *compiled.InvalidError
		if errors.As(err, &inv) {
			first := inv.Diagnostics[0]
			where := ""
			if first.Pos.IsValid() {
				where = fmt.Sprintf(" at line %d, column %d", first.Pos.Line, first.Pos.Col)
			}
			return nil, &invalidAt{x: x, msg: fmt.Sprintf("with %s = %s the model has errors (first%s: %s); narrow the range", s.be.Vary, x, where, first.Summary), diag: first}
		}
		return nil, err
	}
	return cs, nil
}

// invalidAt is a value of the input at which the model is not valid.
type invalidAt struct {
	x    decimal.Decimal
	msg  string
	diag tree.Diagnostic
}

func (e *invalidAt) Error() string { return e.msg }

func (s *search) sample(x decimal.Decimal) (*sample, error) {
	cs, err := s.with(x)
	if err != nil {
		return nil, err
	}
	r := cs.RollbackInto(s.spare)
	from, to := cs.Kids(s.node)
	sm := &sample{x: x, best: r.Best(s.node), mass: cs.Mass(s.node), exact: true,
		t: make([]decimal.Decimal, to-from), values: make([]decimal.Decimal, to-from)}
	for k := from; k < to; k++ {
		sm.t[k-from] = r.Weighted(k)
		v, ok := r.Total(k)
		sm.values[k-from] = v
		sm.exact = sm.exact && ok
	}
	s.spare, s.prev = r, cs
	return sm, nil
}

// valid reports whether the model is valid with the input at x.
func (s *search) valid(x decimal.Decimal) (bool, error) {
	_, err := s.with(x)
	var inv *invalidAt
	if errors.As(err, &inv) {
		return false, nil
	}
	return err == nil, err
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
		ok, err := s.valid(*end)
		if err != nil {
			return err
		}
		if ok {
			continue
		}
		if cur.LessThan(be.Low) || cur.GreaterThan(be.High) {
			_, err := s.with(*end)
			return &RequestError{Msg: err.Error()}
		}
		good, bad := cur, *end
		for good.Sub(bad).Abs().GreaterThan(ulp) {
			mid := good.Add(bad).Mul(half).Round(compiled.DivisionScale)
			if mid.Equal(good) || mid.Equal(bad) {
				break
			}
			ok, err := s.valid(mid)
			if err != nil {
				return err
			}
			if ok {
				good = mid
			} else {
				bad = mid
			}
		}
		if good.Equal(cur) {
			return s.stuck(bad)
		}
		bound := good
		tol := decimal.New(1, -(compiled.DivisionScale - 5))
		for places := int32(0); places < compiled.DivisionScale; places++ {
			r := good.Round(places)
			if r.Sub(good).Abs().LessThanOrEqual(tol) {
				if ok, err := s.valid(r); err != nil {
					return err
				} else if ok {
					bound = r
					break
				}
			}
		}
		side := "top"
		if end == &be.Low {
			side = "bottom"
		}
		src := s.c.Source()
		be.Notes = append(be.Notes, fmt.Sprintf("the %s of the range is cut from %s to %s, where the model stops being valid (as when a probability would leave [0, 1])",
			side, showInputValue(src, be.Vary, *end), showInputValue(src, be.Vary, bound)))
		*end, be.Narrowed = bound, true
	}
	return nil
}

// stuck explains an input that cannot move at all from its current value
// without making the model invalid: typically a `let` used as the
// probability of a state of an uncertainty with no `rest` state, so that
// its states would no longer sum to 1.
func (s *search) stuck(bad decimal.Decimal) error {
	_, err := s.with(bad)
	var inv *invalidAt
	if !errors.As(err, &inv) {
		return err
	}
	msg := fmt.Sprintf("%s cannot move from %s without making the model invalid (%s)", s.be.What, s.be.Current, inv.diag.Error())
	if strings.Contains(inv.diag.Summary, "sum to") {
		msg += "; the probabilities it feeds would no longer sum to 1: give the uncertainty or chance node a `rest` state or branch to take up the difference"
		for _, u := range s.c.Uncertainties() {
			if strings.Contains(inv.diag.Summary, fmt.Sprintf("%q", u.Name)) && len(u.States) > 0 {
				msg += fmt.Sprintf(", or vary the state's probability itself (%s), which rescales the other states", Vary{Kind: VaryState, Name: u.Name, Label: u.States[0].Label})
			}
		}
	}
	return &RequestError{Msg: msg}
}

// run searches the range (narrowed by feasible first, for a parameter)
// for switches.
func (s *search) run(opts BreakevenOptions) (*Breakeven, error) {
	be := s.be
	n := opts.Grid
	if n <= 0 {
		n = DefaultGrid
	}
	if be.Low.Equal(be.High) {
		n = 0
	}
	grid := make([]*sample, 0, n+1)
	for i := 0; i <= n; i++ {
		x := gridPoint(be.Low, be.High, i, n)
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

// Refinement limits: how finely a grid interval may be split where the
// options' values bend (its width against the range's over the grid), and
// how many extra samples that may cost in all.
const (
	maxRefineDepth   = 24
	maxRefineSamples = 4096
)

// bendTolerance is how far from a straight line a value may sit and still
// count as straight when the values went through a rounded division: the
// rounding leaves noise far below it, while any real bend in money is far
// above it. Exact values must be exactly straight.
var bendTolerance = decimal.New(1, -30)

type cell struct {
	a, b *sample
}

// refine splits the grid intervals until none can hide a change of the
// best option that its ends do not show, and returns them in order.
//
// It rests on convexity. Every option's T (mass × value, exact) is, for a
// fixed policy below it, linear in an input that enters each path once,
// and the best of such lines over the policies: convex. A convex function
// lies below its chord between two samples and above the secants of the
// samples beside them, extended. So in an interval [a, b] where option A
// is best at both ends, no option C can beat A inside when C's chord stays
// below the lower bound of A made of the secants from the neighbouring
// samples (checked where that bound bends: at a, at b and where the two
// secants cross). Such an interval needs no sample inside it; the others
// are split at a point near their middle (a short decimal, which keeps the
// figures short) until they pass. An interval whose ends have different
// best options A and B passes when no third option can beat the better of
// the two (the same bound, on the envelope of all options) and A and B are
// both straight across it, so that they cross once and the narrowing of
// between finds where.
func (s *search) refine(grid []*sample) ([]cell, error) {
	pts := append([]*sample(nil), grid...)
	var out []cell
	minWidth := decimal.Zero
	if n := len(grid) - 1; n > 0 {
		w := s.be.High.Sub(s.be.Low).Div(decimal.NewFromInt(int64(n)))
		minWidth = w.Div(decimal.New(1<<maxRefineDepth, 0))
	}
	extra := 0
	for i := 0; i+1 < len(pts); {
		a, b := pts[i], pts[i+1]
		var left, right *sample
		if i > 0 {
			left = pts[i-1]
		}
		if i+2 < len(pts) {
			right = pts[i+2]
		}
		if s.resolved(left, a, b, right) {
			out = append(out, cell{a, b})
			i++
			continue
		}
		if b.x.Sub(a.x).LessThan(minWidth) {
			// A bend inside an interval this small (the range / grid /
			// 2^24) is a kink of some inner decision; nothing fits in it.
			out = append(out, cell{a, b})
			i++
			continue
		}
		if extra >= maxRefineSamples {
			s.noteRefineLimit()
			out = append(out, cell{a, b})
			i++
			continue
		}
		mx, ok := inside(a.x, b.x)
		if !ok {
			out = append(out, cell{a, b})
			i++
			continue
		}
		m, err := s.sample(mx)
		if err != nil {
			return nil, err
		}
		extra++
		// Between different ends A and B: enough that no third option can
		// beat them and both are straight across the whole interval
		// (between narrows it down).
		if a.best != b.best && (m.best == a.best || m.best == b.best) &&
			s.bounded(left, a, b, right, a.best, b.best) && straight(a, m, b, a.best, b.best) {
			out = append(out, cell{a, b})
			i++
			continue
		}
		pts = slices.Insert(pts, i+1, m)
	}
	return out, nil
}

// resolved reports whether the interval [a, b] (left and right its
// neighbouring samples, nil at the ends of the range) can hide no change
// of the best option without a sample inside it: the ends agree and no
// other option can beat theirs (see refine).
func (s *search) resolved(left, a, b, right *sample) bool {
	if a.best != b.best {
		return false
	}
	return s.bounded(left, a, b, right, a.best, a.best)
}

// bounded reports whether, on [a, b], every option other than A and B
// stays below the lower bound that convexity gives: of A's T when A = B,
// else of the envelope (the best option's T).
func (s *search) bounded(left, a, b, right *sample, A, B int) bool {
	if left == nil && right == nil {
		return false
	}
	tOf := func(sm *sample, j int) *big.Rat { return sm.t[j].Rat() }
	low := func(sm *sample) *big.Rat {
		if A == B {
			return tOf(sm, A)
		}
		return tOf(sm, sm.best)
	}
	ax, bx := a.x.Rat(), b.x.Rat()
	// The secants from the neighbours, extended into [a, b]: each is
	// (x0, y0, slope).
	type line struct{ x0, y0, k *big.Rat }
	var lines []line
	if left != nil {
		lx := left.x.Rat()
		k := new(big.Rat).Quo(new(big.Rat).Sub(low(a), low(left)), new(big.Rat).Sub(ax, lx))
		lines = append(lines, line{ax, low(a), k})
	}
	if right != nil {
		rx := right.x.Rat()
		k := new(big.Rat).Quo(new(big.Rat).Sub(low(right), low(b)), new(big.Rat).Sub(rx, bx))
		lines = append(lines, line{bx, low(b), k})
	}
	at := func(l line, x *big.Rat) *big.Rat {
		v := new(big.Rat).Sub(x, l.x0)
		return v.Add(v.Mul(v, l.k), l.y0)
	}
	bound := func(x *big.Rat) *big.Rat {
		v := at(lines[0], x)
		for _, l := range lines[1:] {
			if w := at(l, x); w.Cmp(v) > 0 {
				v = w
			}
		}
		return v
	}
	// Where the bound may bend: a, b and the crossing of the secants.
	xs := []*big.Rat{ax, bx}
	if len(lines) == 2 && lines[0].k.Cmp(lines[1].k) != 0 {
		// y0 + k0 (x − x0) = y1 + k1 (x − x1)
		num := new(big.Rat).Sub(new(big.Rat).Sub(lines[1].y0, new(big.Rat).Mul(lines[1].k, lines[1].x0)),
			new(big.Rat).Sub(lines[0].y0, new(big.Rat).Mul(lines[0].k, lines[0].x0)))
		x := num.Quo(num, new(big.Rat).Sub(lines[0].k, lines[1].k))
		if x.Cmp(ax) > 0 && x.Cmp(bx) < 0 {
			xs = append(xs, x)
		}
	}
	width := new(big.Rat).Sub(bx, ax)
	for j := range a.t {
		if j == A || j == B {
			continue
		}
		ya, yb := tOf(a, j), tOf(b, j)
		for _, x := range xs {
			// C's chord at x.
			c := new(big.Rat).Sub(x, ax)
			c.Mul(c, new(big.Rat).Sub(yb, ya)).Quo(c, width).Add(c, ya)
			if c.Cmp(bound(x)) > 0 {
				return false
			}
		}
	}
	return true
}

// inside is a point well inside (a, b): the decimal with the fewest places
// in its middle half, so that samples keep short figures (the engine's
// exact arithmetic stays in machine words), else the midpoint; ok is false
// when no decimal of compiled.DivisionScale places lies strictly between.
func inside(a, b decimal.Decimal) (decimal.Decimal, bool) {
	w := b.Sub(a)
	lo, hi := a.Add(w.Div(decimal.NewFromInt(4))), b.Sub(w.Div(decimal.NewFromInt(4)))
	mid := a.Add(b).Mul(half)
	for p := int32(0); p <= compiled.DivisionScale; p++ {
		if r := mid.Round(p); r.GreaterThanOrEqual(lo) && r.LessThanOrEqual(hi) && r.GreaterThan(a) && r.LessThan(b) {
			return r, true
		}
	}
	mid = mid.Round(compiled.DivisionScale)
	return mid, mid.GreaterThan(a) && mid.LessThan(b)
}

// straight reports whether the given options' values at m, which lies
// between a and b, are on the chords from a to b.
func straight(a, m, b *sample, options ...int) bool {
	f := y(a, m, b)
	exact := yExact(a, m, b)
	wa, wb, w := b.x.Sub(m.x), m.x.Sub(a.x), b.x.Sub(a.x)
	for _, i := range options {
		// f(m)·(b − a) against f(a)·(b − m) + f(b)·(m − a).
		bend := f(a, i).Mul(wa).Add(f(b, i).Mul(wb)).Sub(f(m, i).Mul(w)).Abs()
		if (exact && !bend.IsZero()) || (!exact && bend.GreaterThan(bendTolerance.Mul(w))) {
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
// Midpoint steps check whether both options are straight lines across the
// bracket (a quarter point checked too, so a curve cannot pass for a line);
// if they are, their crossing is solved exactly. Between them, secant
// steps (where the chords of the two options cross, written with as few
// decimal places as keep it inside) close in fast on a curved crossing; a
// secant step that does not halve the bracket is followed by a midpoint
// one. It returns the switch, or a sample in between where a third option
// is best (split there and look on both sides).
func (s *search) narrow(a, b *sample) (*Switch, *sample, error) {
	A, B := a.best, b.best
	secant := false
	// a2 and b2 are the samples a and b replaced last (on A's side and on
	// B's), for a switch where an option bends (kink); tried is the last
	// point kink confirmed or refuted.
	var a2, b2 *sample
	var tried *big.Rat
	for {
		if a.best == b.best {
			return nil, nil, nil
		}
		if a2 != nil && b2 != nil {
			if x := kinkPoint(a2, a, b, b2, A, B); x != nil && (tried == nil || tried.Cmp(x) != 0) {
				tried = x
				if sw, third, err := s.kink(x, a2, a, b, b2, A, B); err != nil || sw != nil || third != nil {
					return sw, third, err
				}
			}
		}
		width := b.x.Sub(a.x)
		mid := a.x.Add(b.x).Mul(half).Round(compiled.DivisionScale)
		if width.LessThanOrEqual(ulp) || mid.Equal(a.x) || mid.Equal(b.x) {
			m, err := s.sample(mid)
			if err != nil {
				return nil, nil, err
			}
			return &Switch{At: mid, Below: A, Above: B, Values: s.figures(m.values)}, nil, nil
		}
		x, atMid := mid, true
		if secant {
			if xs, ok := chordCrossing(a, b, A, B); ok {
				x, atMid = xs, false
			}
		}
		m, err := s.sample(x)
		if err != nil {
			return nil, nil, err
		}
		if m.best != A && m.best != B {
			return nil, m, nil
		}
		if !atMid && m.t[A].Equal(m.t[B]) {
			// The options are equal at a point the search landed on: an
			// exact switch, whatever the shape of the curves.
			return &Switch{At: x, Exact: true, Fraction: x.Rat(), Below: A, Above: B, Values: s.figures(m.values)}, nil, nil
		}
		if atMid && straight(a, m, b, A, B) && yExact(a, m, b) {
			q, err := s.sample(a.x.Add(mid).Mul(half).Round(compiled.DivisionScale))
			if err != nil {
				return nil, nil, err
			}
			if q.best != A && q.best != B {
				return nil, q, nil
			}
			if straight(a, q, m, A, B) && yExact(a, q, m) {
				if sw, err := s.crossing(a, b, A, B); err != nil || sw != nil {
					return sw, nil, err
				}
			}
		}
		if m.best == A {
			a, a2 = m, a
		} else {
			b, b2 = m, b
		}
		// Secant while it halves the bracket, a midpoint step otherwise.
		secant = !secant || b.x.Sub(a.x).Mul(two).LessThanOrEqual(width)
	}
}

// chordCrossing is where the chords of options A and B between a and b
// cross, written with the fewest decimal places that keep it strictly
// inside (a, b) and within a thousandth of the bracket of the exact
// crossing; ok is false when there is no such point.
func chordCrossing(a, b *sample, A, B int) (decimal.Decimal, bool) {
	f := y(a, b)
	da := f(a, A).Sub(f(a, B))
	db := f(b, A).Sub(f(b, B))
	den := da.Sub(db)
	if den.Sign() <= 0 {
		return decimal.Zero, false
	}
	width := b.x.Sub(a.x)
	x := a.x.Add(width.Mul(da).DivRound(den, compiled.DivisionScale))
	tol := width.Div(decimal.NewFromInt(1000))
	for places := int32(0); places <= compiled.DivisionScale; places++ {
		r := x.Round(places)
		if r.GreaterThan(a.x) && r.LessThan(b.x) && r.Sub(x).Abs().LessThanOrEqual(tol) {
			return r, true
		}
	}
	return decimal.Zero, false
}

// crossing solves where options A and B, straight lines between a and b,
// cross, exactly, and confirms it by solving the tree there (or either side
// of it when it is no finite decimal). It returns nil when the
// confirmation fails, so that narrowing goes on.
func (s *search) crossing(a, b *sample, A, B int) (*Switch, error) {
	x := lineZero(a, b, A, B)
	if x == nil || x.Cmp(a.x.Rat()) < 0 || x.Cmp(b.x.Rat()) > 0 {
		return nil, nil
	}
	return s.confirm(x, A, B)
}

// lineZero is where the lines of options A and B through samples p and q
// cross (x = p + (q − p) · dp / (dp − dq), d the difference A − B), or nil
// when they are parallel.
func lineZero(p, q *sample, A, B int) *big.Rat {
	f := y(p, q)
	dp := new(big.Rat).Sub(f(p, A).Rat(), f(p, B).Rat())
	dq := new(big.Rat).Sub(f(q, A).Rat(), f(q, B).Rat())
	den := new(big.Rat).Sub(dp, dq)
	if den.Sign() == 0 {
		return nil
	}
	px := p.x.Rat()
	x := new(big.Rat).Mul(new(big.Rat).Sub(q.x.Rat(), px), new(big.Rat).Quo(dp, den))
	return x.Add(x, px)
}

// kinkPoint is where a switch sits if it is at a bend of an option (an
// inner decision changing exactly there), where no bracket around it is
// straight: the options' lines through the two samples on A's side and
// through the two on B's side cross at one and the same point, strictly
// between a and b. It is nil otherwise.
func kinkPoint(a2, a, b, b2 *sample, A, B int) *big.Rat {
	if !yExact(a2, a) || !yExact(b, b2) {
		return nil
	}
	xl := lineZero(a2, a, A, B)
	if xl == nil || xl.Cmp(a.x.Rat()) <= 0 || xl.Cmp(b.x.Rat()) >= 0 {
		return nil
	}
	if xr := lineZero(b, b2, A, B); xr == nil || xr.Cmp(xl) != 0 {
		return nil
	}
	return xl
}

// kink confirms a switch at x (kinkPoint): a sample between a and x must
// lie on A's side's lines and one between x and b on B's side's, so that
// both options are straight from each side up to x, and then the switch
// is confirmed at x as crossing does. It returns nil when the
// confirmation fails, or a sample where a third option is best.
func (s *search) kink(x *big.Rat, a2, a, b, b2 *sample, A, B int) (*Switch, *sample, error) {
	at := decimal.NewFromBigRat(x, compiled.DivisionScale)
	// side samples between near (the sample of the side next to x) and x;
	// with far, the side's other sample, the three in order along x must
	// be straight for A and B, and best must be best there.
	side := func(far, near *sample, best int) (third *sample, ok bool, err error) {
		mid := near.x.Add(at).Mul(half).Round(compiled.DivisionScale)
		if !mid.GreaterThan(decimal.Min(near.x, at)) || !mid.LessThan(decimal.Max(near.x, at)) {
			return nil, false, nil
		}
		m, err := s.sample(mid)
		if err != nil {
			return nil, false, err
		}
		if m.best != A && m.best != B {
			return m, false, nil
		}
		lo, hi := far, m
		if far.x.GreaterThan(m.x) {
			lo, hi = m, far
		}
		return nil, m.best == best && straight(lo, near, hi, A, B) && yExact(lo, near, hi), nil
	}
	if third, ok, err := side(a2, a, A); err != nil || third != nil || !ok {
		return nil, third, err
	}
	if third, ok, err := side(b2, b, B); err != nil || third != nil || !ok {
		return nil, third, err
	}
	sw, err := s.confirm(x, A, B)
	return sw, nil, err
}

// confirm checks a switch between A and B at x, computed exactly from
// straight lines: by solving the tree there (or either side of it when it
// is no finite decimal). It returns nil when the check fails.
func (s *search) confirm(x *big.Rat, A, B int) (*Switch, error) {
	at := decimal.NewFromBigRat(x, compiled.DivisionScale)
	if at.Rat().Cmp(x) == 0 {
		// A finite decimal: solve the tree there.
		m, err := s.sample(at)
		if err != nil {
			return nil, err
		}
		if m.t[A].Equal(m.t[B]) && (m.best == A || m.best == B) {
			return &Switch{At: at, Exact: true, Fraction: x, Below: A, Above: B, Values: s.figures(m.values)}, nil
		}
		return nil, nil
	}
	// No finite decimal: the options must be best just below and just
	// above it.
	lo := decimal.NewFromBigRat(x, compiled.DivisionScale)
	if lo.Rat().Cmp(x) > 0 {
		lo = lo.Sub(ulp)
	}
	hi := lo.Add(ulp)
	below, err := s.sample(lo)
	if err != nil {
		return nil, err
	}
	above, err := s.sample(hi)
	if err != nil {
		return nil, err
	}
	if below.best != A || above.best != B {
		return nil, nil
	}
	// Every option's value at the crossing, on its line through below and
	// above (every option is straight there: the interval is far inside
	// one piece).
	g := y(below, above)
	values := make([]decimal.Decimal, len(below.values))
	w := new(big.Rat).Quo(new(big.Rat).Sub(x, lo.Rat()), ulp.Rat())
	for j := range values {
		v0, v1 := g(below, j).Rat(), g(above, j).Rat()
		v := new(big.Rat).Add(v0, new(big.Rat).Mul(w, new(big.Rat).Sub(v1, v0)))
		if below.mass.Equal(above.mass) && !below.mass.Equal(one) {
			v.Quo(v, below.mass.Rat())
		}
		values[j] = decimal.NewFromBigRat(v, compiled.DivisionScale)
	}
	return &Switch{At: at, Exact: true, Fraction: x, Below: A, Above: B, Values: s.figures(values)}, nil
}

// figures turns net values into the objective's terms.
func (s *search) figures(vs []decimal.Decimal) []decimal.Decimal {
	out := make([]decimal.Decimal, len(vs))
	for i, v := range vs {
		out[i] = s.obj.Figure(v)
	}
	return out
}

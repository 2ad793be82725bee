package tree

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"github.com/shopspring/decimal"
)

// The JSON interchange format (see DESIGN.md):
//
//	Model  = {"title": str?, "currency": str?, "objective": "max"|"min", "root": Node,
//	          "uncertainties": [Uncertainty]?, "tests": [Test]?}
//	Node   = {"type": "decision"|"chance"|"end", "label": str?, "branches": [Branch],
//	          "value": num? (end only), "uncertainty": str?, "test": str?}
//	Branch = {"label": str, "probability": num?, "cash": num?, "node": Node?}
//	Uncertainty = {"name": str, "label": str?, "states": [{"label": str, "probability": num}]}
//	Test   = {"name": str, "label": str?, "on": str, "cost": num?,
//	          "readings": [{"label": str, "likelihoods": [{"state": str, "probability": num}]}]}
//
// Numbers are JSON numbers or decimal strings, read exactly (never through
// float64). "uncertainties", "tests", and the node fields "uncertainty" and
// "test" are forkcast's extension for named events and imperfect tests. The
// annotations `solve --json` adds ("value" and "exact" at the top, "value"
// on inner nodes, "best" on decisions) are accepted and recomputed, so solved output reads
// back as a model.

// jv is a JSON value with the position it starts at.
type jv struct {
	pos  Pos
	kind byte // '{' '[' '"' 'n' (number) 'b' (bool) '0' (null)
	str  string
	keys []string
	vals []*jv
}

type jsonReader struct {
	obj   Objective
	src   []byte
	dec   *json.Decoder
	cur   cursor // where posAt last stopped
	ds    Diagnostics
	nodes int
	limit int
}

func (r *jsonReader) posAt(off int64) Pos {
	o := int(off)
	// Skip to the start of the next token.
	for o < len(r.src) && strings.IndexByte(" \t\r\n,:", r.src[o]) >= 0 {
		o++
	}
	o = min(o, len(r.src))
	// Positions are asked for in order, so a cursor moved forward keeps
	// the whole read linear (a minified model is one long line).
	if o < r.cur.off {
		r.cur = cursor{line: 1, col: 1}
	}
	for r.cur.off < o {
		c, size := utf8.DecodeRune(r.src[r.cur.off:o])
		r.cur.off += size
		if c == '\n' {
			r.cur.line, r.cur.col = r.cur.line+1, 1
		} else {
			r.cur.col++
		}
	}
	return Pos{Line: r.cur.line, Col: r.cur.col}
}

// cursor is a byte offset with its line and column.
type cursor struct{ off, line, col int }

// value reads one JSON value with positions, iteratively enough: objects
// and arrays recurse, which is bounded by the decoder's own nesting limit.
func (r *jsonReader) value() (*jv, error) {
	pos := r.posAt(r.dec.InputOffset())
	tok, err := r.dec.Token()
	if err != nil {
		return nil, err
	}
	v := &jv{pos: pos}
	switch t := tok.(type) {
	case json.Delim:
		switch t {
		case '{':
			v.kind = '{'
			for r.dec.More() {
				kpos := r.posAt(r.dec.InputOffset())
				kt, err := r.dec.Token()
				if err != nil {
					return nil, err
				}
				k, _ := kt.(string)
				for _, prev := range v.keys {
					if prev == k {
						r.ds.Add(kpos, "", "key %q appears twice in one object", k)
					}
				}
				c, err := r.value()
				if err != nil {
					return nil, err
				}
				v.keys = append(v.keys, k)
				v.vals = append(v.vals, c)
			}
		case '[':
			v.kind = '['
			for r.dec.More() {
				c, err := r.value()
				if err != nil {
					return nil, err
				}
				v.vals = append(v.vals, c)
			}
		}
		if _, err := r.dec.Token(); err != nil { // closing delimiter
			return nil, err
		}
	case string:
		v.kind, v.str = '"', t
	case json.Number:
		v.kind, v.str = 'n', string(t)
	case bool:
		v.kind = 'b'
	case nil:
		v.kind = '0'
	}
	return v, nil
}

func (v *jv) get(k string) *jv {
	for i, kk := range v.keys {
		if kk == k {
			return v.vals[i]
		}
	}
	return nil
}

func kindName(k byte) string {
	switch k {
	case '{':
		return "an object"
	case '[':
		return "an array"
	case '"':
		return "a string"
	case 'n':
		return "a number"
	case 'b':
		return "true or false"
	}
	return "null"
}

// fields checks that an object has only the allowed keys.
func (r *jsonReader) fields(v *jv, what string, allowed ...string) bool {
	if v.kind != '{' {
		r.ds.Add(v.pos, "", "%s must be an object, not %s", what, kindName(v.kind))
		return false
	}
	for i, k := range v.keys {
		ok := false
		for _, a := range allowed {
			ok = ok || a == k
		}
		if !ok {
			r.ds.Add(v.vals[i].pos, "the keys allowed here are "+QuoteList(allowed), "unknown key %q in %s", k, what)
		}
	}
	return true
}

func (r *jsonReader) str(v *jv, key, what string, required bool) string {
	c := v.get(key)
	if c == nil {
		if required {
			r.ds.Add(v.pos, "", "%s has no %q", what, key)
		}
		return ""
	}
	if c.kind != '"' {
		r.ds.Add(c.pos, "", "%q of %s must be a string, not %s", key, what, kindName(c.kind))
		return ""
	}
	return c.str
}

// num reads a number exactly: a JSON number or a decimal string.
func (r *jsonReader) num(v *jv, key, what string) Expr {
	c := v.get(key)
	if c == nil {
		return nil
	}
	if c.kind != 'n' && c.kind != '"' {
		r.ds.Add(c.pos, "write a number such as 0.25 or a decimal string such as \"0.25\"", "%q of %s must be a number, not %s", key, what, kindName(c.kind))
		return nil
	}
	d, err := decimal.NewFromString(strings.TrimSpace(c.str))
	if err != nil || strings.ContainsAny(c.str, "eE") && c.kind == '"' {
		r.ds.Add(c.pos, "write a plain decimal such as \"1234.5\"", "%q of %s is not a decimal number: %q", key, what, c.str)
		return nil
	}
	return &Number{At: c.pos, Value: d, Text: c.str}
}

func (r *jsonReader) array(v *jv, key, what string) []*jv {
	c := v.get(key)
	if c == nil {
		return nil
	}
	if c.kind != '[' {
		r.ds.Add(c.pos, "", "%q of %s must be an array, not %s", key, what, kindName(c.kind))
		return nil
	}
	return c.vals
}

// ReadJSON reads a model in the JSON interchange format. limit caps the
// number of nodes (0: DefaultNodeLimit). The model is read as written; it
// is checked when it is compiled. Diagnostics carry line and column in the JSON text.
func ReadJSON(src []byte, limit int) (*Model, Diagnostics) {
	if limit <= 0 {
		limit = DefaultNodeLimit
	}
	// A byte-order mark is accepted, as in the text language; positions
	// still count from the start of the first line.
	src = bytes.TrimPrefix(src, []byte("\ufeff"))
	r := &jsonReader{src: src, limit: limit, cur: cursor{line: 1, col: 1}}
	if len(bytes.TrimSpace(src)) == 0 {
		r.ds.Add(Pos{Line: 1, Col: 1}, "a model is an object such as {\"root\": {\"type\": \"decision\", ...}}", "the JSON input is empty")
		return nil, r.ds
	}
	r.dec = json.NewDecoder(bytes.NewReader(src))
	r.dec.UseNumber()
	top, err := r.value()
	if err == nil {
		if _, extra := r.dec.Token(); extra != io.EOF {
			err = fmt.Errorf("unexpected data after the model object")
		}
	}
	if err != nil {
		off := r.dec.InputOffset()
		if se, ok := err.(*json.SyntaxError); ok {
			off = se.Offset - 1
			if off < 0 {
				off = 0
			}
		}
		msg := err.Error()
		if err == io.ErrUnexpectedEOF || err == io.EOF {
			msg = "the JSON ends too early"
		}
		r.ds.Add(r.posAt(off), "", "JSON syntax: %s", strings.TrimPrefix(msg, "json: "))
		return nil, r.ds.Sort()
	}
	m := &Model{}
	if !r.fields(top, "the model", "title", "currency", "objective", "value", "exact", "root", "uncertainties", "tests") {
		return nil, r.ds
	}
	m.Title = r.str(top, "title", "the model", false)
	m.Currency = r.str(top, "currency", "the model", false)
	if o := top.get("objective"); o != nil {
		obj, ok := ParseObjective(r.str(top, "objective", "the model", false))
		if !ok {
			r.ds.Add(o.pos, "use \"max\" or \"min\"", "unknown objective %q", o.str)
		}
		m.Objective = obj
	}
	r.obj = m.Objective
	for _, uv := range r.array(top, "uncertainties", "the model") {
		if !r.fields(uv, "an uncertainty", "name", "label", "states") {
			continue
		}
		u := &Uncertainty{Name: r.str(uv, "name", "an uncertainty", true), Label: r.str(uv, "label", "an uncertainty", false), Pos: uv.pos}
		for _, sv := range r.array(uv, "states", "uncertainty "+u.Name) {
			if !r.fields(sv, "a state", "label", "probability") {
				continue
			}
			s := &State{Label: r.str(sv, "label", "a state", true), Pos: sv.pos, Prob: r.num(sv, "probability", "a state")}
			if s.Prob == nil {
				r.ds.Add(sv.pos, "", "state %q has no probability", s.Label)
			}
			u.States = append(u.States, s)
		}
		m.Uncertainties = append(m.Uncertainties, u)
	}
	for _, tv := range r.array(top, "tests", "the model") {
		if !r.fields(tv, "a test", "name", "label", "on", "cost", "readings") {
			continue
		}
		t := &Test{Name: r.str(tv, "name", "a test", true), Label: r.str(tv, "label", "a test", false),
			On: r.str(tv, "on", "a test", true), Cost: r.num(tv, "cost", "a test"), Pos: tv.pos}
		for _, rv := range r.array(tv, "readings", "test "+t.Name) {
			if !r.fields(rv, "a reading", "label", "likelihoods") {
				continue
			}
			rd := &Reading{Label: r.str(rv, "label", "a reading", true), Pos: rv.pos}
			for _, lv := range r.array(rv, "likelihoods", "reading "+rd.Label) {
				if !r.fields(lv, "a likelihood", "state", "probability") {
					continue
				}
				l := &Likelihood{State: r.str(lv, "state", "a likelihood", true), Prob: r.num(lv, "probability", "a likelihood"), Pos: lv.pos}
				if l.Prob == nil {
					r.ds.Add(lv.pos, "", "the likelihood for %q has no probability", l.State)
					continue
				}
				rd.Given = append(rd.Given, l)
			}
			t.Readings = append(t.Readings, rd)
		}
		m.Tests = append(m.Tests, t)
	}
	rv := top.get("root")
	if rv == nil {
		r.ds.Add(top.pos, "add \"root\": {\"type\": \"decision\", \"branches\": [...]}", "the model has no \"root\"")
		return m, r.ds.Sort()
	}
	m.Root = r.node(rv)
	return m, r.ds.Sort()
}

func (r *jsonReader) node(root *jv) *Node {
	type item struct {
		v   *jv
		dst **Node
	}
	var out *Node
	stack := []item{{root, &out}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		v := it.v
		r.nodes++
		if r.nodes > r.limit {
			r.ds.Add(v.pos, fmt.Sprintf("raise the limit (--max-nodes) if the model really is this large"), "the tree has more than %d nodes", r.limit)
			return out
		}
		if !r.fields(v, "a node", "type", "label", "branches", "value", "best", "uncertainty", "test") {
			continue
		}
		n := &Node{Pos: v.pos, Label: r.str(v, "label", "a node", false),
			Uncertainty: r.str(v, "uncertainty", "a node", false), Test: r.str(v, "test", "a node", false)}
		*it.dst = n
		switch t := r.str(v, "type", "a node", true); t {
		case "decision":
			n.Kind = KindDecision
		case "chance":
			n.Kind = KindChance
		case "end":
			n.Kind = KindEnd
		case "":
		default:
			r.ds.Add(v.get("type").pos, "use \"decision\", \"chance\" or \"end\"", "unknown node type %q", t)
		}
		if n.Kind != KindChance && (n.Uncertainty != "" || n.Test != "") {
			r.ds.Add(v.pos, "only a chance node can name an uncertainty or a test", "%s node has \"uncertainty\" or \"test\"", n.Kind)
		}
		if n.Uncertainty != "" && n.Test != "" {
			r.ds.Add(v.pos, "a node either samples an uncertainty or runs a test", "node has both \"uncertainty\" and \"test\"")
		}
		// "value" on an inner node and "best" are what `solve --json`
		// writes: accepted so solved output reads back, and recomputed.
		if n.Kind == KindEnd {
			// "value" is in the objective's terms; the model holds net value.
			if x := r.num(v, "value", "an end node"); x != nil {
				n.Payoff = x
				if r.obj == Min {
					n.Payoff = &Unary{At: x.Pos(), Op: '-', X: x}
				}
			}
		} else if vv := v.get("value"); vv != nil {
			r.num(v, "value", "a node")
		}
		what := fmt.Sprintf("node %q", n.Display())
		for _, bv := range r.array(v, "branches", what) {
			if !r.fields(bv, "a branch", "label", "probability", "cash", "node") {
				continue
			}
			b := &Branch{Pos: bv.pos, Label: r.str(bv, "label", "a branch", true),
				Prob: r.num(bv, "probability", "a branch")}
			// "cash" is in the objective's terms: a payoff under max, a
			// cost under min.
			if c := r.num(bv, "cash", "a branch"); c != nil {
				if r.obj == Min {
					b.Cost = c
				} else {
					b.Gain = c
				}
			}
			n.Branches = append(n.Branches, b)
			if nv := bv.get("node"); nv != nil {
				stack = append(stack, item{nv, &b.Node})
			}
		}
		// Restore model order for the stack: children were pushed in order,
		// so they pop in reverse; order of processing does not matter here
		// because each writes only its own slot.
	}
	return out
}

// Figures supplies the numbers WriteJSON writes: the figures of a checked
// (compiled) model. Nodes are numbered as the compiled form numbers them:
// the root is 0 and Child gives the node under a branch.
type Figures interface {
	// Child is the number of the node under branch j of node i.
	Child(i, j int) int
	// Cash is the net value of the branch into node i (gain − cost); Prob
	// its probability (chance branches, revised by Bayes' rule where a test
	// was read).
	Cash(i int) decimal.Decimal
	Prob(i int) decimal.Decimal
	// Payoff is an end node's own value (net).
	Payoff(i int) decimal.Decimal
	// Prior is the prior of state s of uncertainty u; Likelihood is
	// P(reading r | state s) of test t; TestCost the cost of test t, a
	// positive amount.
	Prior(u, s int) decimal.Decimal
	Likelihood(t, r, s int) decimal.Decimal
	TestCost(t int) decimal.Decimal
	// Exact is false when a figure was rounded (a division).
	Exact() bool
}

// Solved adds what `solve --json` writes: every node's value and every
// decision's optimal branches.
type Solved interface {
	Figures
	// Value is the expected value from node i on, in the objective's
	// terms.
	Value(i int) decimal.Decimal
	// Best lists the optimal branches of decision i, in model order.
	Best(i int) []int
}

// JSONOptions control WriteJSON.
type JSONOptions struct {
	// Solved, when set, annotates every node with its solved value, every
	// decision with its best branches and the top level with the root's
	// value.
	Solved Solved
	// Probabilities writes the probability of every chance branch,
	// including those under uncertainty and test nodes (revised by Bayes'
	// rule where a test was read). The reader accepts such a probability
	// when it equals the one the declarations give there, so the output
	// reads back.
	Probabilities bool
}

// WriteJSON writes a model in the interchange format with the figures fs
// gives (fs may be opts.Solved), numbers exact. With opts.Solved set it
// writes the solved tree as `solve --json` does: "value" on every node (an
// exact decimal string) and "best" on every decision.
func WriteJSON(w io.Writer, m *Model, fs Figures, opts JSONOptions) error {
	bw := bufio.NewWriter(w)
	jw := &jsonWriter{w: bw, opts: opts, m: m, fs: fs}
	jw.model()
	if err := bw.Flush(); err != nil {
		return err
	}
	return jw.err
}

type jsonWriter struct {
	w      *bufio.Writer
	opts   JSONOptions
	fs     Figures
	m      *Model
	err    error
	indent int
}

// maxJSONIndent caps the indentation, so that a very deep tree is written
// in linear space (a 100 000-level chain would otherwise need gigabytes).
const maxJSONIndent = 32

func (j *jsonWriter) nl() {
	j.w.WriteByte('\n')
	for i := 0; i < min(j.indent, maxJSONIndent); i++ {
		j.w.WriteString("  ")
	}
}

func (j *jsonWriter) key(first *bool, k string) {
	if !*first {
		j.w.WriteByte(',')
	}
	*first = false
	j.nl()
	j.quote(k)
	j.w.WriteString(": ")
}

func (j *jsonWriter) quote(s string) { j.w.WriteString(j.quoted(s)) }

func (j *jsonWriter) open(c byte) { j.w.WriteByte(c); j.indent++ }
func (j *jsonWriter) close(c byte, empty bool) {
	j.indent--
	if !empty {
		j.nl()
	}
	j.w.WriteByte(c)
}

// array writes n items, one per line; item writes the i-th.
func (j *jsonWriter) array(n int, item func(i int)) {
	j.open('[')
	for i := 0; i < n; i++ {
		if i > 0 {
			j.w.WriteByte(',')
		}
		j.nl()
		item(i)
	}
	j.close(']', n == 0)
}

// object writes an object whose keys body adds with key.
func (j *jsonWriter) object(body func(first *bool)) {
	first := true
	j.open('{')
	body(&first)
	j.close('}', false)
}

// str writes a string member, left out when empty.
func (j *jsonWriter) str(first *bool, k, v string) {
	if v != "" {
		j.key(first, k)
		j.quote(v)
	}
}

// raw writes a member whose value is already JSON (a number, true, false).
func (j *jsonWriter) raw(first *bool, k, v string) {
	j.key(first, k)
	j.w.WriteString(v)
}

// inline writes a short object on one line: {"k": v, ...}; vals are JSON.
func (j *jsonWriter) inline(kv ...string) {
	j.w.WriteByte('{')
	for i := 0; i < len(kv); i += 2 {
		if i > 0 {
			j.w.WriteString(", ")
		}
		j.quote(kv[i])
		j.w.WriteString(": " + kv[i+1])
	}
	j.w.WriteByte('}')
}

func (j *jsonWriter) quoted(s string) string {
	b, err := json.Marshal(s)
	if err != nil && j.err == nil {
		j.err = err
	}
	return string(b)
}

func (j *jsonWriter) model() {
	m := j.m
	fs := j.fs
	j.object(func(first *bool) {
		j.str(first, "title", m.Title)
		j.str(first, "currency", m.Currency)
		j.str(first, "objective", m.Objective.String())
		if j.opts.Solved != nil && m.Root != nil {
			j.str(first, "value", j.opts.Solved.Value(0).String())
			if !fs.Exact() {
				// A division was rounded: say so.
				j.raw(first, "exact", "false")
			}
		}
		if len(m.Uncertainties) > 0 {
			j.key(first, "uncertainties")
			j.array(len(m.Uncertainties), func(i int) {
				u := m.Uncertainties[i]
				j.object(func(f *bool) {
					j.str(f, "name", u.Name)
					j.str(f, "label", u.Label)
					j.key(f, "states")
					j.array(len(u.States), func(k int) {
						j.inline("label", j.quoted(u.States[k].Label), "probability", fs.Prior(i, k).String())
					})
				})
			})
		}
		if len(m.Tests) > 0 {
			j.key(first, "tests")
			j.array(len(m.Tests), func(i int) {
				t := m.Tests[i]
				u := m.Uncertainty(t.On)
				j.object(func(f *bool) {
					j.str(f, "name", t.Name)
					j.str(f, "label", t.Label)
					j.str(f, "on", t.On)
					j.raw(f, "cost", fs.TestCost(i).String())
					j.key(f, "readings")
					j.array(len(t.Readings), func(k int) {
						rd := t.Readings[k]
						j.w.WriteString(`{"label": ` + j.quoted(rd.Label) + `, "likelihoods": [`)
						if u != nil {
							for si, st := range u.States {
								if si > 0 {
									j.w.WriteString(", ")
								}
								j.inline("state", j.quoted(st.Label), "probability", fs.Likelihood(i, k, si).String())
							}
						}
						j.w.WriteString(`]}`)
					})
				})
			})
		}
		if m.Root != nil {
			j.key(first, "root")
			j.node(m.Root, 0)
		}
	})
	j.w.WriteByte('\n')
}

func (j *jsonWriter) node(n *Node, i int) {
	fs, obj := j.fs, j.m.Objective
	sv := j.opts.Solved
	j.object(func(first *bool) {
		j.str(first, "type", n.Kind.String())
		j.str(first, "label", n.Label)
		j.str(first, "uncertainty", n.Uncertainty)
		j.str(first, "test", n.Test)
		if sv != nil {
			j.str(first, "value", sv.Value(i).String())
		} else if n.Kind == KindEnd {
			if v := fs.Payoff(i); !v.IsZero() {
				j.raw(first, "value", obj.Figure(v).String())
			}
		}
		if sv != nil && n.Kind == KindDecision {
			best := sv.Best(i)
			q := make([]string, len(best))
			for k, b := range best {
				q[k] = j.quoted(n.Branches[b].Label)
			}
			j.raw(first, "best", "["+strings.Join(q, ", ")+"]")
		}
		if len(n.Branches) == 0 {
			return
		}
		named := n.Uncertainty != "" || n.Test != ""
		j.key(first, "branches")
		j.array(len(n.Branches), func(k int) {
			b := n.Branches[k]
			c := fs.Child(i, k)
			j.object(func(f *bool) {
				j.str(f, "label", b.Label)
				if n.Kind == KindChance && (!named || j.opts.Probabilities) {
					j.raw(f, "probability", fs.Prob(c).String())
				}
				if cash := fs.Cash(c); !cash.IsZero() {
					j.raw(f, "cash", obj.Figure(cash).String())
				}
				switch {
				case b.Node != nil && (sv != nil || !j.plainEnd(b.Node, c)):
					j.key(f, "node")
					j.node(b.Node, c)
				case b.Node == nil && sv != nil:
					// Solved output carries a value on every node, the end
					// a branch with nothing under it leads to included.
					j.key(f, "node")
					j.node(&Node{Kind: KindEnd}, c)
				}
			})
		})
	})
}

// plainEnd is an end node with nothing to say: the writer leaves it out,
// as the reader puts it back.
func (j *jsonWriter) plainEnd(n *Node, i int) bool {
	return n.Kind == KindEnd && n.Label == "" && j.fs.Payoff(i).IsZero()
}

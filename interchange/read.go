package interchange

import (
	"fmt"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/forkcast/forkcast/tree"
)

// MaxNesting is the deepest nesting of arrays and objects the reader
// accepts. A tree nests three levels for each level of nodes (the node,
// its "branches", a branch), so a model read from JSON may be about
// 333,000 nodes deep; nothing else in the format nests more than five
// deep. Deeper input is refused at the bracket that goes past the limit.
const MaxNesting = 1_000_000

// MaxErrors is the most errors one reading reports: past it, reading stops
// with a message that says so, so that a long array of mistakes costs no
// more than its first few.
const MaxErrors = 100

// Options control reading. The zero value gives the defaults.
type Options struct {
	// NodeLimit is the largest tree, in nodes, that reading may build:
	// every decision, chance and end node, the end of every path included
	// (so one node for the root and one for every branch). Reading stops
	// with an error at the branch that goes past it. 0 means
	// tree.DefaultNodeLimit.
	NodeLimit int
}

// Read reads a model in the JSON interchange format (docs/json.md) from r,
// as a stream: the text is read in chunks and never held whole, the tree is
// counted against opts.NodeLimit while it is read, and nesting is limited
// to MaxNesting, so memory stays in proportion to the model built whatever
// the input. Numbers are read exactly (never through float64); figures
// written as calculations are read with the text language's reader
// (lang.ParseExpr).
//
// The model is read as written; compiled.Compile checks it. Every problem
// found is reported with the line and column of the JSON text (inside a
// calculation, of its character); a syntax error or a limit stops reading
// there, and the model is then nil.
func Read(r io.Reader, opts Options) (*tree.Model, tree.Diagnostics) {
	return read(newScanner(r), opts)
}

// ReadBytes is Read on a model held in memory; it reads src in place.
func ReadBytes(src []byte, opts Options) (*tree.Model, tree.Diagnostics) {
	return read(newBytesScanner(src), opts)
}

// key lists, per kind of object, the keys it may hold; a key's index is
// its bit in the set of keys seen.
var (
	modelKeys = []string{"title", "currency", "objective", "inputs", "uncertainties", "tests", "root", "value", "exact",
		"risk_tolerance", "certainty_equivalent", "risk_premium", "expected_value_policy_value", "cost_of_caution", "risk_note",
		"correlations"}
	correlationKeys = []string{"a", "b", "rho"}
	splitKeys       = []string{"input", "rule"}
	inputKeys       = []string{"name", "value", "low", "high"}
	uncertaintyKeys = []string{"name", "label", "states"}
	stateKeys       = []string{"label", "probability"}
	testKeys        = []string{"name", "label", "on", "cost", "readings"}
	readingKeys     = []string{"label", "likelihoods", "rest"}
	likelihoodKeys  = []string{"state", "probability"}
	nodeKeys        = []string{"type", "label", "uncertainty", "test", "payoff", "value", "best", "branches", "split"}
	branchKeys      = []string{"label", "probability", "gain", "cost", "cash", "node"}
)

// Indices into the key lists above.
const (
	mTitle = iota
	mCurrency
	mObjective
	mInputs
	mUncertainties
	mTests
	mRoot
	mValue
	mExact
	mRiskTolerance
	// What `solve --json` adds under a risk tolerance (see
	// WriteOptions.Risk): recomputed, not read.
	mCertaintyEquivalent
	mRiskPremium
	mEVPolicyValue
	mCostOfCaution
	mRiskNote
	mCorrelations
)

const (
	nType = iota
	nLabel
	nUncertainty
	nTest
	nPayoff
	nValue
	nBest
	nBranches
	nSplit
)

const (
	bLabel = iota
	bProbability
	bGain
	bCost
	bCash
	bNode
)

type reader struct {
	s       *scanner
	ds      tree.Diagnostics
	errs    int
	stopped bool // a syntax error or a limit: nothing more is read
	limit   int
	nodes   int
	m       *tree.Model
	keyPos  tree.Pos // of the key last read
	unknown string   // the key last read, when it is none of the keys allowed

	// The objective may come after the tree, so amounts in its terms are
	// placed when the whole model has been read.
	cash    []pendingCash
	payoffs []*tree.Node
	// names are the names used in calculations, checked against the
	// inputs at the end.
	names []*tree.Name
}

func read(s *scanner, opts Options) (*tree.Model, tree.Diagnostics) {
	r := &reader{s: s, limit: opts.NodeLimit, m: &tree.Model{}}
	if r.limit <= 0 {
		r.limit = tree.DefaultNodeLimit
	}
	s.skipBOM()
	switch t := s.next(); t {
	case tEOF:
		r.ds.Add(tree.Pos{Line: 1, Col: 1}, "a model is an object such as {\"root\": {\"type\": \"decision\", ...}}", "the JSON input is empty")
		return nil, r.ds
	case tObject:
		r.model(s.pos)
	case tError:
		r.stop()
	default:
		r.err(s.pos, "a model is an object such as {\"root\": {\"type\": \"decision\", ...}}", "the model must be a JSON object, not %s", kindName(t))
		r.stopped = true
	}
	if !r.stopped {
		switch t := s.next(); t {
		case tEOF:
		case tError:
			r.stop()
		default:
			r.err(s.pos, "a file holds one model", "JSON syntax: unexpected data after the model object")
			r.stopped = true
		}
	}
	if r.stopped {
		return nil, r.ds.Sort()
	}
	r.finish()
	return r.m, r.ds.Sort()
}

// err reports an error; past MaxErrors reading stops.
func (r *reader) err(pos tree.Pos, hint, format string, args ...any) {
	r.errLen(pos, 0, hint, format, args...)
}

// errLen reports an error that spans n characters from pos.
func (r *reader) errLen(pos tree.Pos, n int, hint, format string, args ...any) {
	if r.stopped {
		return
	}
	r.errs++
	if r.errs > MaxErrors {
		r.ds.Add(pos, "fix the errors above first", "more than %d errors; reading stopped here", MaxErrors)
		r.stopped = true
		return
	}
	r.ds.Add(pos, hint, format, args...)
	r.ds[len(r.ds)-1].Len = n
}

// stop records the scanner's error and stops reading.
func (r *reader) stop() {
	if !r.stopped {
		d := r.s.diag
		if !strings.HasPrefix(d.Summary, "the JSON ") && !strings.HasPrefix(d.Summary, "reading the JSON") {
			d.Summary = "JSON syntax: " + d.Summary
		}
		r.ds = append(r.ds, d)
		r.stopped = true
	}
}

// syntax reports a token that cannot stand where it is, and stops.
func (r *reader) syntax(t tokKind, expected string) {
	if t == tError {
		r.stop()
		return
	}
	if t == tEOF {
		r.err(r.s.pos, "", "JSON syntax: the JSON ends too early")
	} else {
		r.err(r.s.pos, "", "JSON syntax: expected %s, found %s", expected, kindName(t))
	}
	r.stopped = true
}

func kindName(t tokKind) string {
	switch t {
	case tObject:
		return "an object"
	case tArray:
		return "an array"
	case tString:
		return "a string"
	case tNumber:
		return "a number"
	case tTrue, tFalse:
		return "true or false"
	case tNull:
		return "null"
	case tObjectEnd:
		return "`}`"
	case tArrayEnd:
		return "`]`"
	case tColon:
		return "`:`"
	case tComma:
		return "`,`"
	}
	return "the end of the JSON"
}

// member reads the next member's key in an object whose `{` has been read
// (first: no member read yet) and the colon after it. It returns the
// key's index in keys (-1 for a key that is none of them, kept in
// r.unknown) or done at the closing `}`; ok is false when reading stopped.
func (r *reader) member(first bool, keys []string) (k int, done, ok bool) {
	s := r.s
	s.keyCap = true
	t := s.next()
	if !first && t == tComma {
		t = s.next()
	} else if t == tObjectEnd {
		s.keyCap = false
		return 0, true, true
	} else if !first {
		s.keyCap = false
		r.syntax(t, "`,` or `}`")
		return 0, false, false
	}
	s.keyCap = false
	if t != tString {
		r.syntax(t, "a key in double quotes")
		return 0, false, false
	}
	r.keyPos = s.pos
	k = -1
	for i, key := range keys {
		if string(s.text) == key {
			k = i
			break
		}
	}
	if s.cut {
		k = -1
	}
	if k < 0 {
		r.unknown = shorten(string(s.text))
		if s.cut {
			r.unknown = shorten(string(s.text) + "…")
		}
	}
	if t := s.next(); t != tColon {
		r.syntax(t, "`:` after the key")
		return 0, false, false
	}
	return k, false, true
}

// element reads up to the start of the next element of an array whose `[`
// has been read, returning the element's first token, or done at `]`.
func (r *reader) element(first bool) (t tokKind, done, ok bool) {
	t = r.s.next()
	if t == tArrayEnd {
		return t, true, true
	}
	if !first {
		if t != tComma {
			r.syntax(t, "`,` or `]`")
			return t, false, false
		}
		t = r.s.next()
	}
	if !startsValue(t) {
		r.syntax(t, "a value")
		return t, false, false
	}
	return t, false, true
}

func startsValue(t tokKind) bool {
	switch t {
	case tObject, tArray, tString, tNumber, tTrue, tFalse, tNull:
		return true
	}
	return false
}

// keyCheck handles an unknown or repeated key: it reports it and skips
// the value. It reports whether the value is still to be read.
func (r *reader) keyCheck(k int, seen *uint32, what string, keys []string) bool {
	if k < 0 {
		r.errLen(r.keyPos, utf8.RuneCountInString(r.unknown)+2, "the keys allowed here are "+tree.QuoteList(keys), "unknown key %q in %s", r.unknown, what)
		r.skip(r.nextDiscard())
		return false
	}
	if *seen&(1<<k) != 0 {
		r.err(r.keyPos, "", "key %q appears twice in one object", keys[k])
		r.skip(r.nextDiscard())
		return false
	}
	*seen |= 1 << k
	return true
}

// object reads the members of an object whose `{` has been read, calling
// f for each allowed key; f reads the value. Unknown and repeated keys are
// reported and their values skipped.
func (r *reader) object(what string, keys []string, f func(k int)) {
	var seen uint32
	for first := true; !r.stopped; first = false {
		k, done, ok := r.member(first, keys)
		if !ok || done {
			return
		}
		if r.keyCheck(k, &seen, what, keys) {
			f(k)
		}
	}
}

// array reads the elements of an array value; t is its first token. Each
// element that is an object is read by f (its `{` read); others are
// reported and skipped.
func (r *reader) array(t tokKind, key, owner, elem string, f func()) {
	if t != tArray {
		r.wrongType(t, fmt.Sprintf("%q of %s must be an array, not %s", key, owner, kindName(t)), "")
		return
	}
	for first := true; !r.stopped; first = false {
		t, done, ok := r.element(first)
		if !ok || done {
			return
		}
		if t != tObject {
			r.wrongType(t, fmt.Sprintf("%s must be an object, not %s", elem, kindName(t)), "")
			continue
		}
		f()
	}
}

// wrongType reports a value of the wrong type at its position and skips
// it.
func (r *reader) wrongType(t tokKind, msg, hint string) {
	if !startsValue(t) {
		r.syntax(t, "a value")
		return
	}
	r.err(r.s.pos, hint, "%s", msg)
	r.skip(t)
}

// nextDiscard reads the next token, not keeping a string's value (it is
// about to be skipped).
func (r *reader) nextDiscard() tokKind {
	r.s.discard = true
	return r.s.next()
}

// skip skips a value whose first token is t, checking its syntax. Nesting
// is followed with a stack of bits (one per level: object or array), not by
// recursion.
func (r *reader) skip(t tokKind) {
	if r.stopped {
		return
	}
	if !startsValue(t) {
		r.syntax(t, "a value")
		return
	}
	if t != tObject && t != tArray {
		return
	}
	var objs []uint64 // bit set: the container at that depth is an object
	depth := 0
	push := func(t tokKind) {
		if depth/64 == len(objs) {
			objs = append(objs, 0)
		}
		if t == tObject {
			objs[depth/64] |= 1 << (depth % 64)
		} else {
			objs[depth/64] &^= 1 << (depth % 64)
		}
		depth++
	}
	inObject := func() bool { return objs[(depth-1)/64]&(1<<((depth-1)%64)) != 0 }
	push(t)
	open := true // just after `{` or `[`
	for depth > 0 {
		t := r.nextDiscard()
		switch {
		case inObject() && t == tObjectEnd, !inObject() && t == tArrayEnd:
			depth--
			open = false
			continue
		case !open && t != tComma:
			r.syntax(t, map[bool]string{true: "`,` or `}`", false: "`,` or `]`"}[inObject()])
			return
		case !open:
			t = r.nextDiscard()
		}
		open = false
		if inObject() {
			if t != tString {
				r.syntax(t, "a key in double quotes")
				return
			}
			if c := r.s.next(); c != tColon {
				r.syntax(c, "`:` after the key")
				return
			}
			t = r.nextDiscard()
		}
		if !startsValue(t) {
			r.syntax(t, "a value")
			return
		}
		if t == tObject || t == tArray {
			push(t)
			open = true
		}
	}
}

// str reads a string value; ok is false (and the value reported and
// skipped) when it is not a string.
func (r *reader) str(key, what string) (string, tree.Pos, bool) {
	t := r.s.next()
	if t != tString {
		r.wrongType(t, fmt.Sprintf("%q of %s must be a string, not %s", key, what, kindName(t)), "")
		return "", r.s.pos, false
	}
	return string(r.s.text), r.s.pos, true
}

// label reads a string shown to people: control characters are refused,
// as in the text language.
func (r *reader) label(key, what string) string {
	v, _, ok := r.str(key, what)
	if !ok {
		return ""
	}
	k := 0
	for _, c := range v {
		if unicode.IsControl(c) {
			r.err(r.s.tok().at(k), "remove it: it is invisible, and a terminal showing the text would act on it",
				"the control character U+%04X in %q of %s", c, key, what)
			break
		}
		k++
	}
	return v
}

package lang

import (
	"os"
	"sync"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
)

// Options control reading. The zero value gives the defaults.
type Options struct {
	// NodeLimit is the largest tree, in nodes, that reading may build;
	// subtree expansion stops with an error past it. 0 means
	// tree.DefaultNodeLimit.
	NodeLimit int
}

// maxLimit keeps saturating arithmetic on sizes far from overflow.
const maxLimit = 1 << 50

// getParsers returns the line parsers, built on first use. They are only
// read after that.
var getParsers = sync.OnceValue(newParsers)

// Parse reads a model's text. It returns the model, lowered to package tree
// with every `use` expanded (possibly partial when there are errors), and
// every syntax and structure problem found in the file, sorted by position.
// It does not evaluate expressions or check probabilities: that is
// [compiled.Compile], which [Load] runs.
func Parse(src []byte, opts Options) (*tree.Model, tree.Diagnostics) {
	b := newBuilder(opts)
	b.read(src)
	return b.done(src)
}

func newBuilder(opts Options) *builder {
	b := &builder{
		limit:   opts.NodeLimit,
		m:       &tree.Model{},
		headers: map[lineKind]int{},
		subs:    map[string]*subtreeDef{},
		useAt:   map[*tree.Node]*useRef{},

		suggestBudget: suggestBudget,
	}
	if b.limit <= 0 {
		b.limit = tree.DefaultNodeLimit
	}
	b.limit = min(b.limit, maxLimit)
	return b
}

// done runs the checks that need the whole file and returns the model and
// the diagnostics, sorted.
func (b *builder) done(src []byte) (*tree.Model, tree.Diagnostics) {
	b.finish()
	fillLen(src, b.ds)
	return b.m, b.ds.Sort()
}

// Load reads a model's text like [Parse] and, when that finds no errors,
// compiles it ([compiled.Compile]): expressions are evaluated,
// probabilities checked, the tree laid out for solving. It returns every
// diagnostic, errors and warnings from both steps, sorted by position; the
// compiled model is nil when there are errors.
func Load(src []byte, opts Options) (*compiled.Model, tree.Diagnostics) {
	m, ds := Parse(src, opts)
	if ds.HasErrors() {
		return nil, ds
	}
	c, cs := compile(m)
	fillLen(src, cs)
	return c, append(ds, cs...).Sort()
}

// LoadFile reads and compiles the model in the file at path, as [Load]
// does a text held whole, with the same diagnostics, but reads the file
// as a stream: only a few of its lines are held at a time, so reading a
// large model costs memory for the model, not for its text as well. The
// file is read a second time only when a diagnostic needs its text (to
// mark the span of a figure that compiling found wrong). err is an error
// reading the file; problems in the model are diagnostics.
func LoadFile(path string, opts Options) (c *compiled.Model, ds tree.Diagnostics, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	b := newBuilder(opts)
	if err := b.readFrom(f, streamBuffer); err != nil {
		return nil, nil, err
	}
	b.finish()
	ds = b.ds
	if !ds.HasErrors() {
		var cs tree.Diagnostics
		c, cs = compile(b.m)
		ds = append(ds, cs...)
	}
	for _, d := range ds {
		if d.Len == 0 && d.Pos.IsValid() {
			src, err := os.ReadFile(path)
			if err != nil {
				return nil, nil, err
			}
			fillLen(src, ds)
			break
		}
	}
	return c, ds.Sort(), nil
}

// streamBuffer is the size of the buffer LoadFile reads through.
const streamBuffer = 256 << 10

// parseLine sets the line's kind and parses it.
func (ps *parsers) parseLine(l *srcLine) {
	if len(l.lx.toks) == 0 {
		return
	}
	first := l.first()
	switch first.Type {
	case tokString:
		l.kind = kItem
	case tokIdent:
		k, ok := lineKinds[first.Value]
		if !ok {
			l.kind = kUnknown
			return
		}
		l.kind = k
	default:
		l.kind = kStray
		return
	}
	if l.lx.noParse || l.kind == kRisk {
		return
	}
	ps.slowParse(l)
}

// slowParse parses a line of known kind with participle.
func (ps *parsers) slowParse(l *srcLine) {
	if l.kind == kNone {
		first := l.first()
		l.kind = lineKinds[first.Value]
		if first.Type == tokString {
			l.kind = kItem
		}
	}
	toks := l.lx.toks
	eof := lexer.Position{Line: l.num, Column: l.lx.endCol}
	var ast any
	var err error
	switch l.kind {
	case kTitle:
		ast, err = parseWith(ps.title, toks, eof)
	case kCurrency:
		ast, err = parseWith(ps.currency, toks, eof)
	case kObjective:
		ast, err = parseWith(ps.objective, toks, eof)
	case kLet:
		ast, err = parseWith(ps.let, toks, eof)
	case kUncertainty:
		ast, err = parseWith(ps.uncertainty, toks, eof)
	case kTest:
		ast, err = parseWith(ps.test, toks, eof)
	case kSubtree:
		ast, err = parseWith(ps.subtree, toks, eof)
	case kDecision:
		ast, err = parseWith(ps.decision, toks, eof)
	case kChance:
		ast, err = parseWith(ps.chance, toks, eof)
	case kUse:
		ast, err = parseWith(ps.use, toks, eof)
	case kCorrelate:
		ast, err = parseWith(ps.correlate, toks, eof)
	case kItem:
		ast, err = parseWith(ps.item, toks, eof)
	}
	if err != nil {
		l.err = err
		return
	}
	l.ast = ast
}

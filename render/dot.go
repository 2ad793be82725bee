package render

import (
	"bytes"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Options shape the picture of a tree. The zero value draws the whole tree
// with labels wrapped at DefaultWrapWidth characters.
type Options struct {
	// PolicyOnly draws only what the optimal policy can reach: at each
	// decision the options it rejects are folded into one stub that says
	// how many there are and what the best of them is worth.
	PolicyOnly bool
	// MaxDepth, when positive, cuts the tree at that depth (the root is at
	// depth 0): a node at MaxDepth with anything under it is drawn as a
	// small stub that says how many nodes it stands for and its expected
	// value. Zero draws every level; a negative value is an error.
	MaxDepth int
	// WrapWidth is the line length, in characters, at which long labels
	// are wrapped at spaces; zero means DefaultWrapWidth.
	WrapWidth int
	// Currency, when not empty, replaces the model's currency code in the
	// money shown (it changes the code and the number of decimals, not the
	// amounts).
	Currency string
	// MaxDrawn is the most nodes a drawing may have (stubs included); zero
	// means DefaultMaxDrawn. DOT refuses a bigger one with a *TooBigError:
	// Graphviz's layout time grows faster than the tree, and a picture of
	// tens of thousands of nodes is no longer read.
	MaxDrawn int
}

// DefaultMaxDrawn is the largest drawing DOT makes unless Options.MaxDrawn
// says otherwise.
const DefaultMaxDrawn = 10_000

// TooBigError is DOT's answer to a drawing with more nodes than
// Options.MaxDrawn allows.
type TooBigError struct {
	Nodes, Limit int
}

func (e *TooBigError) Error() string {
	return fmt.Sprintf("render: the drawing would have %d nodes, more than the limit of %d; draw the optimal policy only or cut it at a depth", e.Nodes, e.Limit)
}

// DefaultWrapWidth is the line length labels are wrapped at unless
// Options.WrapWidth says otherwise.
const DefaultWrapWidth = 24

// The picture's look: a restrained, printable palette. The optimal policy
// is told apart by weight and colour together (thick dark blue against thin
// mid-grey), so it survives greyscale print and colour-blind readers; the
// options a decision rejects are dashed and carry a double bar.
const (
	fontFamily = "Helvetica" // one name: Graphviz then measures text with its Helvetica metrics (a list makes it fall back to Times, too narrow) and writes font-family="Helvetica,sans-Serif" in SVG
	padPt      = 21.6        // margin around the picture, points (0.3 inch)

	colInk      = "#1f1f1f" // text on the optimal path, titles
	colInkSoft  = "#595959" // text elsewhere (7:1 on white)
	colPolicy   = "#1c4b8c" // the optimal policy: strokes and values
	colFill     = "#e2eaf5" // the optimal policy: shape fill
	colOther    = "#8c8c8c" // other branches
	colNode     = "#6b6b6b" // other shapes' outlines
	colPruned   = "#9e9e9e" // rejected options
	colPaper    = "#ffffff"
	penPolicy   = "3"
	penOther    = "1"
	bandPolicy  = 3 // the rule under a branch label: as thick as the branch
	bandOther   = 1
	penPolicyNd = "2.0"
	penNode     = "1.2"

	fontNode  = 10.0 // node text, points
	fontEdge  = 9.0  // branch text
	fontTitle = 16.0
	lineNode  = 12.0 // line height of node text (fontsize × 1.2)

	sizeDecision = 0.30 // inches: side of the square
	sizeChance   = 0.34 // diameter of the circle
	sizeEnd      = 0.30 // width and height of the triangle's box
	pruneMark    = "‖"
)

// ErrNoTree is returned when there is no solved tree to draw.
var ErrNoTree = errors.New("render: no solved tree to draw")

// DOT writes the solved tree as a graph in the Graphviz DOT language,
// drawn left to right: decisions as squares, chance nodes as circles, end
// nodes as triangles, every branch with its label, probability and cash
// flow (as a gain or a cost). Every figure says what it counts: a node's
// value is "from here" (what follows it, not the cash on the branch into
// it); each option of a decision has its "option" value, its own cash
// included, which is what the decision compares; every end node has its
// path's total and probability. The optimal policy
// is thick and dark blue; the options a decision rejects are dashed and
// marked ‖.
//
// The graph is laid out already (every node and edge has its position, and
// the graph says layout=nop2): package render/graphviz, or Graphviz's own
// tools (dot -Tsvg), only draw it. Each branch is a small label node (the
// branch's name above a rule, its figures below) between two straight
// edges.
//
// In the SVG Graphviz makes of it, every element on the optimal policy
// (the nodes, labels and edges the policy reaches from the root) has the
// class "optimal"; nodes also have the class of their kind (decision,
// chance, end, stub), branches "branch" and rejected ones "pruned". Ids
// are stable: nodes are n0, n1, … in the tree's pre-order (a node keeps its
// id whatever the options), the branch into node nK is bK (its label), eK
// (the edge into the label) and fK (the edge on to nK), and the stub for
// the options decision K rejects is bKx, reached by eKx.
//
// The output depends only on its inputs.
func DOT(sol *eval.Solution, opts Options) ([]byte, error) {
	p, err := Layout(sol, opts)
	if err != nil {
		return nil, err
	}
	return p.DOT, nil
}

// Picture is a solved tree laid out for drawing: the DOT text Graphviz
// draws (as DOT describes it) and the size of the picture that makes.
type Picture struct {
	DOT []byte
	// Width and Height are the picture's size in points (1/72 inch),
	// margins and heading included, worked out from the layout before
	// anything is drawn: a program can refuse a picture too big to paint
	// without painting it. Text is measured with estimated font metrics,
	// so the picture drawn may differ by a few points.
	Width, Height float64
}

// Layout lays the solved tree out: the DOT text of DOT, and the size of
// the picture. Its errors are DOT's.
func Layout(sol *eval.Solution, opts Options) (*Picture, error) {
	if sol == nil || sol.Root == nil || sol.Model == nil {
		return nil, ErrNoTree
	}
	if opts.MaxDepth < 0 {
		return nil, fmt.Errorf("render: depth %d: give a positive depth, or 0 for the whole tree", opts.MaxDepth)
	}
	if opts.WrapWidth < 0 {
		return nil, fmt.Errorf("render: wrap width %d is negative", opts.WrapWidth)
	}
	d := &drawer{sol: sol, opts: opts, m: sol.Model, cur: sol.Model.Currency}
	if opts.Currency != "" {
		d.cur = opts.Currency
	}
	d.wrap = opts.WrapWidth
	if d.wrap == 0 {
		d.wrap = DefaultWrapWidth
	}
	if err := d.index(); err != nil {
		return nil, err
	}
	steps := d.plan()
	limit := opts.MaxDrawn
	if limit <= 0 {
		limit = DefaultMaxDrawn
	}
	if len(steps) > limit {
		return nil, &TooBigError{Nodes: len(steps), Limit: limit}
	}
	w, h := d.graph(steps)
	return &Picture{DOT: d.buf.Bytes(), Width: w, Height: h}, nil
}

// drawer writes one graph.
type drawer struct {
	sol  *eval.Solution
	m    *tree.Model
	opts Options
	cur  string
	wrap int
	buf  bytes.Buffer
	// nodes is the solution's pre-order; the slices below are indexed
	// alike. They are worked out once, in one sweep, so that drawing a
	// node costs the same however many siblings or ancestors it has.
	nodes  []eval.Solved
	on     []bool                // reached by the optimal policy
	depth  []int32               // branches from the root
	chosen []int32               // at a decision, the index of the node its policy takes; else -1
	ends   map[int]eval.EndPoint // end nodes by index
}

// index works out which nodes the policy reaches and the end points.
func (d *drawer) index() error {
	d.nodes = d.sol.Nodes()
	if len(d.nodes) == 0 || d.sol.Root != &d.nodes[0] {
		return ErrNoTree
	}
	for i := range d.nodes {
		s := &d.nodes[i]
		if s.Node == nil {
			return errors.New("render: the solved tree has a missing node")
		}
		if p := s.Parent(); p != nil && (s.Via() < 0 || s.Via() >= len(p.Node.Branches)) {
			return errors.New("render: the solved tree does not match its model")
		}
	}
	d.on = make([]bool, len(d.nodes))
	d.depth = make([]int32, len(d.nodes))
	d.chosen = make([]int32, len(d.nodes))
	d.on[0] = true
	d.chosen[0] = -1
	for i := 1; i < len(d.nodes); i++ {
		s := &d.nodes[i]
		p := s.Parent()
		d.on[i] = d.on[p.Index()] && d.takes(p, s.Via())
		d.depth[i] = d.depth[p.Index()] + 1
		d.chosen[i] = -1
		if p.Node.Kind == tree.KindDecision && p.Chosen() == s.Via() {
			d.chosen[p.Index()] = int32(i)
		}
	}
	d.ends = map[int]eval.EndPoint{}
	for _, e := range d.sol.Ends() {
		d.ends[e.Index()] = e
	}
	return nil
}

// takes reports whether the policy, once at s, follows branch j.
func (d *drawer) takes(s *eval.Solved, j int) bool {
	return s.Node.Kind != tree.KindDecision || s.Chosen() == j
}

// optionValue is the value of the option at a decision that leads to s:
// the cash on the branch into s plus the value of s.
func (d *drawer) optionValue(s *eval.Solved) decimal.Decimal {
	return s.Parent().BranchValue(s.Via())
}

// tiesChosen reports whether s, under a decision, is reached by an option
// as good as the one its policy takes (true for that option itself).
func (d *drawer) tiesChosen(s *eval.Solved) bool {
	p := s.Parent()
	c := d.chosen[p.Index()]
	if c < 0 {
		return false
	}
	return int(c) == s.Index() || (p.Tied() && d.optionValue(s).Equal(d.optionValue(&d.nodes[c])))
}

// runnerUp is, at a decision with at least two options, the best option
// it does not take (the first such in model order), found in one pass
// over the options; ok is false when there is none.
func (d *drawer) runnerUp(s *eval.Solved) (kid *eval.Solved, ok bool) {
	c := d.chosen[s.Index()]
	if s.Node.Kind != tree.KindDecision || len(s.Node.Branches) < 2 || c < 0 {
		return nil, false
	}
	obj := d.m.Objective
	var best decimal.Decimal
	for _, k := range s.Kids() {
		if k.Index() == int(c) {
			continue
		}
		if v := obj.Net(d.optionValue(k)); kid == nil || v.GreaterThan(best) {
			kid, best = k, v
		}
	}
	return kid, kid != nil
}

// graph writes the graph and returns the size of its picture in points.
func (d *drawer) graph(steps []step) (width, height float64) {
	b := &d.buf
	name := d.m.Title
	if name == "" {
		name = "Decision tree"
	}
	items := d.layout(steps)
	title, tw, th := d.titleLabel()
	w, h := extent(items)
	// Graphviz keeps 8 points clear around what it draws, besides the pad
	// (measured against its pictures: within a few points).
	width, height = max(w, tw)+2*padPt+16, h+th+2*padPt+14
	fmt.Fprintf(b, "digraph %s {\n", quote(name))
	// layout=nop2: the positions below are final (see layout); Graphviz
	// only sizes the labels and draws.
	fmt.Fprintf(b, "\tgraph [layout=nop2 splines=true pad=%g bgcolor=%q class=\"forkcast\" fontname=%q labelloc=t labeljust=l label=<%s>]\n",
		padPt/72, colPaper, fontFamily, title)
	fmt.Fprintf(b, "\tnode [fontname=%q fontsize=%g fontcolor=%q fixedsize=shape penwidth=%s color=%q]\n",
		fontFamily, fontNode, colInk, penNode, colNode)
	fmt.Fprintf(b, "\tedge [arrowhead=none penwidth=%s color=%q]\n", penOther, colOther)
	// Nodes and labels first, then the edges: rejected options, other
	// branches, the optimal policy.
	for _, it := range items {
		if l := it.label; l != nil {
			fmt.Fprintf(b, "\t%s pos=\"%s\"]\n", l.def, xy(l.x, it.y))
		}
		if !it.st.others {
			fmt.Fprintf(b, "\t%s pos=\"%s\"]\n", it.node.def, xy(it.x, it.y))
		}
	}
	for _, layer := range []look{lookPruned(), lookOther(), lookPolicy()} {
		for _, it := range items {
			l := it.label
			if l == nil || l.look.color != layer.color || l.look.dashed != layer.dashed {
				continue
			}
			p := it.parent
			// Graphviz draws a node's edges in its own order, so branches
			// must not overlap: at a decision only the option taken starts
			// with the level stub; the others start where it ends.
			path := fan(p.x+p.node.east, p.y, l.x-l.w/2, it.y)
			ps := &d.nodes[p.st.i]
			if ps.Node.Kind == tree.KindDecision && (it.st.others || d.nodes[it.st.i].Via() != ps.Chosen()) {
				path = line(p.x+p.node.east+fanStub, p.y, l.x-l.w/2, it.y)
			}
			fmt.Fprintf(b, "\tn%d -> %s [id=\"e%s\" class=%q%s pos=\"%s\"]\n",
				p.st.i, l.id, strings.TrimPrefix(l.id, "b"), l.look.class, l.look.edgeAttrs(), path)
			if !it.st.others {
				fmt.Fprintf(b, "\t%s -> n%d [id=\"f%d\" class=%q%s pos=\"%s\"]\n",
					l.id, it.st.i, it.st.i, l.look.class, l.look.edgeAttrs(),
					line(l.x+l.w/2, it.y, it.x+it.node.west, it.y))
			}
		}
	}
	b.WriteString("}\n")
	return width, height
}

// step is one thing to draw: node i with the branch into it, or (others)
// the stub for the options decision i rejects.
type step struct {
	i      int
	others bool
}

// cut reports whether MaxDepth stops the drawing at s.
func (d *drawer) cut(s *eval.Solved) bool {
	return d.opts.MaxDepth > 0 && int(d.depth[s.Index()]) >= d.opts.MaxDepth
}

// plan lists what is drawn, in pre-order (without recursion): each node's
// branches in model order, top to bottom, and the stub for a decision's
// other options after the option it takes.
func (d *drawer) plan() []step {
	var out []step
	stack := []step{{i: 0}}
	for len(stack) > 0 {
		st := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		out = append(out, st)
		s := &d.nodes[st.i]
		if st.others || d.cut(s) {
			continue
		}
		kids := s.Kids()
		if d.opts.PolicyOnly && s.Node.Kind == tree.KindDecision && len(kids) > 0 {
			if _, ok := d.runnerUp(s); ok {
				stack = append(stack, step{i: st.i, others: true})
			}
			if c := s.Chosen(); c >= 0 && c < len(kids) {
				stack = append(stack, step{i: kids[c].Index()})
			}
			continue
		}
		for j := len(kids) - 1; j >= 0; j-- {
			stack = append(stack, step{i: kids[j].Index()})
		}
	}
	return out
}

// titleLabel is the graph's heading, flush left: the title, the answer
// and a key to the drawing; with its estimated width and height in points.
func (d *drawer) titleLabel() (label string, width, height float64) {
	var h htmlText
	row := func(size float64, color string, bold bool, text string) {
		h.raw(`<TR><TD ALIGN="LEFT" CELLPADDING="1">`)
		h.font(size, color, bold, text)
		h.raw(`</TD></TR>`)
		width = max(width, textWidth(text, size, bold)+2)
		height += size*1.2 + 2
	}
	h.raw(`<TABLE BORDER="0" CELLBORDER="0" CELLSPACING="0" CELLPADDING="0">`)
	if d.m.Title != "" {
		row(fontTitle, colInk, true, clean(d.m.Title))
	}
	root := d.sol.Root
	line := d.totalText(root.Value())
	if root.Node.Kind == tree.KindDecision && root.Chosen() >= 0 {
		line = "Best: " + clean(root.Node.Branches[root.Chosen()].Label) + " · " + line
	}
	row(fontNode+1, colInk, false, line)
	key := "Thick blue: the optimal policy · dashed " + pruneMark + ": an option not taken"
	if d.opts.PolicyOnly {
		key += " · only the optimal policy drawn"
	}
	if d.opts.MaxDepth > 0 {
		key += fmt.Sprintf(" · cut at depth %d", d.opts.MaxDepth)
	}
	row(fontEdge, colInkSoft, false, key)
	row(fontEdge, colInkSoft, false, d.figuresKey())
	h.raw(`<TR><TD CELLPADDING="1" HEIGHT="8"></TD></TR></TABLE>`)
	return h.String(), width, height + 10
}

// look is how one branch is drawn.
type look struct {
	class  string
	color  string
	pen    string
	band   int // thickness of the rule under the label, points
	dashed bool
	ink    string
	bold   bool
}

func (l look) edgeAttrs() string {
	s := fmt.Sprintf(" color=%q penwidth=%s", l.color, l.pen)
	if l.dashed {
		s += " style=dashed"
	}
	return s
}

// The three ways a branch is drawn.
func lookPolicy() look {
	return look{class: "branch optimal", color: colPolicy, pen: penPolicy, band: bandPolicy, ink: colInk, bold: true}
}

func lookOther() look {
	return look{class: "branch", color: colOther, pen: penOther, band: bandOther, ink: colInkSoft}
}

func lookPruned() look {
	return look{class: "branch pruned", color: colPruned, pen: penOther, band: bandOther, dashed: true, ink: colInkSoft}
}

// branchLook is how the branch into s is drawn.
func (d *drawer) branchLook(s *eval.Solved) look {
	p := s.Parent()
	switch {
	case d.on[s.Index()]:
		return lookPolicy()
	case p.Node.Kind == tree.KindDecision && p.Chosen() != s.Via():
		return lookPruned()
	}
	return lookOther()
}

// labelSpec is a branch label: the node (id bK, or bKx for the stub of
// the options decision K rejects) that carries the branch's name above a
// rule and its probability and cash flow below.
type labelSpec struct {
	id           string
	look         look
	above, below []string
}

// width is the label's estimated width in points, padding included.
func (l labelSpec) width() float64 {
	w := 0.0
	for _, s := range l.above {
		w = max(w, textWidth(s, fontEdge, l.look.bold))
	}
	for _, s := range l.below {
		w = max(w, textWidth(s, fontEdge, false))
	}
	return w + 6
}

// branchLabel is the label of the branch into s.
func (d *drawer) branchLabel(s *eval.Solved) labelSpec {
	i := s.Index()
	p := s.Parent()
	b := p.Node.Branches[s.Via()]
	st := d.branchLook(s)
	lines := wrapText(clean(b.Label), d.wrap)
	if st.dashed {
		if len(lines) == 0 {
			lines = []string{pruneMark}
		} else {
			lines[0] = pruneMark + " " + lines[0]
		}
		if d.tiesChosen(s) {
			lines[len(lines)-1] += " (tie)"
		}
	}
	var figs []string
	if p.Node.Kind == tree.KindChance {
		figs = append(figs, Percent(p.Prob(s.Via()), 2))
	}
	if c := p.Cash(s.Via()); !c.IsZero() {
		figs = append(figs, d.cash(c))
	}
	var below []string
	if len(figs) > 0 {
		below = []string{strings.Join(figs, " · ")}
	}
	if p.Node.Kind == tree.KindDecision {
		// What the decision compares: the option with its own cash, so
		// that no option reads better than another for a cash left out.
		below = append(below, d.optionText(d.optionValue(s)))
	}
	return labelSpec{id: fmt.Sprintf("b%d", i), look: st, above: lines, below: below}
}

// labelNode makes a branch label node: lines above a rule drawn like the
// branch, lines below it. The rule runs through the node's middle, where
// the edges meet it, so that the branch reads as one line; width is the
// width of every label in its column, so that they line up.
func (d *drawer) labelNode(l labelSpec, width float64) *placedLabel {
	st, above, below := l.look, l.above, l.below
	rows := max(len(above), len(below), 1)
	h := float64(rows)*fontEdge*1.2 + 4
	// The rule is a filled cell for the optimal policy, else the top border
	// of a cell (dashed for a rejected option). The rows around it are
	// sized to centre it: equal for a filled cell; for a 1-point border,
	// measured, the row above 2 points taller. (An empty cell with neither
	// padding nor border makes Graphviz 12 fail silently once an edge
	// meets the node, hence the padding.)
	hAbove, rule, band := h, "", float64(st.band)
	if st.band > 1 {
		rule = `<TD WIDTH="` + pts(width) + `" HEIGHT="` + strconv.Itoa(st.band) + `" CELLPADDING="1" BGCOLOR="` + st.color + `"></TD>`
	} else {
		dash := ""
		if st.dashed {
			dash = ` STYLE="dashed"`
		}
		rule = `<TD WIDTH="` + pts(width) + `" HEIGHT="1" BORDER="1" SIDES="T"` + dash + ` COLOR="` + st.color + `"></TD>`
		hAbove += 2
	}
	var t htmlText
	t.raw(`<TABLE BORDER="0" CELLBORDER="0" CELLSPACING="0" CELLPADDING="0">`)
	t.raw(`<TR><TD HEIGHT="` + pts(hAbove) + `" CELLPADDING="2" VALIGN="BOTTOM">`)
	t.lines(fontEdge, st.ink, st.bold, above)
	t.raw(`</TD></TR><TR>` + rule + `</TR>`)
	t.raw(`<TR><TD HEIGHT="` + pts(h) + `" CELLPADDING="2" VALIGN="TOP">`)
	t.lines(fontEdge, st.ink, false, below)
	t.raw(`</TD></TR></TABLE>`)
	return &placedLabel{
		labelSpec: l,
		def:       fmt.Sprintf("%s [id=%q class=%q shape=plain label=<%s>", l.id, l.id, st.class, t.String()),
		w:         ceil(width),
		h:         ceil(hAbove) + band + ceil(h),
	}
}

// node makes a decision, chance or end node.
func (d *drawer) node(i int) placed {
	s := &d.nodes[i]
	n := s.Node
	on := d.on[i]
	classes := n.Kind.String()
	stroke, fill, pen, ink := colNode, colPaper, penNode, colInkSoft
	if on {
		classes += " optimal"
		stroke, fill, pen, ink = colPolicy, colFill, penPolicyNd, colInk
	}
	var shape, label string
	var p placed
	switch n.Kind {
	case tree.KindDecision:
		shape = fmt.Sprintf("shape=square width=%g height=%g", sizeDecision, sizeDecision)
		label, p = d.innerLabel(s, sizeDecision, on, ink)
	case tree.KindChance:
		shape = fmt.Sprintf("shape=circle width=%g height=%g", sizeChance, sizeChance)
		label, p = d.innerLabel(s, sizeChance, on, ink)
	default:
		shape = fmt.Sprintf("shape=triangle orientation=270 width=%g height=%g", sizeEnd, sizeEnd)
		label, p = d.endLabel(i, ink)
		// The triangle's base, where its branch ends, is a quarter of its
		// box left of its centre.
		p.west = -sizeEnd * 72 / 4
	}
	p.def = fmt.Sprintf("n%d [id=\"n%d\" class=%q %s style=filled color=%q fillcolor=%q penwidth=%s label=<%s>",
		i, i, classes, shape, stroke, fill, pen, label)
	return p
}

// textLine is one line of node text.
type textLine struct {
	text  string
	color string
	bold  bool
}

// innerLabel sets a decision's or chance node's title above its shape and
// its expected value below.
func (d *drawer) innerLabel(s *eval.Solved, side float64, on bool, ink string) (string, placed) {
	var above []textLine
	for _, l := range wrapText(d.nodeTitle(s.Node), d.wrap) {
		above = append(above, textLine{l, ink, false})
	}
	if tc := s.TestCost(); !tc.IsZero() {
		above = append(above, textLine{"test: " + d.cash(tc), ink, false})
	}
	col := colInkSoft
	if on {
		col = colPolicy
	}
	return stacked(above, []textLine{{d.fromHereText(s.Value()), col, on}}, side*72)
}

// stacked sets lines above and below a shape side points wide, all ending
// flush with the shape's right side, so that the branches fanning out to
// the right cross no text. Graphviz centres the label on the shape, so the
// table is symmetric: a blank column on the right as wide as the text's
// overhang on the left, and rows above and below the shape equally tall.
func stacked(above, below []textLine, side float64) (string, placed) {
	w := 0.0
	for _, l := range append(above[:len(above):len(above)], below...) {
		w = max(w, textWidth(l.text, fontNode, l.bold))
	}
	overPt := ceil(max(w-side, 0) + 6)
	hPt := ceil(float64(max(len(above), len(below), 1))*lineNode + 2)
	over, h := pts(overPt), pts(hPt)
	half := ceil(side) / 2
	p := placed{left: overPt + half, right: half, up: hPt + ceil(side+6)/2, west: -side / 2, east: side / 2}
	p.down = p.up
	var t htmlText
	write := func(ls []textLine) {
		for k, l := range ls {
			if k > 0 {
				t.br()
			}
			t.font(0, l.color, l.bold, l.text)
		}
	}
	t.raw(`<TABLE BORDER="0" CELLBORDER="0" CELLSPACING="0" CELLPADDING="0">`)
	t.raw(`<TR><TD COLSPAN="2" HEIGHT="` + h + `" ALIGN="RIGHT" BALIGN="RIGHT" VALIGN="BOTTOM">`)
	write(above)
	t.raw(`</TD><TD ROWSPAN="3" CELLPADDING="1" WIDTH="` + over + `"></TD></TR>`)
	t.raw(`<TR><TD CELLPADDING="1" WIDTH="` + over + `"></TD><TD CELLPADDING="1" WIDTH="` + pts(side) + `" HEIGHT="` + pts(side+6) + `"></TD></TR>`)
	t.raw(`<TR><TD COLSPAN="2" HEIGHT="` + h + `" ALIGN="RIGHT" BALIGN="RIGHT" VALIGN="TOP">`)
	write(below)
	t.raw(`</TD></TR></TABLE>`)
	return t.String(), p
}

// endLabel sets the cumulative payoff and path probability to the right of
// an end node's triangle: a one-row table of three cells, the middle one as
// wide as the triangle and the outer two equally wide (the left one blank),
// so that the triangle stays in the middle where Graphviz puts it.
func (d *drawer) endLabel(i int, ink string) (string, placed) {
	s := &d.nodes[i]
	e := d.ends[i]
	lines := wrapText(d.endTitle(s.Node), d.wrap)
	first := d.payoffText(e.Payoff)
	second := "path probability " + Percent(e.Prob, 2)
	w := max(textWidth(first, fontNode, true), textWidth(second, fontNode, false))
	for _, l := range lines {
		w = max(w, textWidth(l, fontNode, false))
	}
	cellPt := ceil(w + 6)
	cell := pts(cellPt)
	col := colInkSoft
	if d.on[i] {
		col = colPolicy
	}
	mid := ceil(sizeEnd*72 + 8)
	half := max(ceil(sizeEnd*72+4), float64(len(lines)+2)*lineNode) / 2
	p := placed{left: mid / 2, right: mid/2 + cellPt, up: half, down: half, east: sizeEnd * 72 / 2}
	var t htmlText
	t.raw(`<TABLE BORDER="0" CELLBORDER="0" CELLSPACING="0" CELLPADDING="0"><TR>`)
	t.raw(`<TD CELLPADDING="1" WIDTH="` + cell + `"></TD>`)
	t.raw(`<TD CELLPADDING="1" WIDTH="` + pts(sizeEnd*72+8) + `" HEIGHT="` + pts(sizeEnd*72+4) + `"></TD>`)
	t.raw(`<TD WIDTH="` + cell + `" ALIGN="LEFT" BALIGN="LEFT">`)
	for _, l := range lines {
		t.font(0, ink, false, l)
		t.br()
	}
	t.font(0, col, d.on[i], first)
	t.br()
	t.font(0, ink, false, second)
	t.raw(`</TD></TR></TABLE>`)
	return t.String(), p
}

// depthStub stands in for the subtree at pre-order position i, cut by
// MaxDepth: a small dashed box with the node's title, how many nodes it
// hides and its expected value.
func (d *drawer) depthStub(i int) placed {
	s := &d.nodes[i]
	on := d.on[i]
	classes, stroke, pen, ink, col := "stub", colNode, penNode, colInkSoft, colInkSoft
	if on {
		classes, stroke, pen, ink, col = "stub optimal", colPolicy, "1.6", colInk, colPolicy
	}
	title := wrapText(d.nodeTitle(s.Node), d.wrap)
	count := fmt.Sprintf("%s %s not drawn", Grouped(strconv.Itoa(s.Size())), plural(s.Size(), "node", "nodes"))
	value := d.fromHereText(s.Value())
	w := max(textWidth(count, fontEdge, false), textWidth(value, fontNode, on))
	for _, l := range title {
		w = max(w, textWidth(l, fontNode, false))
	}
	// The text sits in a cell of our own width, so that the box fits the
	// widest estimate of it, Graphviz's or ours.
	var t htmlText
	t.raw(`<TABLE BORDER="0" CELLBORDER="0" CELLSPACING="0" CELLPADDING="0"><TR><TD WIDTH="` + pts(w+4) + `">`)
	for _, l := range title {
		t.font(0, ink, false, l)
		t.br()
	}
	t.font(fontEdge, ink, false, count)
	t.br()
	t.font(0, col, on, value)
	t.raw(`</TD></TR></TABLE>`)
	const mx, my = 0.14, 0.08 // margins, inches
	half := (ceil(w+4) + 2*mx*72) / 2
	up := (float64(len(title)+2)*lineNode + 2*my*72) / 2
	return placed{
		def: fmt.Sprintf("n%d [id=\"n%d\" class=%q shape=box style=\"rounded,dashed\" fixedsize=false width=0 height=0 margin=\"%g,%g\" color=%q penwidth=%s label=<%s>",
			i, i, classes, mx, my, stroke, pen, t.String()),
		left: half, right: half, up: up, down: up, west: -half, east: half,
	}
}

// othersLabel folds the options the decision at pre-order position i
// rejects into one stub branch (PolicyOnly): a dashed branch that ends at
// its label, which says how many options there are and which is the best
// of them, with its value.
func (d *drawer) othersLabel(i int) labelSpec {
	s := &d.nodes[i]
	runnerUp, found := d.runnerUp(s)
	others := len(s.Node.Branches) - 1
	above := []string{fmt.Sprintf("%s %s other %s", pruneMark, Grouped(strconv.Itoa(others)), plural(others, "option", "options"))}
	lead := "best: "
	if others == 1 {
		lead = ""
	}
	var below []string
	if found {
		below = wrapText(lead+clean(s.Node.Branches[runnerUp.Via()].Label), d.wrap)
		v := d.optionText(d.optionValue(runnerUp))
		if d.tiesChosen(runnerUp) {
			v += " (tie)"
		}
		below = append(below, v)
	}
	st := lookPruned()
	st.class = "branch pruned others"
	return labelSpec{id: fmt.Sprintf("b%dx", i), look: st, above: above, below: below}
}

// nodeTitle is what a decision or chance node is called in the picture.
func (d *drawer) nodeTitle(n *tree.Node) string {
	switch {
	case n.Label != "":
		return clean(n.Label)
	case n.Test != "":
		if t := d.m.TestNamed(n.Test); t != nil {
			return clean(t.Display())
		}
		return clean(n.Test)
	case n.Uncertainty != "":
		if u := d.m.Uncertainty(n.Uncertainty); u != nil {
			return clean(u.Display())
		}
		return clean(n.Uncertainty)
	}
	return ""
}

// endTitle is an end node's own label, if it has one.
func (d *drawer) endTitle(n *tree.Node) string { return clean(n.Label) }

// The figures of the picture, each named for what it is, so that none is
// taken for another: a node's value counts only what follows the node
// ("from here"), an option's value at its decision also the cash on its
// own branch, and an end's total everything along its path.

// totalText is the whole tree's value, in the heading.
func (d *drawer) totalText(v decimal.Decimal) string {
	if d.m.Objective == tree.Min {
		return "expected cost " + Money(v, d.cur)
	}
	return "EV " + Money(v, d.cur)
}

// fromHereText is a node's value: what follows it, without the cash on
// the branch into it.
func (d *drawer) fromHereText(v decimal.Decimal) string {
	if d.m.Objective == tree.Min {
		return "expected cost from here " + Money(v, d.cur)
	}
	return "EV from here " + Money(v, d.cur)
}

// optionText is the value of taking an option at its decision: the cash
// on its branch plus the value of what follows. These are the figures the
// decision compares.
func (d *drawer) optionText(v decimal.Decimal) string {
	if d.m.Objective == tree.Min {
		return "option expected cost " + Money(v, d.cur)
	}
	return "option EV " + Money(v, d.cur)
}

// payoffText is an end node's cumulative payoff: the path's total.
func (d *drawer) payoffText(v decimal.Decimal) string {
	if d.m.Objective == tree.Min {
		return "path total cost " + Money(v, d.cur)
	}
	return "path total " + Money(v, d.cur)
}

// figuresKey says in the heading what each kind of figure counts.
func (d *drawer) figuresKey() string {
	if d.m.Objective == tree.Min {
		return "expected cost from here: what follows a node, not the cash on the branch into it · option expected cost: an option at its decision, its own cash included · path total cost: all the cash along the path"
	}
	return "EV from here: what follows a node, not the cash on the branch into it · option EV: an option at its decision, its own cash included · path total: all the cash along the path"
}

// cash is a branch's cash flow in the objective's terms, written as people
// write it.
func (d *drawer) cash(c decimal.Decimal) string { return Cash(c, d.m.Objective, d.cur) }

// Cash writes a cash flow given in the objective's terms (a payoff under
// tree.Max, a cost under tree.Min) as a gain or a cost with its currency:
// "gain 1,400,000.00 EUR", "cost 520,000.00 EUR". Zero is "".
func Cash(c decimal.Decimal, obj tree.Objective, currency string) string {
	if c.IsZero() {
		return ""
	}
	return CashWith(c, obj, func(a decimal.Decimal) string { return Money(a, currency) })
}

// CashWith is Cash with the amount written by format.
func CashWith(c decimal.Decimal, obj tree.Objective, format func(decimal.Decimal) string) string {
	if c.IsZero() {
		return ""
	}
	word := "cost "
	if obj.Net(c).IsPositive() {
		word = "gain "
	}
	return word + format(c.Abs())
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// pts formats a length in points for an HTML-like label attribute, which
// takes whole numbers.
func pts(v float64) string {
	return strconv.Itoa(int(v + 0.999))
}

// quote makes a DOT quoted string of the graph's name. DOT's only escape
// is \" and a trailing backslash would escape the closing quote, so
// backslashes become slashes. Graphviz writes the name into the SVG's
// <title> escaping <, > and quotes but keeping anything that looks like
// an entity ("&#0;" would make the SVG ill-formed), so & is escaped here.
func quote(s string) string {
	s = clean(s)
	s = strings.ReplaceAll(s, `\`, "/")
	s = strings.ReplaceAll(s, "&", "&amp;")
	s = strings.ReplaceAll(s, `"`, `\"`)
	return `"` + s + `"`
}

// clean makes a label safe to show in a picture, in a terminal and in
// XML: valid UTF-8; control characters (line breaks included), the
// bidirectional embedding, override and isolate controls (which can make
// text read in another order than it is stored) and the two characters
// XML forbids (U+FFFE, U+FFFF) turned into spaces; runs of spaces folded.
func clean(s string) string {
	s = strings.ToValidUTF8(s, "\uFFFD")
	s = strings.Map(func(r rune) rune {
		if unsafeRune(r) {
			return ' '
		}
		return r
	}, s)
	return strings.Join(strings.Fields(s), " ")
}

// unsafeRune reports whether clean replaces r.
func unsafeRune(r rune) bool {
	switch {
	case unicode.IsControl(r), r == '\u2028', r == '\u2029', r == 0xFFFE, r == 0xFFFF:
		return true
	case r >= '\u202a' && r <= '\u202e', r >= '\u2066' && r <= '\u2069':
		return true
	}
	return false
}

// wrapText breaks s at spaces into lines of at most width characters; a
// word longer than width is broken within. Empty input gives no lines.
// It reads s once: its time is linear in the length of s whatever the
// width or the words.
func wrapText(s string, width int) []string {
	if width < 1 {
		width = 1
	}
	var lines []string
	var cur strings.Builder
	n := 0 // characters in cur
	flush := func() {
		if n > 0 {
			lines = append(lines, cur.String())
			cur.Reset()
			n = 0
		}
	}
	for w := range strings.FieldsSeq(s) {
		wl := utf8.RuneCountInString(w)
		if n > 0 && n+1+wl > width {
			flush()
		}
		if wl > width {
			// Too long for any line: chunks of width characters, the
			// last one carried on like a word of its own.
			flush()
			for wl > width {
				cut := 0
				for range width {
					_, size := utf8.DecodeRuneInString(w[cut:])
					cut += size
				}
				lines = append(lines, w[:cut])
				w, wl = w[cut:], wl-width
			}
		}
		if wl == 0 {
			continue
		}
		if n > 0 {
			cur.WriteByte(' ')
			n++
		}
		cur.WriteString(w)
		n += wl
	}
	flush()
	return lines
}

// htmlText builds the body of a Graphviz HTML-like label.
type htmlText struct{ strings.Builder }

func (h *htmlText) raw(s string) { h.WriteString(s) }

func (h *htmlText) br() { h.WriteString(`<BR/>`) }

// lines writes lines of text, one under another.
func (h *htmlText) lines(size float64, color string, bold bool, lines []string) {
	for k, l := range lines {
		if k > 0 {
			h.br()
		}
		h.font(size, color, bold, l)
	}
}

// font writes text (escaped) in a colour, optionally bold and at a size
// (0 keeps the size it inherits).
func (h *htmlText) font(size float64, color string, bold bool, text string) {
	h.WriteString(`<FONT COLOR="` + color + `"`)
	if size > 0 {
		h.WriteString(` POINT-SIZE="` + strconv.FormatFloat(size, 'f', -1, 64) + `"`)
	}
	h.WriteString(`>`)
	if bold {
		h.WriteString(`<B>`)
	}
	h.WriteString(escapeHTML(text))
	if bold {
		h.WriteString(`</B>`)
	}
	h.WriteString(`</FONT>`)
}

// escapeHTML escapes text for an HTML-like label (XML rules).
func escapeHTML(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&quot;")
		case '\'':
			b.WriteString("&#39;")
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// textWidth estimates the width in points of s set in Helvetica at size:
// the advance widths of the Helvetica AFM for ASCII (bold a little wider),
// 0.6 em for anything else. It only sizes the blank cell that balances an
// end node's label, so erring wide is harmless.
func textWidth(s string, size float64, bold bool) float64 {
	em := 0.0
	for _, r := range s {
		w := 600
		if r < 128 && r >= 32 {
			w = helvetica(r)
		}
		em += float64(w)
	}
	if bold {
		em *= 1.08
	}
	return em / 1000 * size
}

// helvetica is the advance width (1/1000 em) of Helvetica for a printable
// ASCII character.
func helvetica(r rune) int {
	widths := [95]int{
		278, 278, 355, 556, 556, 889, 667, 191, 333, 333, 389, 584, 278, 333, 278, 278,
		556, 556, 556, 556, 556, 556, 556, 556, 556, 556, 278, 278, 584, 584, 584, 556,
		1015, 667, 667, 722, 722, 667, 611, 778, 722, 278, 500, 667, 556, 833, 722, 778,
		667, 778, 722, 667, 611, 722, 667, 944, 667, 667, 611, 278, 278, 278, 469, 556,
		333, 556, 556, 500, 556, 556, 278, 556, 556, 222, 222, 500, 222, 833, 556, 556,
		556, 556, 333, 500, 278, 556, 500, 722, 500, 500, 500, 334, 260, 334, 584,
	}
	return widths[r-32]
}

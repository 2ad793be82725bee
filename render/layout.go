package render

import (
	"fmt"
	"math"
	"strconv"
)

// The layout is ours, not Graphviz's: a decision tree has an obvious one,
// and Graphviz's general layered layout spends time growing with the
// square of the graph finding it (about 20 s for a 5,000-node tree). Here
// every column of the tree is one column of the picture (nodes at depth k
// in column 2k, the labels of the branches into them in column 2k-1), and
// every subtree gets a horizontal band of its own, as tall as its leaves
// need, stacked in model order: nothing overlaps, no branch crosses
// another or any text, each branch label is level with the node it leads
// to, and the work is linear. Graphviz (layout=nop2) only sizes the labels
// and draws the nodes and the straight edges where we put them.

// Gaps, in points.
const (
	gapFan    = 48  // between a column of nodes and the labels of their branches,
	gapFanMax = 150 // growing with the spread of the widest fan up to this
	fanSlope  = 0.4 // horizontal room per point of the fan's drop
	gapLead   = 8   // between a column of labels and the nodes they lead to
	gapRow    = 8   // between the bands of two subtrees
	fanStub   = 10  // level start of a branch, before it turns
)

// placed is a node's DOT statement (without its position and closing
// bracket) and its geometry around its centre, in points: how far its
// visible parts reach left, right, up and down, and where the branch into
// it ends (west, negative) and the branches out of it start (east).
type placed struct {
	def                   string
	left, right, up, down float64
	west, east            float64
}

// placedLabel is a branch label node, w wide and h tall, centred on its
// column at x.
type placedLabel struct {
	labelSpec
	def  string
	w, h float64
	x    float64
}

// item is one step of the drawing in the layout tree.
type item struct {
	st     step
	node   placed       // the node; unused for an others stub
	label  *placedLabel // the branch into it; nil at the root
	parent *item
	kids   []*item
	col    int     // the node's column; its label is in col-1
	band   float64 // height of the band of its subtree
	top    float64 // top of the band, growing downwards
	x, y   float64 // centre of the node (y also of its label), y downwards
}

// height is the room the item needs in its band.
func (it *item) height() float64 {
	h := 0.0
	if !it.st.others {
		h = 2 * max(it.node.up, it.node.down)
	}
	if it.label != nil {
		h = max(h, it.label.h)
	}
	return h
}

// layout places every step, returned in the order given (pre-order).
func (d *drawer) layout(steps []step) []*item {
	items := make([]*item, len(steps))
	byNode := map[int]*item{}
	labels := make([]labelSpec, len(steps))
	width := map[int]float64{} // label width by column
	for k, st := range steps {
		it := &item{st: st}
		items[k] = it
		s := &d.nodes[st.i]
		switch {
		case st.others:
			it.parent = byNode[st.i]
			labels[k] = d.othersLabel(st.i)
			it.col = 2 * (int(d.depth[st.i]) + 1)
		default:
			byNode[st.i] = it
			it.col = 2 * int(d.depth[st.i])
			if d.cut(s) && s.Size() > 1 {
				it.node = d.depthStub(st.i)
			} else {
				it.node = d.node(st.i)
			}
			if st.i == 0 {
				continue
			}
			it.parent = byNode[s.Parent().Index()]
			labels[k] = d.branchLabel(s)
		}
		it.parent.kids = append(it.parent.kids, it)
		width[it.col-1] = max(width[it.col-1], labels[k].width())
	}
	for k, it := range items {
		if k > 0 {
			it.label = d.labelNode(labels[k], width[it.col-1])
		}
	}

	// Bands, from the leaves up: pre-order puts every child after its
	// parent, so one backward sweep sees the children first.
	for k := len(items) - 1; k >= 0; k-- {
		it := items[k]
		sum := 0.0
		for _, kid := range it.kids {
			sum += kid.band
		}
		it.band = max(sum, it.height()+gapRow)
	}
	// Tops, from the root down; then centres, from the leaves up: a node
	// sits midway between its first and last branch, within its band.
	for _, it := range items {
		sum := 0.0
		for _, kid := range it.kids {
			sum += kid.band
		}
		t := it.top + (it.band-sum)/2
		for _, kid := range it.kids {
			kid.top = t
			t += kid.band
		}
	}
	for k := len(items) - 1; k >= 0; k-- {
		it := items[k]
		if len(it.kids) == 0 {
			it.y = it.top + it.band/2
			continue
		}
		mid := (it.kids[0].y + it.kids[len(it.kids)-1].y) / 2
		half := it.height() / 2
		it.y = min(max(mid, it.top+half), it.top+it.band-half)
	}

	// Columns: how far their contents reach either side of their centre
	// line, then where that line is. A column of nodes is followed by room
	// for their branches to fan out in, more for a wider fan, so that no
	// branch falls too steeply.
	last := 0
	left, right, drop := map[int]float64{}, map[int]float64{}, map[int]float64{}
	for _, it := range items {
		last = max(last, it.col)
		if !it.st.others {
			left[it.col] = max(left[it.col], it.node.left)
			right[it.col] = max(right[it.col], it.node.right)
		}
		if it.label != nil {
			left[it.col-1] = max(left[it.col-1], it.label.w/2)
			right[it.col-1] = max(right[it.col-1], it.label.w/2)
		}
		for _, kid := range it.kids {
			drop[it.col] = max(drop[it.col], math.Abs(kid.y-it.y))
		}
	}
	xs := make([]float64, last+1)
	xs[0] = left[0]
	for c := 1; c <= last; c++ {
		gap := float64(gapLead)
		if c%2 == 1 {
			gap = min(max(gapFan, drop[c-1]*fanSlope), gapFanMax)
		}
		xs[c] = xs[c-1] + right[c-1] + gap + left[c]
	}
	for _, it := range items {
		it.x = xs[it.col]
		if it.label != nil {
			it.label.x = xs[it.col-1]
		}
	}
	return items
}

// extent is the width and height, in points, of what the items cover.
func extent(items []*item) (w, h float64) {
	x0, x1, y0, y1 := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, it := range items {
		if !it.st.others {
			x0, x1 = min(x0, it.x-it.node.left), max(x1, it.x+it.node.right)
			y0, y1 = min(y0, it.y-it.node.up), max(y1, it.y+it.node.down)
		}
		if l := it.label; l != nil {
			x0, x1 = min(x0, l.x-l.w/2), max(x1, l.x+l.w/2)
			y0, y1 = min(y0, it.y-l.h/2), max(y1, it.y+l.h/2)
		}
	}
	if x0 > x1 {
		return 0, 0
	}
	return x1 - x0, y1 - y0
}

// xy is a position in DOT: points, y upwards.
func xy(x, y float64) string {
	return num(x) + "," + num(-y)
}

// line is the DOT spline of a straight edge from (x1, y1) to (x2, y2).
func line(x1, y1, x2, y2 float64) string {
	a, b := xy(x1, y1), xy(x2, y2)
	return fmt.Sprintf("%s %s %s %s", a, a, b, b)
}

// fan is the DOT spline of a branch fanning out from (x1, y1): a short
// level stub, clear of the node's text, then straight to (x2, y2).
func fan(x1, y1, x2, y2 float64) string {
	if y1 == y2 {
		return line(x1, y1, x2, y2)
	}
	a, m, b := xy(x1, y1), xy(x1+fanStub, y1), xy(x2, y2)
	return fmt.Sprintf("%s %s %s %s %s %s %s", a, a, m, m, m, b, b)
}

func num(v float64) string {
	return strconv.FormatFloat(math.Round(v*100)/100, 'f', -1, 64)
}

// ceil rounds a length up to a whole point, as the label tables are sized.
func ceil(v float64) float64 { return math.Ceil(v) }

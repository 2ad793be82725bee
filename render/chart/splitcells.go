package chart

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// splitCells draws the regions of a strategy map whose boundaries are
// known as lines. A cell here lies between neighbouring grid values, its
// corners on the grid. A cell whose corners all have one best option is
// filled with it; a cell whose corners fall into two runs of two options
// around its edge is cut along the boundary, from where the boundary
// lines cross its two edges (the middle of an edge where no line does),
// and each part filled with its corners' option; a cell where three or
// more runs meet is cut from each crossing to the point where the
// boundaries meet inside it; a cell with a blank corner (no best option
// there) is filled a quarter per corner. So the regions meet along the boundary drawn over
// them rather than in steps of a cell.
type splitCells struct {
	xs, ys     []float64
	best       [][]int
	options    int
	boundaries []Segment
}

// Plot implements plot.Plotter.
func (m *splitCells) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for k, ps := range m.pieces() {
		polys := make([][]vg.Point, len(ps))
		for n, ring := range ps {
			for _, q := range ring {
				polys[n] = append(polys[n], vg.Point{X: trX(q.X), Y: trY(q.Y)})
			}
		}
		fillPolygons(&c, fills(k), polys)
	}
}

// pieces are the polygons each option fills, in data coordinates.
func (m *splitCells) pieces() [][][]Point {
	polys := make([][][]Point, m.options)
	add := func(k int, ring []Point) {
		if k >= 0 {
			polys[k] = append(polys[k], ring)
		}
	}
	for j := 0; j+1 < len(m.ys); j++ {
		for i := 0; i+1 < len(m.xs); i++ {
			x0, x1, y0, y1 := m.xs[i], m.xs[i+1], m.ys[j], m.ys[j+1]
			// Corners around the edge: bottom left, bottom right, top
			// right, top left.
			corner := [4]Point{{x0, y0}, {x1, y0}, {x1, y1}, {x0, y1}}
			b := [4]int{m.best[j][i], m.best[j][i+1], m.best[j+1][i+1], m.best[j+1][i]}
			var cuts []int // edges k (corner k to k+1) whose ends differ
			blank := false
			for k := 0; k < 4; k++ {
				blank = blank || b[k] < 0
				if b[k] != b[(k+1)%4] {
					cuts = append(cuts, k)
				}
			}
			switch {
			case len(cuts) == 0:
				add(b[0], corner[:])
			case !blank:
				// The ring of corners with a crossing put in on each edge
				// whose ends differ, cut into one piece per run of corners
				// of one option: from a crossing round to the next, closed
				// at the point where the boundaries meet inside the cell
				// (for two runs, a point on the line between the two
				// crossings, so the cut is straight).
				var ring []Point
				var xi []int
				for k := 0; k < 4; k++ {
					ring = append(ring, corner[k])
					if b[k] != b[(k+1)%4] {
						xi = append(xi, len(ring))
						ring = append(ring, m.crossing(corner[k], corner[(k+1)%4]))
					}
				}
				centre := m.meeting(x0, x1, y0, y1, ring, xi)
				for n := range xi {
					from, to := xi[n], xi[(n+1)%len(xi)]
					var piece []Point
					for q := from; ; q = (q + 1) % len(ring) {
						piece = append(piece, ring[q])
						if q == to {
							break
						}
					}
					if len(xi) > 2 {
						piece = append(piece, centre)
					}
					add(b[(cuts[n]+1)%4], piece)
				}
			default:
				mid := Point{(x0 + x1) / 2, (y0 + y1) / 2}
				for k := 0; k < 4; k++ {
					q := corner[k]
					add(b[k], []Point{q, {mid.X, q.Y}, mid, {q.X, mid.Y}})
				}
			}
		}
	}
	return polys
}

// meeting is where the boundaries inside the cell [x0, x1] × [y0, y1]
// meet: the end of a boundary segment strictly inside it, or else the mean
// of the crossings on its edge (ring[xi]).
func (m *splitCells) meeting(x0, x1, y0, y1 float64, ring []Point, xi []int) Point {
	inside := func(q Point) bool { return q.X > x0 && q.X < x1 && q.Y > y0 && q.Y < y1 }
	for _, s := range m.boundaries {
		for _, q := range []Point{s.From, s.To} {
			if inside(q) {
				return q
			}
		}
	}
	var c Point
	for _, i := range xi {
		c.X += ring[i].X / float64(len(xi))
		c.Y += ring[i].Y / float64(len(xi))
	}
	return c
}

// crossing is where a boundary line crosses the cell edge from a to b,
// the crossing nearest the edge's middle, or the middle when none does.
func (m *splitCells) crossing(a, b Point) Point {
	mid := Point{(a.X + b.X) / 2, (a.Y + b.Y) / 2}
	best, bestD := mid, math.Inf(1)
	for _, s := range m.boundaries {
		q, ok := intersect(a, b, s.From, s.To)
		if !ok {
			continue
		}
		if d := math.Hypot(q.X-mid.X, q.Y-mid.Y); d < bestD {
			best, bestD = q, d
		}
	}
	return best
}

// intersect is where segments ab and cd meet, if they do.
func intersect(a, b, c, d Point) (Point, bool) {
	rx, ry := b.X-a.X, b.Y-a.Y
	sx, sy := d.X-c.X, d.Y-c.Y
	den := rx*sy - ry*sx
	if den == 0 {
		return Point{}, false
	}
	t := ((c.X-a.X)*sy - (c.Y-a.Y)*sx) / den
	u := ((c.X-a.X)*ry - (c.Y-a.Y)*rx) / den
	const eps = 1e-9
	if t < -eps || t > 1+eps || u < -eps || u > 1+eps {
		return Point{}, false
	}
	t = math.Min(1, math.Max(0, t))
	return Point{a.X + t*rx, a.Y + t*ry}, true
}

// fillPolygons fills convex polygons in one fill style: the tone, then the
// hatching clipped to each polygon, on the same page-wide lines as
// fillRects draws them so that neighbouring pieces join up.
func fillPolygons(c *draw.Canvas, fs fillStyle, polys [][]vg.Point) {
	if len(polys) == 0 {
		return
	}
	var area vg.Path
	for _, ps := range polys {
		area.Move(ps[0])
		for _, q := range ps[1:] {
			area.Line(q)
		}
		area.Close()
	}
	var lines vg.Path
	for _, ps := range polys {
		hatchPolygon(&lines, fs.hatch, ps)
	}
	paintFill(c, fs, area, lines)
}

// hatchPolygon adds to p the segments of a hatch family inside the convex
// polygon ps: each line of the family is g(point) = v for a v on the
// family's spacing, cut where it enters and leaves the polygon.
func hatchPolygon(p *vg.Path, h hatch, ps []vg.Point) {
	type family struct {
		g   func(q vg.Point) vg.Length
		gap vg.Length
	}
	var fams []family
	diag := hatchGap * math.Sqrt2
	switch h {
	case hatchLevel:
		fams = []family{{func(q vg.Point) vg.Length { return q.Y }, hatchGap}}
	case hatchUpright:
		fams = []family{{func(q vg.Point) vg.Length { return q.X }, hatchGap}}
	}
	if h == hatchRising || h == hatchCross {
		fams = append(fams, family{func(q vg.Point) vg.Length { return q.Y - q.X }, diag})
	}
	if h == hatchFalling || h == hatchCross {
		fams = append(fams, family{func(q vg.Point) vg.Length { return q.Y + q.X }, diag})
	}
	for _, f := range fams {
		lo, hi := vg.Length(math.Inf(1)), vg.Length(math.Inf(-1))
		for _, q := range ps {
			lo, hi = min(lo, f.g(q)), max(hi, f.g(q))
		}
		if !(hi-lo < 1e5) {
			return // not a polygon on any page
		}
		for v := ceilTo(lo, f.gap); v < hi; v += f.gap {
			var pts []vg.Point
			for k := range ps {
				a, b := ps[k], ps[(k+1)%len(ps)]
				ga, gb := f.g(a)-v, f.g(b)-v
				if (ga < 0) == (gb < 0) || ga == gb {
					continue
				}
				t := ga / (ga - gb)
				pts = append(pts, vg.Point{X: a.X + t*(b.X-a.X), Y: a.Y + t*(b.Y-a.Y)})
			}
			if len(pts) < 2 {
				continue
			}
			a, z := pts[0], pts[1]
			for _, q := range pts[2:] {
				if dist(a, q) > dist(a, z) {
					z = q
				}
			}
			if dist(a, z) > 0.5 {
				p.Move(a)
				p.Line(z)
			}
		}
	}
}

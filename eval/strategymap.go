package eval

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Two-way strategy maps: the best option at a decision over a grid of two
// inputs, and the boundaries between the options' regions.
//
// Every grid point is the compiled model with both inputs set (one
// compiled.Model.With) and one rollback. The boundaries are found in three
// steps, each exact where the options' values are linear:
//
//  1. On every grid line, between two neighbouring points whose best
//     options differ, the one-way breakeven machinery (the narrowing of
//     FindBreakeven) finds every switch along that line: exact points
//     where two options tie, confirmed by solving the tree there.
//  2. In every grid cell, two points on its edges between the same two
//     options are joined by a straight segment. Where three options meet
//     in a cell, the point where all three tie is solved from the planes
//     through the cell's corners and confirmed by solving the tree there;
//     each edge point is joined to it. Anything else (more options, or a
//     point that does not confirm) is joined to the mean of the cell's
//     edge points, and marked approximate.
//  3. A segment is exact when both its ends are, and the difference of its
//     two options is one plane over the cell: linear along the segment,
//     so zero all along it (checked on the four corners, and by solving
//     the tree at the segment's midpoint when that is a finite decimal).
//
// A boundary that enters and leaves a cell through the same edge, or an
// option best only inside one cell, is not seen: the grid is the limit of
// what the map shows. Where the values are not linear (a probability
// times a money input varied together, for example) the boundaries are
// curves; the segments then join exact points on the grid lines and are
// marked approximate in between.

// DefaultMapSteps is the number of intervals of each axis of a map.
const DefaultMapSteps = 20

// MaxMapSteps is the most intervals of either axis of a map.
const MaxMapSteps = 999

// MapOptions say what MapStrategies varies.
type MapOptions struct {
	// X and Y are the two inputs (horizontal and vertical) and,
	// optionally, their ranges (see SweepOptions.Vary).
	X, Y VaryRange
	// Steps is the number of intervals of each axis (DefaultMapSteps
	// when 0): (Steps+1)² grid points.
	Steps int
	// At is the decision watched (see BreakevenOptions.At).
	At string
	// MaxSamples caps the rollbacks (DefaultSweepMaxSamples when 0).
	MaxSamples int
	// Workers is the number of goroutines that sample the grid (0: one
	// per available CPU). The result is the same with any number.
	Workers int
	// Progress, when not nil, is called as lines of the grid (rows or
	// columns) are done, with the lines done and the lines in all; never
	// from two goroutines at once.
	Progress func(done, total int)
}

// StrategyMap is the result of MapStrategies.
type StrategyMap struct {
	Objective tree.Objective
	// X and Y are the horizontal and vertical inputs and their grids.
	X, Y SweepAxis
	// Decision is the decision watched, Path the branch labels from the
	// root to it and Options its branch labels.
	Decision *tree.Node
	Path     []string
	Options  []string
	// Best[j][i] is the best option (the first in model order on a tie)
	// at (X.Values[i], Y.Values[j]), or -1 where the model is not valid;
	// Tied[j][i] says another option ties with it there.
	Best [][]int
	Tied [][]bool
	// Boundaries are the lines between the regions, segment by segment.
	Boundaries []Boundary
	// Exact is false when some boundary segment is approximate.
	Exact bool
	// Samples is the number of rollbacks run.
	Samples int
	// Notes explain choices made along the way.
	Notes []string
}

// Boundary is one straight piece of the line between two options'
// regions.
type Boundary struct {
	From, To BoundaryPoint
	// A and B are the options on either side.
	A, B int
	// Exact is set when the segment lies on the options' tie line
	// exactly (see the method above).
	Exact bool
}

// BoundaryPoint is a point of a boundary. When Exact, the options tie
// there exactly and XFraction, YFraction hold it as fractions (X and Y are
// then those, rounded at compiled.DivisionScale places when they are no
// finite decimal).
type BoundaryPoint struct {
	X, Y                 decimal.Decimal
	Exact                bool
	XFraction, YFraction *big.Rat
}

// MapStrategies finds the best option at a decision over a grid of two
// inputs, and the boundaries between the options. It stops with ctx, and
// with a *BudgetError past opts.MaxSamples rollbacks. A request that does
// not fit the model is a *RequestError.
func MapStrategies(ctx context.Context, c *compiled.Model, opts MapOptions) (*StrategyMap, error) {
	steps, err := sweepSteps(opts.Steps, MaxMapSteps)
	if err != nil {
		return nil, err
	}
	if opts.Steps == 0 {
		steps = DefaultMapSteps
	}
	if opts.X.Vary == opts.Y.Vary {
		return nil, reqErr("both inputs of the map are %s: give two different ones", opts.X.Vary)
	}
	a, err := newSweepAnalysis(ctx, c, opts.At, opts.MaxSamples)
	if err != nil {
		return nil, err
	}
	sx, sy := a.search(opts.X.Vary), a.search(opts.Y.Vary)
	xa, err := a.axis(sx, opts.X, steps)
	if err != nil {
		return nil, err
	}
	a.spent(sx)
	sy.used = a.used
	ya, err := a.axis(sy, opts.Y, steps)
	if err != nil {
		return nil, err
	}
	a.spent(sy)
	mp := &mapper{a: a, sx: sx, sy: sy, xs: xa.Values, ys: ya.Values}
	mp.plan(opts.X.Vary, opts.Y.Vary)
	out := &StrategyMap{Objective: a.obj, X: xa, Y: ya, Decision: a.decision, Path: a.path, Options: a.options, Exact: true}
	if err := mp.grid(opts.Workers, opts.Progress); err != nil {
		return nil, err
	}
	if err := mp.edges(); err != nil {
		return nil, err
	}
	if err := mp.cells(); err != nil {
		return nil, err
	}
	for j := range mp.ys {
		row, tied := make([]int, len(mp.xs)), make([]bool, len(mp.xs))
		for i := range mp.xs {
			row[i] = -1
			if sm := mp.at[j][i]; sm != nil {
				row[i] = sm.best
				tied[i] = len(sm.ties()) > 1
			}
		}
		out.Best, out.Tied = append(out.Best, row), append(out.Tied, tied)
	}
	out.Boundaries = mp.bounds
	for _, b := range mp.bounds {
		out.Exact = out.Exact && b.Exact
	}
	if mp.invalid != "" {
		a.notes = append(a.notes, "some cells are left blank: "+mp.invalid)
	}
	out.Notes = a.notes
	out.Samples = a.used
	return out, nil
}

// mapper is one strategy map being made.
type mapper struct {
	a      *analysis
	sx, sy *search // set up for each input alone
	xs, ys []decimal.Decimal
	// at[j][i] is the sample at (xs[i], ys[j]), its x the horizontal
	// value; nil where the model is not valid.
	at      [][]*sample
	invalid string // why some cell is blank
	// Points found on the grid lines: hpts[j][i] on the row j edge from
	// i to i+1; vpts[i][j] on the column i edge from j to j+1.
	hpts, vpts [][][]edgePoint
	bounds     []Boundary
	// staged: a grid line starts from the model with the other input set
	// (see line). byColumn: the grid is sampled column by column, the
	// horizontal input fixed along each, because it is the dearer one to
	// change.
	staged, byColumn bool
}

// plan chooses how the grid is sampled. Setting an input that moves a
// probability derives every mass below it again, while one that only moves
// money weighs again just the branches that read it; so each grid line
// starts from a model with the line's fixed input set once, and the lines
// run along the cheaper input. Both inputs probabilities of states or
// branches are set together at every point instead: one may make room for
// the other among the siblings of a chance node, and set apart the later
// setting would undo the earlier one's share.
func (mp *mapper) plan(x, y Vary) {
	mp.staged = x.Kind == VaryParam || y.Kind == VaryParam
	src := mp.a.c.Source()
	mp.byColumn = mp.staged && x.IsProbability(src) && !y.IsProbability(src)
}

// edgePoint is a switch on a grid line.
type edgePoint struct {
	p    BoundaryPoint
	a, b int // the options either side
}

// line is a search along a grid line: the horizontal input moving with
// the vertical one at y (row), or the vertical moving with the horizontal
// at x (column). A staged line (see plan) starts from the model with the
// fixed input already set, so that each point changes only the moving one;
// where that model is not valid the line sets both at every point, and
// each point says why it is not valid.
func (mp *mapper) line(row bool, at decimal.Decimal, stage bool) *search {
	a := mp.a
	moving, fixed := mp.sx, mp.sy
	if !row {
		moving, fixed = mp.sy, mp.sx
	}
	s := a.search(moving.be.Vary)
	if stage && mp.staged {
		if base, err := a.c.With(fixed.settings(at)...); err == nil {
			s.c = base
			s.settings = moving.settings
			return s
		}
	}
	if row {
		s.settings = func(x decimal.Decimal) []compiled.Setting {
			return append(mp.sx.settings(x), mp.sy.settings(at)...)
		}
	} else {
		s.settings = func(y decimal.Decimal) []compiled.Setting {
			return append(mp.sx.settings(at), mp.sy.settings(y)...)
		}
	}
	return s
}

// grid samples every grid point, line by line: row by row, or column by
// column when mp.byColumn. The lines are independent (each starts from
// the model as compiled), so workers goroutines sample them at once; every
// cell has its own place, and what is reported (the first invalid cell,
// the first error) is taken in line order afterwards, so the result does
// not depend on which worker finished first.
func (mp *mapper) grid(workers int, progress func(done, total int)) error {
	nx, ny := len(mp.xs), len(mp.ys)
	mp.at = make([][]*sample, ny)
	for j := range mp.at {
		mp.at[j] = make([]*sample, nx)
	}
	lines, points := ny, nx
	if mp.byColumn {
		lines, points = nx, ny
	}
	a := mp.a
	if a.used+lines*points > a.max {
		return &BudgetError{What: fmt.Sprintf("more than %d rollbacks (the grid alone needs %d)", a.max, lines*points), Option: a.option}
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(1, min(workers, lines))
	type lineResult struct {
		samples int
		invalid *invalidAt // the first invalid point along the line
		invalAt [2]decimal.Decimal
		err     error
	}
	results := make([]lineResult, lines)
	var (
		next   atomic.Int64
		failed atomic.Bool
		mu     sync.Mutex // serialises progress
		done   int
		wg     sync.WaitGroup
	)
	work := func() {
		defer wg.Done()
		for {
			l := int(next.Add(1) - 1)
			if l >= lines || failed.Load() {
				return
			}
			res := &results[l]
			var s *search
			if mp.byColumn {
				s = mp.line(false, mp.xs[l], true)
			} else {
				s = mp.line(true, mp.ys[l], true)
			}
			for k := 0; k < points && res.err == nil; k++ {
				i, j := k, l
				if mp.byColumn {
					i, j = l, k
				}
				x, y := mp.xs[i], mp.ys[j]
				at := x
				if mp.byColumn {
					at = y
				}
				sm, err := s.sample(at)
				var inv *invalidAt
				switch {
				case errors.As(err, &inv):
					if res.invalid == nil {
						res.invalid, res.invalAt = inv, [2]decimal.Decimal{x, y}
					}
				case err != nil:
					res.err = err
					failed.Store(true)
				}
				if sm != nil && mp.byColumn {
					sm = along(sm, x)
				}
				mp.at[j][i] = sm
			}
			res.samples = s.be.Samples
			if progress != nil && res.err == nil {
				mu.Lock()
				done++
				progress(done, lines)
				mu.Unlock()
			}
		}
	}
	wg.Add(workers)
	for w := 0; w < workers; w++ {
		go work()
	}
	wg.Wait()
	for l := range results {
		res := &results[l]
		if res.err != nil {
			return res.err
		}
		a.used += res.samples
	}
	// The first invalid cell, row by row from the bottom and left to right
	// along each row: the first of some line's first.
	var first *lineResult
	for l := range results {
		r := &results[l]
		if r.invalid == nil {
			continue
		}
		if first == nil || r.invalAt[1].LessThan(first.invalAt[1]) || (r.invalAt[1].Equal(first.invalAt[1]) && r.invalAt[0].LessThan(first.invalAt[0])) {
			first = r
		}
	}
	if first != nil {
		src := a.c.Source()
		mp.invalid = first.invalid.diag.Summary + fmt.Sprintf(" (first at %s = %s, %s = %s)", mp.sx.be.Vary, showInputValue(src, mp.sx.be.Vary, first.invalAt[0]),
			mp.sy.be.Vary, showInputValue(src, mp.sy.be.Vary, first.invalAt[1]))
	}
	return nil
}

// along is sm moved onto another line: its coordinate is y.
func along(sm *sample, y decimal.Decimal) *sample {
	c := *sm
	c.x = y
	return &c
}

// edges finds the switches on every grid line between neighbours whose
// best options differ.
func (mp *mapper) edges() error {
	nx, ny := len(mp.xs), len(mp.ys)
	mp.hpts = make([][][]edgePoint, ny)
	for j := 0; j < ny; j++ {
		mp.hpts[j] = make([][]edgePoint, nx)
		var s *search // made when the row has a switch to find
		for i := 0; i+1 < nx; i++ {
			l, r := mp.at[j][i], mp.at[j][i+1]
			if l == nil || r == nil || l.best == r.best {
				continue
			}
			if s == nil {
				s = mp.line(true, mp.ys[j], true)
			}
			sws, err := s.between(l, r)
			if err != nil {
				return invalidError(err)
			}
			for _, sw := range sws {
				mp.hpts[j][i] = append(mp.hpts[j][i], edgePoint{p: pointOn(sw, mp.ys[j], true), a: sw.Below, b: sw.Above})
			}
		}
		if s != nil {
			mp.a.spent(s)
		}
	}
	mp.vpts = make([][][]edgePoint, nx)
	for i := 0; i < nx; i++ {
		mp.vpts[i] = make([][]edgePoint, ny)
		var s *search // made when the column has a switch to find
		for j := 0; j+1 < ny; j++ {
			d, u := mp.at[j][i], mp.at[j+1][i]
			if d == nil || u == nil || d.best == u.best {
				continue
			}
			if s == nil {
				s = mp.line(false, mp.xs[i], true)
			}
			sws, err := s.between(along(d, mp.ys[j]), along(u, mp.ys[j+1]))
			if err != nil {
				return invalidError(err)
			}
			for _, sw := range sws {
				mp.vpts[i][j] = append(mp.vpts[i][j], edgePoint{p: pointOn(sw, mp.xs[i], false), a: sw.Below, b: sw.Above})
			}
		}
		if s != nil {
			mp.a.spent(s)
		}
	}
	return nil
}

// pointOn is a switch on a grid line as a point of the map: on a row at
// height other, or on a column at other.
func pointOn(sw Switch, other decimal.Decimal, row bool) BoundaryPoint {
	p := BoundaryPoint{X: sw.At, Y: other, Exact: sw.Exact}
	if sw.Exact {
		p.XFraction, p.YFraction = sw.Fraction, other.Rat()
	}
	if !row {
		p.X, p.Y = other, sw.At
		p.XFraction, p.YFraction = p.YFraction, p.XFraction
	}
	return p
}

// cells joins the edge points of every cell into boundary segments.
func (mp *mapper) cells() error {
	for j := 0; j+1 < len(mp.ys); j++ {
		for i := 0; i+1 < len(mp.xs); i++ {
			var pts []edgePoint
			pts = append(pts, mp.hpts[j][i]...)
			pts = append(pts, mp.vpts[i+1][j]...)
			pts = append(pts, mp.hpts[j+1][i]...)
			pts = append(pts, mp.vpts[i][j]...)
			if len(pts) < 2 {
				continue
			}
			if err := mp.cell(i, j, pts); err != nil {
				return err
			}
		}
	}
	return nil
}

type pair struct{ a, b int }

func pairOf(a, b int) pair {
	if a > b {
		a, b = b, a
	}
	return pair{a, b}
}

// cell joins the points on the edges of cell (i, j).
func (mp *mapper) cell(i, j int, pts []edgePoint) error {
	corners := []*sample{mp.at[j][i], mp.at[j][i+1], mp.at[j+1][i], mp.at[j+1][i+1]}
	for _, c := range corners {
		if c == nil {
			return nil // a blank corner: nothing sure to draw
		}
	}
	// A switch at a corner shows on both edges that meet there: once.
	byPair := map[pair][]edgePoint{}
	var order []pair
	seen := map[[2]string]bool{}
	for _, p := range pts {
		at := [2]string{p.p.X.String(), p.p.Y.String()}
		if seen[at] {
			continue
		}
		seen[at] = true
		k := pairOf(p.a, p.b)
		if _, ok := byPair[k]; !ok {
			order = append(order, k)
		}
		byPair[k] = append(byPair[k], p)
	}
	// Two points between the same two options: one straight segment.
	// The rest meet at a junction inside the cell.
	var loose []edgePoint
	for _, k := range order {
		if ps := byPair[k]; len(ps) == 2 {
			if err := mp.segment(ps[0].p, ps[1].p, k, corners, true); err != nil {
				return err
			}
		} else {
			loose = append(loose, ps...)
		}
	}
	if len(loose) < 2 {
		return nil // a boundary that only touches the cell
	}
	junction, exact, err := mp.junction(i, j, loose, corners)
	if err != nil {
		return err
	}
	for _, p := range loose {
		if err := mp.segment(p.p, junction, pairOf(p.a, p.b), corners, exact); err != nil {
			return err
		}
	}
	return nil
}

// segment adds the boundary from p to q between options k, checking
// whether it is exact (see the method at the top).
func (mp *mapper) segment(p, q BoundaryPoint, k pair, corners []*sample, ends bool) error {
	b := Boundary{From: p, To: q, A: k.a, B: k.b}
	b.Exact = ends && p.Exact && q.Exact && planar(corners, k)
	if b.Exact {
		mx := new(big.Rat).Add(p.XFraction, q.XFraction)
		my := new(big.Rat).Add(p.YFraction, q.YFraction)
		mx.Quo(mx, big.NewRat(2, 1))
		my.Quo(my, big.NewRat(2, 1))
		ok, err := mp.tieAt(mx, my, k.a, k.b)
		if err != nil {
			return err
		}
		b.Exact = ok
	}
	mp.bounds = append(mp.bounds, b)
	return nil
}

// planar reports whether the difference of options k is one plane over the
// cell: its values at the four corners (bottom left, bottom right, top
// left, top right) satisfy d00 + d11 = d10 + d01, exactly.
func planar(corners []*sample, k pair) bool {
	if !yExact(corners...) {
		return false
	}
	f := y(corners...)
	d := func(s *sample) decimal.Decimal { return f(s, k.a).Sub(f(s, k.b)) }
	return d(corners[0]).Add(d(corners[3])).Equal(d(corners[1]).Add(d(corners[2])))
}

// tieAt solves the tree at (x, y) and reports whether the given options
// all tie there and are best. A point that is no finite decimal is not
// solved: true.
func (mp *mapper) tieAt(x, y *big.Rat, options ...int) (bool, error) {
	dx := decimal.NewFromBigRat(x, compiled.DivisionScale)
	dy := decimal.NewFromBigRat(y, compiled.DivisionScale)
	if dx.Rat().Cmp(x) != 0 || dy.Rat().Cmp(y) != 0 {
		return true, nil
	}
	s := mp.line(true, dy, false)
	defer mp.a.spent(s)
	sm, err := s.sample(dx)
	var inv *invalidAt
	if errors.As(err, &inv) {
		return false, nil
	}
	if err != nil {
		return false, err
	}
	for _, o := range options {
		if !sm.t[o].Equal(sm.t[sm.best]) {
			return false, nil
		}
	}
	return true, nil
}

// junction is where the boundaries inside a cell meet: for three options,
// the point where all three tie, from the planes through the corners and
// confirmed by solving the tree there; otherwise the mean of the edge
// points, approximate.
func (mp *mapper) junction(i, j int, pts []edgePoint, corners []*sample) (BoundaryPoint, bool, error) {
	opts := map[int]bool{}
	for _, p := range pts {
		opts[p.a], opts[p.b] = true, true
	}
	if len(opts) == 3 && yExact(corners...) {
		var o []int
		for k := range opts {
			o = append(o, k)
		}
		slices.Sort(o)
		if p, ok := mp.triple(i, j, o, corners); ok {
			good, err := mp.tieAt(p.XFraction, p.YFraction, o...)
			if err != nil {
				return p, false, err
			}
			if good && planar(corners, pair{o[0], o[1]}) && planar(corners, pair{o[0], o[2]}) {
				return p, true, nil
			}
		}
	}
	sx, sy := new(big.Rat), new(big.Rat)
	for _, p := range pts {
		sx.Add(sx, p.p.X.Rat())
		sy.Add(sy, p.p.Y.Rat())
	}
	n := big.NewRat(int64(len(pts)), 1)
	sx.Quo(sx, n)
	sy.Quo(sy, n)
	return BoundaryPoint{X: decimal.NewFromBigRat(sx, compiled.DivisionScale), Y: decimal.NewFromBigRat(sy, compiled.DivisionScale)}, false, nil
}

// triple solves where options o[0], o[1] and o[2] tie inside cell (i, j),
// each difference taken as the plane through the cell's bottom-left,
// bottom-right and top-left corners.
func (mp *mapper) triple(i, j int, o []int, corners []*sample) (BoundaryPoint, bool) {
	f := y(corners...)
	x0, x1 := mp.xs[i].Rat(), mp.xs[i+1].Rat()
	y0, y1 := mp.ys[j].Rat(), mp.ys[j+1].Rat()
	// d(u, v) = d00 + (d10 − d00)·u + (d01 − d00)·v, u and v in [0, 1].
	plane := func(a, b int) (c, pu, pv *big.Rat) {
		d := func(s *sample) *big.Rat { return f(s, a).Sub(f(s, b)).Rat() }
		c = d(corners[0])
		pu = new(big.Rat).Sub(d(corners[1]), c)
		pv = new(big.Rat).Sub(d(corners[2]), c)
		return
	}
	c1, u1, v1 := plane(o[0], o[1])
	c2, u2, v2 := plane(o[0], o[2])
	// u1·u + v1·v = −c1, u2·u + v2·v = −c2 (Cramer's rule).
	det := new(big.Rat).Sub(new(big.Rat).Mul(u1, v2), new(big.Rat).Mul(v1, u2))
	if det.Sign() == 0 {
		return BoundaryPoint{}, false
	}
	nc1, nc2 := new(big.Rat).Neg(c1), new(big.Rat).Neg(c2)
	u := new(big.Rat).Sub(new(big.Rat).Mul(nc1, v2), new(big.Rat).Mul(v1, nc2))
	u.Quo(u, det)
	v := new(big.Rat).Sub(new(big.Rat).Mul(u1, nc2), new(big.Rat).Mul(nc1, u2))
	v.Quo(v, det)
	zero, unit := new(big.Rat), big.NewRat(1, 1)
	if u.Cmp(zero) < 0 || u.Cmp(unit) > 0 || v.Cmp(zero) < 0 || v.Cmp(unit) > 0 {
		return BoundaryPoint{}, false
	}
	x := new(big.Rat).Add(x0, new(big.Rat).Mul(u, new(big.Rat).Sub(x1, x0)))
	yy := new(big.Rat).Add(y0, new(big.Rat).Mul(v, new(big.Rat).Sub(y1, y0)))
	return BoundaryPoint{X: decimal.NewFromBigRat(x, compiled.DivisionScale), Y: decimal.NewFromBigRat(yy, compiled.DivisionScale),
		Exact: true, XFraction: x, YFraction: yy}, true
}

// BoundaryLine is a boundary between two options' regions as one
// polyline: the segments that join end to end, with the points where the
// line runs straight on left out.
type BoundaryLine struct {
	// A and B are the options on either side (A < B).
	A, B   int
	Points []BoundaryPoint
	// Exact is set when every segment of the line is exact.
	Exact bool
}

// Lines joins the map's boundary segments into polylines, one for each
// run of segments between the same two options that meet end to end,
// in order of the options and then of the first point.
func (m *StrategyMap) Lines() []BoundaryLine {
	key := func(p BoundaryPoint) string { return p.X.String() + " " + p.Y.String() }
	byPair := map[pair][]int{}
	var pairs []pair
	for i, b := range m.Boundaries {
		k := pairOf(b.A, b.B)
		if _, ok := byPair[k]; !ok {
			pairs = append(pairs, k)
		}
		byPair[k] = append(byPair[k], i)
	}
	slices.SortFunc(pairs, func(p, q pair) int {
		if p.a != q.a {
			return p.a - q.a
		}
		return p.b - q.b
	})
	var out []BoundaryLine
	for _, k := range pairs {
		segs := byPair[k]
		at := map[string][]int{} // point → segments that end there
		for _, i := range segs {
			b := m.Boundaries[i]
			at[key(b.From)] = append(at[key(b.From)], i)
			at[key(b.To)] = append(at[key(b.To)], i)
		}
		used := map[int]bool{}
		// Start at loose ends first (lowest point first), then close
		// whatever loops are left.
		starts := make([]BoundaryPoint, 0, 2*len(segs))
		for _, i := range segs {
			starts = append(starts, m.Boundaries[i].From, m.Boundaries[i].To)
		}
		slices.SortStableFunc(starts, func(p, q BoundaryPoint) int {
			if c := p.X.Cmp(q.X); c != 0 {
				return c
			}
			return p.Y.Cmp(q.Y)
		})
		for pass := 0; pass < 2; pass++ {
			for _, s := range starts {
				if pass == 0 && len(at[key(s)]) != 1 {
					continue
				}
				line := BoundaryLine{A: k.a, B: k.b, Points: []BoundaryPoint{s}, Exact: true}
				cur := s
				for {
					next := -1
					for _, i := range at[key(cur)] {
						if !used[i] {
							next = i
							break
						}
					}
					if next < 0 {
						break
					}
					used[next] = true
					b := m.Boundaries[next]
					if key(b.From) == key(cur) {
						cur = b.To
					} else {
						cur = b.From
					}
					line.Exact = line.Exact && b.Exact
					line.Points = append(line.Points, cur)
				}
				if len(line.Points) > 1 {
					line.Points = straighten(line.Points)
					out = append(out, line)
				}
			}
		}
	}
	return out
}

// straighten drops the points of a polyline where it runs straight on.
func straighten(ps []BoundaryPoint) []BoundaryPoint {
	xy := func(p BoundaryPoint) (*big.Rat, *big.Rat) {
		if p.XFraction != nil {
			return p.XFraction, p.YFraction
		}
		return p.X.Rat(), p.Y.Rat()
	}
	out := []BoundaryPoint{ps[0]}
	for i := 1; i < len(ps); i++ {
		if i+1 < len(ps) && len(out) > 0 {
			x0, y0 := xy(out[len(out)-1])
			x1, y1 := xy(ps[i])
			x2, y2 := xy(ps[i+1])
			// (p1 − p0) × (p2 − p1) = 0: p1 lies on the line on.
			a := new(big.Rat).Mul(new(big.Rat).Sub(x1, x0), new(big.Rat).Sub(y2, y1))
			b := new(big.Rat).Mul(new(big.Rat).Sub(y1, y0), new(big.Rat).Sub(x2, x1))
			if a.Cmp(b) == 0 {
				continue
			}
		}
		out = append(out, ps[i])
	}
	return out
}

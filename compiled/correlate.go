package compiled

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Correlations between inputs written as distributions (`correlate A B
// RHO`). Exact analyses use the inputs' means and do not see them;
// simulation draws the inputs and pairs their draws by rank so that they
// carry the correlations (dist.ImanConover). They are checked here, at
// their positions: each name an input written as a distribution, each
// correlation a number between −1 and 1, each pair once, and the whole
// set a valid correlation matrix (positive definite).

// Correlation returns the target rank correlations of the simulation and
// the inputs they are between: cols[i] is row i's index in Uncertain. It
// is empty when the model correlates nothing.
func (c *Model) Correlation() (target dist.Correlation, cols []int) {
	return c.sh.corr, c.sh.corrCols
}

// correlations checks the model's correlate lines and builds the target.
func (k *compiler) correlations() {
	cs := k.m.Correlations
	if len(cs) == 0 {
		return
	}
	sh := k.c.sh
	// The input each name stands for: the index of its distribution in
	// sources, or -1 (reported).
	source := func(name string, at tree.Pos) int {
		slot, ok := sh.slotOf[name]
		if !ok {
			hint := "name an input defined with `let " + name + " = pert(...)` or another distribution"
			if names := distInputs(k); len(names) > 0 {
				hint = "the inputs written as distributions are " + strings.Join(names, ", ")
			}
			k.ds.Add(at, hint, "unknown input %q", name)
			return -1
		}
		// Naming an input here does not use it: it is drawn, but its
		// draws feed nothing unless a figure reads it.
		if k.correlated == nil {
			k.correlated = map[string]bool{}
		}
		k.correlated[name] = true
		for i, s := range sh.sources {
			if s.let == slot {
				return i
			}
		}
		k.ds.Add(at, "write it as a distribution, such as `let "+name+" = pert(LOW, LIKELY, HIGH)`, or correlate another input",
			"%q is not written as a distribution, so it has nothing to correlate", name)
		return -1
	}
	var (
		cols  []int // sources involved, in the order of sources
		index = map[int]int{}
		pairs []dist.Pair
		lines []*tree.Correlation // the line of each pair
	)
	type pairKey struct{ a, b int }
	seen := map[pairKey]*tree.Correlation{}
	bad := false
	for _, c := range cs {
		a, b := source(c.A, c.APos), source(c.B, c.BPos)
		rho, ok := k.rho(c)
		if a < 0 || b < 0 || !ok {
			bad = true
			continue
		}
		if a == b {
			k.ds.Add(c.BPos, "name two different inputs", "%q is correlated with itself", c.A)
			bad = true
			continue
		}
		key := pairKey{min(a, b), max(a, b)}
		if prev := seen[key]; prev != nil {
			k.ds.Add(c.Pos, fmt.Sprintf("it was first given at %s; keep one", prev.Pos), "the correlation of %q and %q is given twice", c.A, c.B)
			bad = true
			continue
		}
		seen[key] = c
		for _, s := range []int{a, b} {
			if _, ok := index[s]; !ok {
				index[s] = -1
				cols = append(cols, s)
			}
		}
		pairs = append(pairs, dist.Pair{A: a, B: b, Rho: rho})
		lines = append(lines, c)
	}
	if bad {
		return
	}
	// Rows in the order of sources, so that the target does not depend on
	// the order of the correlate lines.
	slices.Sort(cols)
	names := make([]string, len(cols))
	for i, s := range cols {
		index[s] = i
		names[i] = sh.params[sh.sources[s].let].Name
	}
	for i := range pairs {
		pairs[i].A, pairs[i].B = index[pairs[i].A], index[pairs[i].B]
	}
	target, err := dist.CorrelationFromPairs(names, pairs)
	if err != nil {
		var ce *dist.CorrelationError
		at := lines[len(lines)-1].Pos
		if errors.As(err, &ce) {
			at = blame(lines, pairs, ce).Pos
		}
		k.ds.Add(at, "the correlations of a set of inputs must be possible together: a correlation matrix must be positive definite", "%s", err.Error())
		return
	}
	sh.corr, sh.corrCols = target, cols
}

// blame picks the correlate line an invalid matrix is reported at: the
// pair's own line when one entry is wrong; otherwise, of the lines among
// the inputs up to row I, the last written that involves row I.
func blame(lines []*tree.Correlation, pairs []dist.Pair, ce *dist.CorrelationError) *tree.Correlation {
	pick := lines[len(lines)-1]
	best := -1
	for i, p := range pairs {
		lo, hi := min(p.A, p.B), max(p.A, p.B)
		switch {
		case ce.J >= 0 && lo == min(ce.I, ce.J) && hi == max(ce.I, ce.J):
			return lines[i]
		case ce.J < 0 && hi == ce.I && i > best:
			best, pick = i, lines[i]
		}
	}
	return pick
}

// rho evaluates a correlation: a number between −1 and 1 (it may be a
// calculation on inputs that are not random).
func (k *compiler) rho(c *tree.Correlation) (float64, bool) {
	p, err := compileExpr(k.pool, c.Rho, k.look, func(call *tree.Call) (int32, *EvalError) {
		return 0, &EvalError{Pos: call.At, Msg: "a distribution as a correlation", Hint: "a correlation is a number between -1 and 1"}
	})
	if err != nil {
		k.diag(err)
		return 0, false
	}
	if k.readsRandom(p) {
		k.ds.Add(c.Rho.Pos(), "a correlation is a fixed number between -1 and 1", "the correlation reads an input written as a distribution")
		return 0, false
	}
	v, _, err := p.eval(k.pool, k.c.in, nil)
	if err != nil {
		k.diag(err)
		return 0, false
	}
	d := k.pool.Dec(v)
	if d.Abs().GreaterThan(decimal.NewFromInt(1)) {
		k.ds.Add(c.Rho.Pos(), "a rank correlation lies between -1 and 1, such as 0.6 or -0.3", "the correlation %s is outside [-1, 1]", d)
		return 0, false
	}
	f, _ := d.Float64()
	return f, true
}

// distInputs lists the inputs written as distributions, for hints.
func distInputs(k *compiler) []string {
	var out []string
	for _, s := range k.c.sh.sources {
		if s.let >= 0 {
			out = append(out, k.c.sh.params[s.let].Name)
		}
	}
	return out
}

package register

import (
	"context"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/forkcast/forkcast/dist"
)

// The Monte Carlo core: it knows how to draw one risk's effect in one run,
// and how to add the effects up run after run. It is kept apart from the
// analysis so that it can serve other simulations (a register's total
// drawn inside a decision tree's simulation uses draw and drawAfter).
//
// Risk i in run r draws from its own stream, dist.Streams.Sub(i) reset to
// run r: the draws depend only on the seed, i and r, never on the worker
// or on the other risks. Two consequences the analysis relies on: the
// figures of a seed are the same whatever the number of workers, and a
// risk's draws can be made again, alone, to see the total without it
// (the ranking) with every other risk's draws unchanged.

// simRisk is one risk in float64, ready to draw.
type simRisk struct {
	sign       float64 // +1 threat, −1 opportunity
	p          float64
	impact     dist.Distribution // nil: fixed
	fixed      float64
	hasDelay   bool
	delay      dist.Distribution // nil: delayFixed
	delayFixed float64
	respond    bool
	rp         float64
	rimpact    dist.Distribution
	rfixed     float64
	rcost      float64
}

// core draws the risks of one register.
type core struct {
	risks  []simRisk
	before []dist.Streams // per risk: occurrence, impact, delay
	after  []dist.Streams // per risk: the impact that remains after its response
}

// Sub-stream tags: the register's streams derive from the seed and these,
// so that a printed seed reproduces its figures in later versions.
const (
	streamBefore = 1 << 32
	streamAfter  = 2 << 32
)

func newCore(reg *Register, seed uint64) *core {
	s := dist.NewStreams(seed)
	c := &core{risks: make([]simRisk, len(reg.Risks)), before: make([]dist.Streams, len(reg.Risks)), after: make([]dist.Streams, len(reg.Risks))}
	for i := range reg.Risks {
		k := &reg.Risks[i]
		sr := simRisk{sign: float64(k.Kind.sign()), p: floatOf(k.P), impact: k.Impact.Dist, fixed: floatOf(k.Impact.Fixed)}
		if k.Delay != nil {
			sr.hasDelay, sr.delay, sr.delayFixed = true, k.Delay.Dist, floatOf(k.Delay.Fixed)
		}
		if rs := k.Response; rs != nil {
			sr.respond, sr.rp, sr.rimpact, sr.rfixed, sr.rcost = true, floatOf(rs.P), rs.Impact.Dist, floatOf(rs.Impact.Fixed), floatOf(rs.Cost)
		}
		c.risks[i] = sr
		c.before[i] = s.Sub(streamBefore + uint64(i))
		c.after[i] = s.Sub(streamAfter + uint64(i))
	}
	return c
}

// drawer is one goroutine's generator: a source that draw resets for each
// risk and run, and the Rand over it.
type drawer struct {
	src *rand.PCG
	r   *rand.Rand
}

func newDrawer() drawer {
	src := rand.NewPCG(0, 0)
	return drawer{src: src, r: rand.New(src)}
}

func amountDraw(d dist.Distribution, fixed float64, src rand.Source) float64 {
	if d == nil {
		return fixed
	}
	return d.Rand(src)
}

// draw returns risk i's effect on the cost (+ a cost, − a saving) and on
// the schedule (days) in run run, as the register stands.
func (c *core) draw(i, run int, g drawer) (cost, days float64) {
	k := &c.risks[i]
	c.before[i].Reset(g.src, uint64(run))
	if g.r.Float64() >= k.p {
		return 0, 0
	}
	cost = k.sign * amountDraw(k.impact, k.fixed, g.src)
	if k.hasDelay {
		days = amountDraw(k.delay, k.delayFixed, g.src)
	}
	return cost, days
}

// drawAfter returns risk i's effect on the cost in run run when its
// response is taken: the response's cost, and the impact that remains if
// the risk still occurs. Occurrence uses the same uniform variate as draw,
// so a response that lowers the probability leaves the risk occurring
// only in runs where it would have occurred anyway (common random
// numbers: the difference a response makes is measured with less noise).
func (c *core) drawAfter(i, run int, g drawer) float64 {
	k := &c.risks[i]
	if !k.respond {
		cost, _ := c.draw(i, run, g)
		return cost
	}
	c.before[i].Reset(g.src, uint64(run))
	cost := k.rcost
	if g.r.Float64() < k.rp {
		c.after[i].Reset(g.src, uint64(run))
		cost += k.sign * amountDraw(k.rimpact, k.rfixed, g.src)
	}
	return cost
}

// totals holds every run's totals.
type totals struct {
	asIs    []float64 // the register as it stands
	planned []float64 // every planned response taken, its cost included
	chosen  []float64 // the responses in take taken; nil when take is every planned response
	days    []float64 // total schedule impact; nil when no risk has one
}

// progressEvery is how many runs a worker does between progress reports.
const progressEvery = 1024

// run draws runs runs on workers goroutines. take lists the responses of
// the chosen set. It returns the runs done (a prefix 0 … done−1) and, when
// ctx stopped it, ctx's error.
func (c *core) run(ctx context.Context, runs, workers int, take []bool, progress func(int)) (totals, int, error) {
	t := totals{asIs: make([]float64, runs), planned: make([]float64, runs)}
	anyDelay, differ := false, false
	for i, k := range c.risks {
		anyDelay = anyDelay || k.hasDelay
		differ = differ || (k.respond && !take[i])
	}
	if anyDelay {
		t.days = make([]float64, runs)
	}
	if differ {
		t.chosen = make([]float64, runs)
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	gens := make([]drawer, workers)
	since := make([]int, workers)
	for w := range gens {
		gens[w] = newDrawer()
	}
	var counted atomic.Int64
	// The run's own stream (r) is not used: each risk has its own.
	done, err := dist.ForEachRun(ctx, dist.NewStreams(0), runs, workers, func(w, run int, _ *rand.Rand) error {
		g := gens[w]
		var asIs, planned, chosen, days float64
		for i := range c.risks {
			cost, d := c.draw(i, run, g)
			asIs += cost
			days += d
			if !c.risks[i].respond {
				planned += cost
				chosen += cost
				continue
			}
			after := c.drawAfter(i, run, g)
			planned += after
			if take[i] {
				chosen += after
			} else {
				chosen += cost
			}
		}
		t.asIs[run], t.planned[run] = asIs, planned
		if t.chosen != nil {
			t.chosen[run] = chosen
		}
		if t.days != nil {
			t.days[run] = days
		}
		if progress != nil {
			if since[w]++; since[w] == progressEvery {
				progress(int(counted.Add(int64(since[w]))))
				since[w] = 0
			}
		}
		return nil
	})
	t.asIs, t.planned = t.asIs[:done], t.planned[:done]
	if t.chosen != nil {
		t.chosen = t.chosen[:done]
	}
	if t.days != nil {
		t.days = t.days[:done]
	}
	return t, done, err
}

// without returns, for each risk, the percentile at level p of the total
// without that risk: every run's total less the risk's own draw in that
// run (drawn again from its stream). Risks are shared out over workers.
func (c *core) without(ctx context.Context, base []float64, p float64, workers int) ([]float64, error) {
	n := len(base)
	out := make([]float64, len(c.risks))
	if n == 0 {
		return out, nil
	}
	k := rankOf(p, n)
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(c.risks))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			g := newDrawer()
			scratch := make([]float64, n)
			for ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= len(c.risks) {
					return
				}
				for run := range n {
					cost, _ := c.draw(i, run, g)
					scratch[run] = base[run] - cost
				}
				out[i] = kth(scratch, k)
			}
		})
	}
	wg.Wait()
	return out, ctx.Err()
}

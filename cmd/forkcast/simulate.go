package main

import (
	"fmt"
	"io"
	"sync"
	"time"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/internal/atomicfile"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
	"github.com/schollz/progressbar/v3"
	"github.com/urfave/cli/v2"
)

func simulateCommand() *cli.Command {
	return &cli.Command{
		Name:      "simulate",
		Usage:     "Monte Carlo: the spread of each option's payoff when the estimates are ranges",
		ArgsUsage: "FILE",
		UsageText: "forkcast simulate [--runs N] [--seed S] [--workers N] [--inputs-only] [--at DECISION]\n" +
			"       [--json] [--chart FILE] [--cumulative FILE] [--save-draws FILE.csv] FILE\n\n" +
			"   forkcast simulate example:project-cost\n" +
			"   forkcast simulate model.fork --runs 100_000 --chart spread.svg --cumulative s-curve.png\n" +
			"   forkcast simulate model.fork --seed 7 --json > runs.json",
		Description: "Draws every input written as a distribution (pert, triangular, uniform, normal,\n" +
			"lognormal, discrete) run after run, and reports for each option of a decision:\n" +
			"its payoff's mean with the standard error, the SD, the percentiles P5 … P95\n" +
			"(P80 among them), the chance of a loss and P(best), the share of runs in which\n" +
			"it is the best option once that run's inputs are known; then the expected value\n" +
			"of knowing the inputs before deciding. A tree with no decision gets one\n" +
			"distribution, of the whole tree's payoff, and no P(best).\n\n" +
			"Each run follows the base-case policy (the one solve recommends) after the\n" +
			"option and draws every chance outcome on the way, with the run's probabilities.\n" +
			"--inputs-only draws the inputs only and takes each option's expected value over\n" +
			"the chance outcomes instead: the spread due to the estimates alone.\n\n" +
			"A run depends only on the seed and its number: the same --seed gives the same\n" +
			"figures whatever --workers, and more --runs add runs after the same first ones.\n" +
			"Correlations written in the model (`correlate A B 0.6`) are imposed on the\n" +
			"draws by their ranks (Iman–Conover), over all the runs at once: with them,\n" +
			"another --runs pairs the draws differently from the first run on.\n\n" +
			"--at names the decision watched (default: the root, or the first decision on\n" +
			"the best path). Ctrl-C stops the runs and reports those done (exit status 130).",
		Flags: []cli.Flag{
			runsFlag(eval.DefaultRuns, eval.MaxRuns), seedFlag(eval.DefaultSeed), workersFlag,
			&cli.BoolFlag{Name: "inputs-only", Usage: "draw the inputs only: each option's payoff is its expected value over the chance outcomes"},
			&cli.StringFlag{Name: "at", Usage: "watch the decision with this `LABEL`"},
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON"},
			&cli.StringFlag{Name: "chart", Usage: "write the histogram of each option's payoff to `FILE` (.svg or .png)"},
			&cli.StringFlag{Name: "cumulative", Usage: "write the cumulative chart of each option's payoff to `FILE` (.svg or .png)"},
			&cli.StringFlag{Name: "save-draws", Usage: "write every run's draws and payoffs to `FILE` as CSV"},
			setFlag(),
			maxNodesFlag,
		},
		Action: simulateAction,
	}
}

func simulateAction(c *cli.Context) error {
	runs, err := runsArg(c, eval.MaxRuns)
	if err != nil {
		return err
	}
	hist, err := chartTarget(c, "chart")
	if err != nil {
		return err
	}
	cumul, err := chartTarget(c, "cumulative")
	if err != nil {
		return err
	}
	if err := sameChartFile(hist, cumul); err != nil {
		return err
	}
	draws := c.String("save-draws")
	if c.IsSet("save-draws") && (draws == "" || draws == "-") {
		return usageErr("--save-draws needs a file name (the draws can be large; they go to a file)")
	}
	l, err := loadModel(c)
	if err != nil {
		return err
	}
	if err := setDrawnInput(c, l); err != nil {
		return err
	}
	l.printWarnings(c)
	opts := eval.SimulateOptions{Runs: runs, Seed: c.Uint64("seed"), Workers: c.Int("workers"),
		InputsOnly: c.Bool("inputs-only"), At: c.String("at"), KeepDraws: draws != ""}
	bar := newRunBar(c, runs)
	opts.Progress = bar.set
	s, err := eval.Simulate(c.Context, l.Compiled, opts)
	bar.finish()
	if err != nil {
		return analysisErr(err)
	}
	rerun := fmt.Sprintf("--seed %d", s.Seed)
	switch {
	case s.Stopped && s.Correlated:
		rerun = "" // paired over the runs asked for: no shorter simulation repeats them (the notes say so)
	case s.Stopped:
		rerun += fmt.Sprintf(" --runs %d", s.Runs) // the runs of a seed are a prefix of every longer run
	}
	r := report.Simulate(s, report.SimulateOptions{Names: flagNames(), Rerun: rerun})
	if err := hist.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteHistogram(w, r.Histogram(), o) }); err != nil {
		return err
	}
	if err := cumul.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteCumulative(w, r.Cumulative(), o) }); err != nil {
		return err
	}
	if draws != "" {
		if err := atomicfile.WriteFunc(draws, 0o644, r.WriteDraws); err != nil {
			return modelErr("--save-draws: %s", shown(err.Error()))
		}
		fmt.Fprintf(c.App.ErrWriter, "wrote %s\n", shown(draws))
	}
	if c.Bool("json") {
		err = r.WriteJSON(c.App.Writer)
	} else {
		err = r.WriteText(c.App.Writer)
	}
	if err != nil {
		return err
	}
	if s.Stopped && c.Context.Err() != nil {
		// The runs done are reported; the status still says the work
		// was cut short.
		return cli.Exit(fmt.Sprintf("interrupted after %d of %d runs; the figures above are from those runs", s.Runs, s.Asked), exitInterrupted)
	}
	return nil
}

// runBar is the progress bar of a simulation on a terminal's standard
// error; on anything else it shows nothing.
type runBar struct {
	mu   sync.Mutex
	bar  *progressbar.ProgressBar
	last int
}

func newRunBar(c *cli.Context, runs int) *runBar {
	b := &runBar{}
	if !isTerminal(c.App.ErrWriter) {
		return b
	}
	b.bar = progressbar.NewOptions(runs,
		progressbar.OptionSetWriter(c.App.ErrWriter),
		progressbar.OptionSetDescription("simulating"),
		progressbar.OptionShowCount(),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionSetRenderBlankState(false),
		progressbar.OptionClearOnFinish(),
	)
	return b
}

// set moves the bar to done runs; the workers report from several
// goroutines, in any order, so it never moves back.
func (b *runBar) set(done int) {
	if b.bar == nil {
		return
	}
	b.mu.Lock()
	defer b.mu.Unlock()
	if done > b.last {
		b.last = done
		_ = b.bar.Set(done)
	}
}

func (b *runBar) finish() {
	if b.bar != nil {
		_ = b.bar.Clear()
	}
}

// setDrawnInput refuses a --set of an input written as a distribution: a
// simulation draws it, and a fixed value would leave its draws listed in
// the report and the CSV while the runs use another figure.
func setDrawnInput(c *cli.Context, l *loaded) error {
	sets, err := parseSettings(c)
	if err != nil || len(sets) == 0 {
		return err
	}
	drawn := map[string]string{}
	for _, u := range l.Compiled.Uncertain() {
		if u.Input != "" {
			drawn[u.Input] = u.Written()
		}
	}
	for _, s := range sets {
		if w, ok := drawn[s.name]; ok {
			return usageErr("--set %s: %s is written as a distribution, %s, which simulate draws; --set fixes inputs that are not drawn (to fix this one, write the figure in its let line)", shown(s.word), shown(s.name), w)
		}
	}
	return nil
}

// The flags of a seeded simulation, shared by simulate and register: how
// many runs (with the library's default and cap), the seed, the workers.
func runsFlag(def, max int) cli.Flag {
	return &cli.IntFlag{Name: "runs", Value: def, Usage: "draw `N` runs (at most " + fmt.Sprint(max) + ")"}
}

func seedFlag(def uint64) cli.Flag {
	return &cli.Uint64Flag{Name: "seed", Value: def, Usage: "the random seed `S`; the same seed gives the same figures"}
}

var workersFlag = &cli.IntFlag{Name: "workers", Usage: "run on `N` goroutines (0: one per CPU); never changes the figures"}

// runsArg is --runs, refused above max (leastCount refuses fewer than 2).
func runsArg(c *cli.Context, max int) (int, error) {
	runs := c.Int("runs")
	if runs > max {
		return 0, usageErr("--runs %d: give at most %d", runs, max)
	}
	return runs, nil
}

package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/forkcast/forkcast/internal/atomicfile"
	"github.com/forkcast/forkcast/register"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/report"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func registerCommand() *cli.Command {
	return &cli.Command{
		Name:      "register",
		Usage:     "quantify a risk register: EMV of each risk, the contingency reserve, the chance of staying within budget",
		ArgsUsage: "FILE",
		UsageText: "forkcast register [--confidence 80%] [--budget AMOUNT] [--runs N] [--seed S] [--workers N]\n" +
			"       [--json] [--csv FILE] [--tornado FILE] [--name NAME] [--currency CODE] FILE\n" +
			"   forkcast register import [--currency CODE] [-o FILE.fork] FILE.csv\n\n" +
			"   forkcast register example:library-register             the register built in\n" +
			"   forkcast register risks.csv --currency EUR --budget 120_000 --csv risks-quantified.csv\n" +
			"   forkcast register model.fork --name works --confidence 90% --tornado ranking.svg",
		Description: "FILE is a register: a .fork file with a `register` block (docs/language.md;\n" +
			"--name picks one when it has several, --set changes the inputs its figures use),\n" +
			"or a spreadsheet saved as CSV (a header row with at least id, title, type,\n" +
			"probability, low, likely, high; `forkcast register import` makes a .fork of it).\n\n" +
			"For each risk: its expected impact (EMV = probability × mean impact) before and\n" +
			"after its response; threats, opportunities and the net; the total EMV, which is\n" +
			"the contingency reserve by the expected-value method. Then, by Monte Carlo, the\n" +
			"distribution of the total impact (mean, SD, P50, P80, P90, P95) and the reserve\n" +
			"needed at --confidence beside the EMV reserve; with --budget, the chance that the\n" +
			"total stays within it; the risks ranked by what each adds to the total's\n" +
			"percentile at the confidence (--tornado draws it); and each response appraised:\n" +
			"what it takes off the expected impact against its cost, and the best set of\n" +
			"responses.\n\n" +
			"--csv FILE writes the register back as a spreadsheet with the figures added\n" +
			"(emv, emv_after, response_net, take_response, rank, share, contribution_pNN);\n" +
			"from a CSV every column is written back as it was. Money is cost: an\n" +
			"opportunity's EMV is negative (a saving).\n\n" +
			"A tree can use a register's total as an input: let x = register NAME total.\n\n" +
			"A run depends only on the seed and its number: the same --seed gives the same\n" +
			"figures whatever --workers. Ctrl-C stops the runs and reports those done.",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "confidence", Value: "80%", Usage: "size the reserve to cover the total in `LEVEL` of runs (80%, 0.9)"},
			&cli.StringFlag{Name: "budget", Usage: "give the chance that the total stays within `AMOUNT`"},
			runsFlag(register.DefaultRuns, register.MaxRuns), seedFlag(register.DefaultSeed), workersFlag,
			&cli.BoolFlag{Name: "json", Usage: "print the result as JSON"},
			&cli.StringFlag{Name: "csv", Usage: "write the register with the figures added to `FILE` as CSV (- for standard output)"},
			&cli.StringFlag{Name: "tornado", Usage: "write the ranking as a tornado diagram to `FILE` (.svg or .png)"},
			&cli.StringFlag{Name: "name", Usage: "the register `NAME` to analyse, when a .fork file has several"},
			&cli.StringFlag{Name: "currency", Usage: "the currency `CODE` of a CSV register's amounts (a .fork gives its own)"},
			setFlag(),
			maxNodesFlag,
		},
		Action:      registerAction,
		Subcommands: []*cli.Command{registerImportCommand()},
	}
}

func registerImportCommand() *cli.Command {
	return &cli.Command{
		Name:      "import",
		Usage:     "read a register from a spreadsheet saved as CSV and write it as a .fork register block",
		ArgsUsage: "FILE.csv",
		UsageText: "forkcast register import [--currency CODE] [-o FILE.fork] FILE.csv\n\n" +
			"   forkcast register import risks.csv -o risks.fork",
		Description: "The header row names the columns: id, title, type (threat or opportunity),\n" +
			"probability (30% or 0.3), low, likely, high (a PERT estimate of the cost impact;\n" +
			"likely alone for a fixed figure), and optionally owner, category, distribution\n" +
			"(pert, triangular or uniform), response, response_cost, residual_probability,\n" +
			"residual_low, residual_likely, residual_high, schedule_low, schedule_likely,\n" +
			"schedule_high (days). Other columns are kept as `column` lines. Every bad cell\n" +
			"is reported as FILE:ROW:COLUMN: message.",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "currency", Usage: "write `CODE` as the model's currency"},
			&cli.StringFlag{Name: "output", Aliases: []string{"o"}, Value: "-", Usage: "write the .fork text to `FILE` (- for standard output)"},
		},
		Action: registerImportAction,
	}
}

// isCSV reports whether FILE names a spreadsheet.
func isCSV(name string) bool { return strings.EqualFold(filepath.Ext(name), ".csv") }

// readCSVArg reads FILE as a spreadsheet, its bad cells printed as
// FILE:ROW:COLUMN: message.
func readCSVArg(c *cli.Context, name string) (*register.Table, error) {
	src, _, err := readSource(c, name)
	if err != nil {
		return nil, err
	}
	t, err := register.ReadCSV(bytes.NewReader(src))
	var ce *register.CSVError
	if errors.As(err, &ce) {
		shownName := shown(name)
		if name == "-" {
			shownName = "<stdin>"
		}
		for _, line := range ce.Lines(shownName) {
			fmt.Fprintln(c.App.ErrWriter, line)
		}
		n := len(ce.Cells) + ce.More
		return nil, modelErr("%s: %d bad cell%s; nothing was analysed", shownName, n, plural(n))
	}
	if err != nil {
		return nil, modelErr("%s: %v", shown(name), err)
	}
	return t, nil
}

func registerImportAction(c *cli.Context) error {
	name, err := fileArg(c)
	if err != nil {
		return err
	}
	if strings.EqualFold(filepath.Ext(name), ".fork") || strings.HasPrefix(name, "example:") {
		return usageErr("register import reads a spreadsheet saved as CSV; %s is already text: quantify it with `forkcast register %s`, or write it as a spreadsheet with `forkcast register %s --csv OUT.csv`",
			shown(name), shown(name), shown(name))
	}
	t, err := readCSVArg(c, name)
	if err != nil {
		return err
	}
	reg := t.Register
	base := strings.TrimSuffix(filepath.Base(name), filepath.Ext(name))
	if name == "-" {
		base = "register"
	}
	reg.Name = register.NameFor(base)
	var out bytes.Buffer
	warns, err := register.WriteFork(&out, reg, register.ForkOptions{
		Comment:  "Risk register imported from " + filepath.Base(name),
		Currency: c.String("currency"),
	})
	if err != nil {
		return modelErr("%v", err)
	}
	for _, w := range warns {
		what := "the register's title"
		if w.Risk >= 0 {
			what = fmt.Sprintf("risk %s, %s", reg.Risks[w.Risk].ID, w.Field)
		}
		fmt.Fprintf(c.App.ErrWriter, "%s: warning: %s: %s\n", shown(name), shown(what), w.Msg)
	}
	return writeOutput(c, c.String("output"), out.Bytes())
}

// writeOutput writes data to path, or to standard output for "-".
func writeOutput(c *cli.Context, path string, data []byte) error {
	if path == "-" {
		_, err := c.App.Writer.Write(data)
		return err
	}
	if strings.TrimSpace(path) == "" {
		return usageErr("-o needs a file name, or - for standard output")
	}
	if err := atomicfile.Write(path, data, 0o644); err != nil {
		return modelErr("%s", shown(err.Error()))
	}
	fmt.Fprintf(c.App.ErrWriter, "wrote %s\n", shown(path))
	return nil
}

// levelArg reads --confidence: a level strictly between 0 and 1, written
// as 80% or 0.8.
func levelArg(c *cli.Context) (float64, error) {
	s := c.String("confidence")
	d, err := parseNumber(s)
	if err != nil {
		return 0, usageErr("--confidence %s: %v", shown(s), err)
	}
	if d.Sign() <= 0 || d.Cmp(decimal.NewFromInt(1)) >= 0 {
		return 0, usageErr("--confidence %s: give a level between 0%% and 100%%, such as 80%% or 0.9", shown(s))
	}
	f, _ := d.Float64()
	return f, nil
}

func registerAction(c *cli.Context) error {
	conf, err := levelArg(c)
	if err != nil {
		return err
	}
	var budget *decimal.Decimal
	if c.IsSet("budget") {
		b, err := parseNumber(c.String("budget"))
		if err != nil {
			return usageErr("--budget %s: %v", shown(c.String("budget")), err)
		}
		budget = &b
	}
	runs, err := runsArg(c, register.MaxRuns)
	if err != nil {
		return err
	}
	tornado, err := chartTarget(c, "tornado")
	if err != nil {
		return err
	}
	csvOut := c.String("csv")
	if c.IsSet("csv") && strings.TrimSpace(csvOut) == "" {
		return usageErr("--csv needs a file name, or - for standard output")
	}
	name, err := fileArg(c)
	if err != nil {
		return err
	}
	var (
		reg   *register.Register
		table *register.Table
	)
	if isCSV(name) {
		if s, _ := c.Generic("set").(*setList); s != nil && len(s.words) > 0 {
			return usageErr("--set changes a model's inputs; a CSV register has none (edit the sheet, or import it and use let)")
		}
		if table, err = readCSVArg(c, name); err != nil {
			return err
		}
		reg = table.Register
		reg.Currency = c.String("currency")
		if name != "-" {
			reg.Name = register.NameFor(strings.TrimSuffix(filepath.Base(name), filepath.Ext(name)))
		}
	} else {
		if reg, err = loadRegister(c); err != nil {
			return err
		}
		if c.IsSet("currency") {
			reg.Currency = c.String("currency")
		}
	}
	opts := register.Options{Runs: runs, Seed: c.Uint64("seed"), Workers: c.Int("workers"), Confidence: conf, Budget: budget}
	bar := newRunBar(c, runs)
	opts.Progress = bar.set
	a, err := register.Analyse(c.Context, reg, opts)
	bar.finish()
	if err != nil {
		return analysisErr(err)
	}
	rerun := fmt.Sprintf("--seed %d", a.Seed)
	if a.Stopped && a.Runs < a.Asked {
		rerun += fmt.Sprintf(" --runs %d", a.Runs)
	}
	r := report.Register(a, report.RegisterOptions{Rerun: rerun})
	if err := tornado.write(c, func(w io.Writer, o chart.Options) error { return chart.WriteTornado(w, r.Tornado(), o) }); err != nil {
		return err
	}
	if c.IsSet("csv") {
		o := register.CSVOptions{Places: render.MinorUnit(reg.Currency), Whole: render.MinorUnit(reg.Currency) == 0}
		write := func(w io.Writer) error {
			if table != nil {
				return table.WriteCSV(w, a, o)
			}
			return register.WriteCSV(w, reg, a, o)
		}
		if csvOut == "-" {
			if err := write(c.App.Writer); err != nil {
				return modelErr("--csv: %v", err)
			}
			return stoppedErr(c, a)
		}
		if err := atomicfile.WriteFunc(csvOut, 0o644, write); err != nil {
			return modelErr("--csv: %s", shown(err.Error()))
		}
		fmt.Fprintf(c.App.ErrWriter, "wrote %s\n", shown(csvOut))
	}
	if c.Bool("json") {
		err = r.WriteJSON(c.App.Writer)
	} else {
		err = r.WriteText(c.App.Writer)
	}
	if err != nil {
		return err
	}
	return stoppedErr(c, a)
}

// stoppedErr is exit status 130 when Ctrl-C cut the runs short (their
// figures were reported).
func stoppedErr(c *cli.Context, a *register.Analysis) error {
	if a.Stopped && c.Context.Err() != nil {
		return cli.Exit(fmt.Sprintf("interrupted after %d of %d runs; the figures above are from those runs", a.Runs, a.Asked), exitInterrupted)
	}
	return nil
}

// loadRegister reads a .fork file and returns the register it holds (the
// one --name names, when it holds several), its figures at the inputs
// --set gives.
func loadRegister(c *cli.Context) (*register.Register, error) {
	l, err := loadModel(c)
	if err != nil {
		return nil, err
	}
	l.printWarnings(c)
	name := c.String("name")
	reg, err := register.FromModel(l.Compiled, name)
	var ds tree.Diagnostics
	switch {
	case errors.As(err, &ds):
		ds.Print(c.App.ErrWriter, l.Name, l.Src)
		n := len(ds.Errors())
		return nil, modelErr("%s: %d error%s; nothing was analysed", l.Name, n, plural(n))
	case err != nil && len(l.Model.Registers) > 1 && name == "":
		return nil, usageErr("%s holds %s: say which with --name NAME", l.Name, registersSummary(l.Model))
	case err != nil && name != "" && len(l.Model.Registers) > 0:
		return nil, usageErr("--name %s: %s has no register of that name; its registers: %s", shown(name), l.Name, registerNames(l.Model))
	case err != nil:
		return nil, modelErr("%s: %v", l.Name, err)
	}
	return reg, nil
}

// registersSummary says what registers a model holds: "register works (8
// risks)", "2 registers (works, fitout)".
func registersSummary(m *tree.Model) string {
	switch len(m.Registers) {
	case 0:
		return "no register"
	case 1:
		n := len(m.Registers[0].Risks)
		return fmt.Sprintf("register %s (%d risk%s)", m.Registers[0].Name, n, plural(n))
	}
	return fmt.Sprintf("%d registers (%s)", len(m.Registers), registerNames(m))
}

func registerNames(m *tree.Model) string {
	names := make([]string, len(m.Registers))
	for i, r := range m.Registers {
		names[i] = r.Name
	}
	return strings.Join(names, ", ")
}

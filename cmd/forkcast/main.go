// Command forkcast lays out a one-off decision under uncertainty as a
// decision tree, finds the course of action with the best expected monetary
// value, and helps defend it.
//
//	forkcast solve examples/sourcing.fork
//	forkcast check model.fork
//	forkcast examples
//
// Run `forkcast help` or `forkcast COMMAND --help` for more.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode"

	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/urfave/cli/v2"
	"github.com/xrash/smetrics"
)

// Exit codes. A missing FILE, a directory given as FILE, an unknown
// example:NAME and an output that cannot be written are input/output
// problems (1), like a model with errors: the command line was understood,
// what it points to cannot be used. 2 is kept for words of the command
// line itself that are wrong, so that a script can tell the two apart.
const (
	exitOK       = 0
	exitModel    = 1 // the model, or a file named, cannot be used
	exitUsage    = 2 // the command line is wrong
	exitInternal = 3 // a bug in forkcast: a panic caught at the top
	// exitInterrupted: stopped by Ctrl-C (SIGINT) before the work was
	// done; 128 + the signal's number, as shells report it.
	exitInterrupted = 130
)

// exitStatusHelp is the exit status paragraph of `forkcast --help`.
const exitStatusHelp = "Exit status: 0 success; 1 the model has errors, or a file named cannot be\n" +
	"read or written (missing, a directory, a symbolic link as output); 2 the\n" +
	"command line is wrong (unknown command or flag, a flag value out of range,\n" +
	"a missing FILE argument); 3 an internal error in forkcast (please report it);\n" +
	"130 interrupted with Ctrl-C before the work was done (nothing is written,\n" +
	"except by simulate, which reports the runs done)."

func main() {
	// A run reads one model, works on it and exits: its large arrays are
	// better in huge pages (internal/bulk).
	bulk.UseHugePages(true)
	os.Exit(mainStatus(os.Args))
}

// mainStatus runs the command as the process does: Ctrl-C (SIGINT)
// cancels the running analysis through its context, which then stops
// with a message and exitInterrupted; a second Ctrl-C ends the process
// at once.
func mainStatus(args []string) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	go func() {
		<-ctx.Done()
		stop()
	}()
	return guard(os.Stderr, func() int { return runContext(ctx, args, os.Stdin, os.Stdout, os.Stderr) })
}

// guard runs the command and turns a panic, which is always a bug, into an
// internal-error message and exit status 3, instead of a goroutine dump
// and the usage status 2 the Go runtime would give.
func guard(stderr io.Writer, f func() int) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "forkcast: internal error: %s\nThis is a bug in forkcast; please report it with the command and the model that caused it.\n", shown(fmt.Sprint(r)))
			code = exitInternal
		}
	}()
	return f()
}

// commands lists every command, in the order `forkcast help` shows them.
func commands() []*cli.Command {
	return []*cli.Command{
		solveCommand(),
		checkCommand(),
		voiCommand(),
		breakevenCommand(),
		sensitivityCommand(),
		sweepCommand(),
		profileCommand(),
		simulateCommand(),
		registerCommand(),
		drawCommand(),
		examplesCommand(),
	}
}

// run is main without the process: tests call it with their own streams.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return runContext(context.Background(), args, stdin, stdout, stderr)
}

// runContext is run with a context that the commands' work stops with.
func runContext(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	notFound := false // an unknown command was named, also as `help NAME`
	app := &cli.App{
		Name:  "forkcast",
		Usage: "decision trees with exact expected monetary value",
		Description: "forkcast reads a decision model (a .fork text file, or JSON), rolls the tree\n" +
			"back to the option with the best expected monetary value, and shows\n" +
			"what supports that answer.\n\n" +
			"Start with:  forkcast examples            (the models built in)\n" +
			"             forkcast solve example:sourcing\n" +
			"             forkcast check my-model.fork\n\n" +
			"FILE may be a path, - for standard input, or example:NAME.\n\n" +
			exitStatusHelp,
		Commands:        commands(),
		Reader:          stdin,
		Writer:          stdout,
		ErrWriter:       stderr,
		HideHelpCommand: false,
		Suggest:         true,
		OnUsageError: func(c *cli.Context, err error, isSub bool) error {
			return usageErr("%s", flagValueMessage(err.Error(), commands()))
		},
		ExitErrHandler: func(*cli.Context, error) {}, // run decides the exit code
		CommandNotFound: func(c *cli.Context, name string) {
			notFound = true
			fmt.Fprintf(stderr, "forkcast: unknown command %q%s; run `forkcast help` for the list\n", name, suggest(name, c.App.Commands))
		},
	}
	for _, cmd := range app.Commands {
		cmd.OnUsageError = app.OnUsageError
		cmd.Before = checkCounts
	}
	args, err := reorder(args, app.Commands)
	if err != nil {
		fmt.Fprintf(stderr, "forkcast: %v\n(run with --help to see how to use it)\n", err)
		return exitUsage
	}
	err = app.RunContext(ctx, args)
	if err == nil {
		if notFound {
			return exitUsage
		}
		return exitOK
	}
	var ec cli.ExitCoder
	if errors.As(err, &ec) {
		if msg := err.Error(); msg != "" {
			fmt.Fprintln(stderr, "forkcast: "+msg)
		}
		return ec.ExitCode()
	}
	fmt.Fprintln(stderr, "forkcast: "+err.Error())
	return exitUsage
}

// badFlagValue and badBoolValue match the flag package's messages for a
// value of the wrong kind, which name the flag with one dash and say only
// "parse error".
var (
	badFlagValue = regexp.MustCompile(`^invalid value "(.*)" for flag -([a-z][a-z-]*): (parse error|value out of range)$`)
	badBoolValue = regexp.MustCompile(`^invalid boolean value "(.*)" for -([a-z][a-z-]*): parse error$`)
)

// flagValueMessage rewrites the flag package's message for a value of the
// wrong kind as the flag is written on the command line, with what it
// takes; any other message is returned unchanged.
func flagValueMessage(msg string, cmds []*cli.Command) string {
	if m := badBoolValue.FindStringSubmatch(msg); m != nil {
		return fmt.Sprintf("--%s=%s: give true or false, or leave the value out", m[2], shown(m[1]))
	}
	m := badFlagValue.FindStringSubmatch(msg)
	if m == nil {
		return msg
	}
	value, name := shown(m[1]), m[2]
	for _, cmd := range cmds {
		for _, f := range cmd.Flags {
			if !slices.Contains(f.Names(), name) {
				continue
			}
			switch f.(type) {
			case *cli.Uint64Flag:
				return fmt.Sprintf("--%s %s: give a whole number from 0 to %d", name, value, uint64(math.MaxUint64))
			case *cli.IntFlag:
				if m[3] == "value out of range" {
					return fmt.Sprintf("--%s %s: too large; give a whole number of at most %d", name, value, math.MaxInt)
				}
				return fmt.Sprintf("--%s %s: give a whole number (digits, with _ between groups if you like)", name, value)
			}
		}
	}
	return fmt.Sprintf("--%s %s: %s", name, value, m[3])
}

// checkCounts refuses a count or limit flag given out of its range (a
// usage error), so that a negative --max-nodes is not quietly taken for
// the default.
func checkCounts(c *cli.Context) error {
	for _, f := range c.Command.Flags {
		if _, ok := f.(*cli.IntFlag); !ok {
			continue
		}
		name := f.Names()[0]
		if !c.IsSet(name) {
			continue
		}
		if v, least := c.Int(name), leastCount(name); v < least {
			return usageErr("--%s %d: %s", name, v, countRule(least))
		}
	}
	return nil
}

// leastCount is the smallest value an integer flag takes. A count is
// never negative; a limit is at least 1; --warnings takes -1 for all; a
// simulation makes at least 2 runs, since one run has no spread and its
// standard deviation and standard error would read as 0.
func leastCount(name string) int {
	switch name {
	case "warnings", "outcomes":
		return -1
	case "max-nodes", "max-paths", "max-scenarios", "max-work", "max-samples", "wrap":
		return 1
	case "runs":
		return 2
	}
	return 0
}

func countRule(least int) string {
	switch least {
	case -1:
		return "give a number of at least 0, or -1 for all"
	case 0:
		return "give a number of at least 0"
	}
	return fmt.Sprintf("give a number of at least %d", least)
}

// usageErr is a command-line mistake: exit status 2.
func usageErr(format string, args ...any) error {
	return cli.Exit(fmt.Sprintf(format, args...)+"\n(run with --help to see how to use it)", exitUsage)
}

// modelErr is a problem with the model, already reported: exit status 1.
func modelErr(format string, args ...any) error {
	return cli.Exit(fmt.Sprintf(format, args...), exitModel)
}

// shown is a name the user gave (a path, an extension) as it is safe to
// print: unchanged when every character is printable, else Go-quoted, so
// that no control sequence in it reaches a terminal.
func shown(s string) string {
	for _, r := range s {
		if !unicode.IsPrint(r) && r != ' ' {
			return strconv.Quote(s)
		}
	}
	return s
}

// reorder moves a command's flags ahead of its arguments, so that
// `solve m.fork --json` works like `solve --json m.fork` (the flag package
// stops at the first argument). Everything after "--" stays as it is.
func reorder(args []string, cmds []*cli.Command) ([]string, error) {
	if len(args) < 3 {
		return args, nil
	}
	var cmd *cli.Command
	for _, c := range cmds {
		if c.HasName(args[1]) {
			cmd = c
		}
	}
	if cmd == nil {
		return args, nil
	}
	// A subcommand named right after its command (`register import
	// FILE`) takes the place of the command: its own flags are moved.
	var sub *cli.Command
	for _, s := range cmd.Subcommands {
		if s.HasName(args[2]) {
			sub = s
		}
	}
	if sub != nil {
		inner, err := reorder(append([]string{args[0] + " " + args[1]}, args[2:]...), []*cli.Command{sub})
		if err != nil {
			return nil, err
		}
		return append([]string{args[0], args[1]}, inner[1:]...), nil
	}
	takesValue := map[string]bool{}
	for _, f := range cmd.Flags {
		_, isBool := f.(*cli.BoolFlag)
		for _, n := range f.Names() {
			takesValue[n] = !isBool
		}
	}
	var flags, pos []string
	rest := args[2:]
	for i := 0; i < len(rest); i++ {
		a := rest[i]
		if a == "--" {
			pos = append(pos, rest[i+1:]...)
			break
		}
		if a == "-h" || a == "--help" || a == "-help" {
			// Help asked for: the command's help, whatever else is there
			// (urfave would take a FILE after it for a subcommand name).
			return []string{args[0], args[1], "--help"}, nil
		}
		if len(a) > 1 && a[0] == '-' {
			flags = append(flags, a)
			name := strings.TrimLeft(a, "-")
			if !strings.Contains(name, "=") && takesValue[name] {
				if i+1 == len(rest) {
					// Left as the last word, the flag would take the "--"
					// added below as its value.
					return nil, fmt.Errorf("flag %s needs a value", a)
				}
				i++
				flags = append(flags, rest[i])
			}
			continue
		}
		pos = append(pos, a)
	}
	out := append([]string{args[0], args[1]}, flags...)
	if len(pos) > 0 {
		out = append(out, "--")
		out = append(out, pos...)
	}
	return out, nil
}

// suggest names the command closest to a mistyped one, as
// ` (did you mean "NAME"?)`, or nothing when none is close. Closeness is
// the Jaro-Winkler similarity urfave/cli itself uses for its suggestions.
func suggest(name string, cmds []*cli.Command) string {
	best, score := "", 0.8 // below this, a suggestion is more noise than help
	for _, c := range cmds {
		if s := smetrics.JaroWinkler(name, c.Name, 0.7, 4); s > score {
			best, score = c.Name, s
		}
	}
	if best == "" {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}

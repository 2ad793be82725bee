package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"
	"time"
)

// mainEnv, when set in the environment, makes the test binary run as the
// forkcast command itself: tests that need separate processes (several
// writers at once, a crash in the process) start os.Args[0] with it.
const mainEnv = "FORKCAST_TEST_RUN_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(mainEnv) == "1" {
		os.Exit(mainStatus(append([]string{"forkcast"}, os.Args[1:]...)))
	}
	os.Exit(m.Run())
}

// command is forkcast as a separate process: the test binary re-run as
// the command, with args.
func command(args ...string) *exec.Cmd {
	cmd := exec.Command(os.Args[0], args...)
	cmd.Env = append(os.Environ(), mainEnv+"=1")
	return cmd
}

// A panic anywhere under run is a bug: guard turns it into one line on
// standard error and exit status 3, in a separate process as in tests.
func TestGuard(t *testing.T) {
	var errb strings.Builder
	code := guard(&errb, func() int { panic("index out of range [3] with length 3\x1b[2J") })
	if code != exitInternal || !strings.Contains(errb.String(), "internal error: ") || !strings.Contains(errb.String(), "This is a bug in forkcast") {
		t.Errorf("exit %d, stderr %q", code, errb.String())
	}
	if strings.Contains(errb.String(), "\x1b") {
		t.Errorf("the panic value reached standard error unescaped: %q", errb.String())
	}
	if code := guard(&errb, func() int { return exitUsage }); code != exitUsage {
		t.Errorf("guard changed exit %d to %d", exitUsage, code)
	}
}

// The exit statuses are documented alike in --help and the README.
func TestExitStatusDocumented(t *testing.T) {
	_, help, _ := forkcast(t, "", "--help")
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	flat := strings.Join(strings.Fields(help), " ")
	if !strings.Contains(flat, strings.Join(strings.Fields(exitStatusHelp), " ")) {
		t.Errorf("--help lacks the exit statuses:\n%s", help)
	}
	for code := exitOK; code <= exitInternal; code++ {
		if !strings.Contains(string(readme), "| "+strconv.Itoa(code)+" | ") {
			t.Errorf("the README's table of exit statuses lacks %d", code)
		}
	}
}

// --help after the FILE shows the command's help (the FILE is not taken
// for a subcommand's name).
func TestHelpAfterFile(t *testing.T) {
	code, out, errs := forkcast(t, "", "solve", "example:sourcing", "--help")
	if code != 0 || !strings.Contains(out, "forkcast solve - ") || errs != "" {
		t.Errorf("exit %d, stdout:\n%s\nstderr: %s", code, out, errs)
	}
}

// Ctrl-C stops a long analysis cleanly: a message, nothing on standard
// output, exit status 130 (128 + SIGINT, as shells report it), well before
// the analysis would have ended.
func TestInterrupt(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a separate process for a second or more")
	}
	// 2^18 joint states of 18 named uncertainties for the total EVPI:
	// about a minute of work on these machines.
	var b strings.Builder
	const k = 18
	for i := 0; i < k; i++ {
		fmt.Fprintf(&b, "uncertainty u%d\n  \"a\"  %d%%\n  \"b\"  rest\n", i, 30+i)
	}
	b.WriteString("decision \"d\"\n")
	for i := 0; i < k; i++ {
		fmt.Fprintf(&b, "  \"o%d\"\n    chance u%d\n      \"a\"  gain %d\n      \"b\"  cost %d\n", i, i, 100+i, 50+i)
	}
	p := writeFile(t, "slow.fork", b.String())
	// A Ctrl-C that comes before the process has set up its handler ends
	// it as the signal does by default: start-up on a busy machine can take
	// a while, so wait longer and try again.
	for _, wait := range []time.Duration{time.Second, 3 * time.Second, 8 * time.Second} {
		cmd := command("voi", "--max-scenarios", "1000000", p)
		var out, errb bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errb
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(wait)
		start := time.Now()
		if err := cmd.Process.Signal(os.Interrupt); err != nil {
			t.Fatal(err)
		}
		err := cmd.Wait()
		var ee *exec.ExitError
		if errors.As(err, &ee) && ee.ExitCode() == -1 {
			continue // killed by the signal itself: too early
		}
		if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
			t.Fatalf("exit %v, want status %d; stderr:\n%s", err, exitInterrupted, errb.String())
		}
		if took := time.Since(start); took > 10*time.Second {
			t.Errorf("took %v to stop after Ctrl-C", took)
		}
		if !strings.Contains(errb.String(), "forkcast: interrupted; nothing was written") || out.Len() != 0 {
			t.Errorf("stdout %q, stderr %q", out.String(), errb.String())
		}
		return
	}
	t.Fatal("the process never got as far as handling Ctrl-C")
}

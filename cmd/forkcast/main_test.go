package main

import (
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"
)

// mainEnv, when set in the environment, makes the test binary run as the
// forkcast command itself: tests that need separate processes (several
// writers at once, a crash in the process) start os.Args[0] with it.
const mainEnv = "FORKCAST_TEST_RUN_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(mainEnv) == "1" {
		os.Exit(run(append([]string{"forkcast"}, os.Args[1:]...), os.Stdin, os.Stdout, os.Stderr))
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

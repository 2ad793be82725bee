package main

import (
	"os"
	"os/exec"
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

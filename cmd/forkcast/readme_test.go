package main

import (
	"os"
	"strings"
	"testing"
)

// The outputs shown in the README are the real ones: for every block that
// starts with "$ forkcast ...", each line shown (a "..." line stands for
// lines left out) appears in the command's output, in order.
func TestREADMEOutputs(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	blocks := 0
	for _, block := range strings.Split(string(readme), "```") {
		lines := strings.Split(strings.Trim(block, "\n"), "\n")
		if len(lines) < 2 || !strings.HasPrefix(lines[0], "$ forkcast ") {
			continue
		}
		blocks++
		args := strings.Fields(strings.TrimPrefix(lines[0], "$ forkcast "))
		for i, a := range args {
			if strings.HasPrefix(a, "examples/") {
				args[i] = "../../" + a
			}
		}
		code, out, errs := forkcast(t, "", args...)
		if code != 0 {
			t.Errorf("%s: exit %d: %s", lines[0], code, errs)
			continue
		}
		rest := out
		for _, want := range lines[1:] {
			if strings.TrimSpace(want) == "..." {
				continue
			}
			i := strings.Index(rest, want+"\n")
			if i < 0 {
				t.Errorf("%s: the README shows %q, which the output lacks (or has out of order):\n%s", lines[0], want, out)
				break
			}
			rest = rest[i+len(want):]
		}
	}
	if blocks < 3 {
		t.Errorf("only %d command blocks found in the README", blocks)
	}
}

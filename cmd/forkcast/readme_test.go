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

// The model shown in the README's language tour reads without errors or
// warnings.
func TestREADMEModel(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for i, block := range strings.Split(string(readme), "```") {
		// Odd pieces are inside fences; a model's fence has no language.
		if i%2 == 0 || !strings.HasPrefix(block, "\n") || !strings.Contains(block, "\ndecision ") || strings.Contains(block, "$ forkcast") {
			continue
		}
		found = true
		p := writeFile(t, "readme.fork", strings.TrimLeft(block, "\n"))
		code, out, errs := forkcast(t, "", "check", p)
		if code != 0 || errs != "" || !strings.Contains(out, "0 warnings") {
			t.Errorf("the README's model: exit %d\n%s%s", code, out, errs)
		}
	}
	if !found {
		t.Error("no model found in the README")
	}
}

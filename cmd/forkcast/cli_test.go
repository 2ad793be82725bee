package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// forkcast runs the CLI in-process.
func forkcast(t *testing.T, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(append([]string{"forkcast"}, args...), strings.NewReader(stdin), &out, &errb)
	return code, out.String(), errb.String()
}

func writeFile(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestSolveExample(t *testing.T) {
	code, out, errs := forkcast(t, "", "solve", "../../examples/sourcing.fork")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// 0.85 × 1,340,000 + 0.15 × 1,100,000 − 340,000 (worked by hand from
	// the example's own figures).
	for _, want := range []string{
		"Ticket-scanner software: build, buy or lease",
		"expected value:  964,000.00 EUR",
		`take "Lease the service": better by 9,000.00 EUR than "Buy a licence"`,
		`* "Lease the service"  cost 340,000.00`,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestFlagsAfterFileAndStdin(t *testing.T) {
	_, before, _ := forkcast(t, "", "solve", "--json", "example:sourcing")
	_, after, _ := forkcast(t, "", "solve", "example:sourcing", "--json")
	if before == "" || before != after {
		t.Fatalf("--json before and after the file differ:\n%s\n---\n%s", before, after)
	}
	src, _ := os.ReadFile("../../examples/sourcing.fork")
	_, piped, _ := forkcast(t, string(src), "solve", "-", "--json")
	if piped != before {
		t.Fatalf("standard input gives other output")
	}
	// And the JSON from standard input is read as JSON.
	_, again, errs := forkcast(t, before, "solve", "--json", "-")
	var a, b map[string]any
	if err := json.Unmarshal([]byte(before), &a); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal([]byte(again), &b); err != nil {
		t.Fatalf("%v: %s", err, errs)
	}
	if a["value"] != b["value"] {
		t.Fatalf("value %v after a JSON round trip, want %v", b["value"], a["value"])
	}
}

func TestSolveJSONShape(t *testing.T) {
	code, out, errs := forkcast(t, "", "solve", "--json", "../../examples/expansion.fork")
	if code != 0 {
		t.Fatal(errs)
	}
	dec := json.NewDecoder(strings.NewReader(out))
	dec.UseNumber()
	var top map[string]any
	if err := dec.Decode(&top); err != nil {
		t.Fatal(err)
	}
	if top["objective"] != "max" || top["value"] != "226500" {
		t.Fatalf("objective %v value %v; want max and \"226500\"", top["objective"], top["value"])
	}
	var walk func(n map[string]any)
	count := 0
	walk = func(n map[string]any) {
		count++
		if _, ok := n["value"].(string); !ok {
			t.Errorf("node %v has no string value", n["label"])
		}
		if n["type"] == "decision" {
			if best, ok := n["best"].([]any); !ok || len(best) == 0 {
				t.Errorf("decision %v has no best", n["label"])
			}
		}
		bs, _ := n["branches"].([]any)
		for _, b := range bs {
			walk(b.(map[string]any)["node"].(map[string]any))
		}
	}
	walk(top["root"].(map[string]any))
	if count != 16 {
		t.Errorf("%d nodes in the JSON, want 16", count)
	}
	if !strings.Contains(out, `"best": ["Pilot kiosk first"]`) {
		t.Errorf("root best not as expected:\n%s", out)
	}
}

func TestExitCodes(t *testing.T) {
	bad := writeFile(t, "bad.fork", "decision \"d\"\n  \"a\"  cost nope\n")
	warn := writeFile(t, "warn.fork", "let unused = 1\ndecision \"d\"\n  \"a\"  gain 5\n")
	cases := []struct {
		name   string
		args   []string
		code   int
		stderr string
	}{
		{"model error", []string{"solve", bad}, 1, "bad.fork:2:13: unknown name \"nope\""},
		{"check error", []string{"check", bad}, 1, "bad.fork: 1 error\n"},
		{"check warning", []string{"check", warn}, 0, "warn.fork:1:5: warning: \"unused\" is defined but never used"},
		{"no file", []string{"solve"}, 2, "solve needs a model FILE"},
		{"two files", []string{"solve", bad, warn}, 2, "solve takes one FILE"},
		// A missing file, a directory and an unknown example are inputs
		// that cannot be used: 1, as documented in the README and --help.
		{"missing file", []string{"solve", "no/such.fork"}, 1, "no such file: no/such.fork"},
		{"directory", []string{"solve", t.TempDir()}, 1, "is a directory; give a model file"},
		{"unknown flag", []string{"solve", "--colour", bad}, 2, "flag provided but not defined: -colour"},
		{"unknown example", []string{"solve", "example:nothing"}, 1, "no example \"nothing\""},
		{"help for no such command", []string{"help", "nosuch"}, 2, `unknown command "nosuch"`},
		{"negative max-nodes", []string{"solve", "--max-nodes", "-5", "example:sourcing"}, 2, "--max-nodes -5: give a number of at least 1"},
		{"zero max-nodes", []string{"check", "example:sourcing", "--max-nodes=0"}, 2, "--max-nodes 0: give a number of at least 1"},
		{"negative max-scenarios", []string{"voi", "--max-scenarios", "-1", "example:release"}, 2, "--max-scenarios -1: give a number of at least 1"},
		{"warnings below -1", []string{"check", "--warnings", "-2", "example:release"}, 2, "--warnings -2: give a number of at least 0, or -1 for all"},
		{"negative depth", []string{"draw", "--depth", "-1", "example:release"}, 2, "--depth -1: give a number of at least 0"},
		{"unknown command", []string{"sovle"}, 2, "unknown command \"sovle\" (did you mean \"solve\"?)"},
		{"flag without its value", []string{"solve", bad, "--max-nodes"}, 2, "flag --max-nodes needs a value"},
		// A flag value of the wrong kind is named as the user wrote it
		// (--seed, not -seed), with what the flag takes.
		{"negative seed", []string{"simulate", "example:project-cost", "--seed", "-1"}, 2, "--seed -1: give a whole number from 0 to 18446744073709551615"},
		{"seed too large", []string{"simulate", "example:project-cost", "--seed", "18446744073709551616"}, 2, "--seed 18446744073709551616: give a whole number from 0 to 18446744073709551615"},
		{"fractional runs", []string{"simulate", "example:project-cost", "--runs", "12.5"}, 2, "--runs 12.5: give a whole number"},
		{"count out of range", []string{"solve", "example:sourcing", "--max-nodes", "99999999999999999999"}, 2, "--max-nodes 99999999999999999999: too large; give a whole number of at most 9223372036854775807"},
		{"boolean", []string{"profile", "example:sourcing", "--json=maybe"}, 2, "--json=maybe: give true or false, or leave the value out"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := forkcast(t, "", c.args...)
			if code != c.code || !strings.Contains(errs, c.stderr) {
				t.Fatalf("exit %d, stderr:\n%s\nwant exit %d and %q", code, errs, c.code, c.stderr)
			}
		})
	}
}

func TestHelpTeaches(t *testing.T) {
	// Every command's help shows at least one worked example (an indented
	// command line under USAGE) and explains itself under DESCRIPTION.
	for _, cmd := range commands() {
		code, out, _ := forkcast(t, "", cmd.Name, "--help")
		if code != 0 || !strings.Contains(out, "\n      forkcast "+cmd.Name+" ") || !strings.Contains(out, "DESCRIPTION:") {
			t.Errorf("%s --help: exit %d, no example or description in:\n%s", cmd.Name, code, out)
		}
	}
}

func TestExamplesCommand(t *testing.T) {
	_, list, _ := forkcast(t, "", "examples")
	for _, name := range []string{"sourcing", "release", "expansion"} {
		if !strings.Contains(list, name) {
			t.Errorf("list lacks %s:\n%s", name, list)
		}
	}
	_, src, _ := forkcast(t, "", "examples", "sourcing")
	want, _ := os.ReadFile("../../examples/sourcing.fork")
	if src != string(want) {
		t.Error("examples sourcing does not print the bundled file")
	}
}

func TestDeterministicOutput(t *testing.T) {
	for _, args := range [][]string{{"solve", "example:expansion"}, {"solve", "--json", "example:release"}} {
		_, a, _ := forkcast(t, "", args...)
		_, b, _ := forkcast(t, "", args...)
		if a != b {
			t.Errorf("%v: two runs differ", args)
		}
	}
}

func TestWarningsAreCapped(t *testing.T) {
	var b strings.Builder
	for i := 0; i < 7; i++ {
		b.WriteString("let unused" + string(rune('a'+i)) + " = 1\n")
	}
	b.WriteString("decision \"d\"\n  \"a\"  gain 5\n")
	p := writeFile(t, "many.fork", b.String())
	_, _, errs := forkcast(t, "", "solve", p)
	if n := strings.Count(errs, "warning:"); n != solveWarningLimit || !strings.Contains(errs, "2 more warnings not shown; run `forkcast check`") {
		t.Errorf("solve showed %d warnings:\n%s", n, errs)
	}
	_, _, errs = forkcast(t, "", "check", "--warnings", "-1", p)
	if n := strings.Count(errs, "warning:"); n != 7 {
		t.Errorf("check --warnings -1 showed %d of 7 warnings:\n%s", n, errs)
	}
}

// A deep chain prints in space linear in its depth: indentation is capped
// in the text tree and in the JSON, and the policy list names at most a few
// conditions per decision. (Probabilities 0 and 1 keep the exact values
// short: with 0.5 at every level they would rightly carry thousands of
// digits.)
func TestDeepChainOutputIsLinear(t *testing.T) {
	chain := func(depth int) string {
		var b strings.Builder
		b.WriteString(`{"root":`)
		for i := 0; i < depth; i++ {
			b.WriteString(`{"type":"decision","label":"d","branches":[{"label":"stop"},{"label":"go","cash":1,"node":{"type":"chance","label":"c","branches":[{"label":"x","probability":0},{"label":"y","probability":1,"node":`)
		}
		b.WriteString(`{"type":"end"}` + strings.Repeat("}]}}]}", depth) + "}")
		return writeFile(t, "deep.json", b.String())
	}
	short, long := chain(5_000), chain(20_000)
	for _, flags := range [][]string{nil, {"--json"}} {
		size := func(p string) int {
			code, out, errs := forkcast(t, "", append(append([]string{"solve"}, flags...), p)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs[:min(len(errs), 500)])
			}
			return len(out)
		}
		// Four times the depth: about four times the output if it is
		// linear, sixteen if it is quadratic.
		if r := float64(size(long)) / float64(size(short)); r > 5 {
			t.Errorf("solve %v: output grows %.1f× for 4× the depth", flags, r)
		}
	}
}

// Solved JSON of a model with a test carries the Bayes-revised
// probabilities under the readings, and reads back to the same values.
func TestSolvedJSONWithPosteriorsReadsBack(t *testing.T) {
	_, first, _ := forkcast(t, "", "solve", "--json", "example:release")
	if !strings.Contains(first, `"uncertainty": "defect"`) || !strings.Contains(first, `"probability": 0.7377`) {
		t.Fatalf("no revised probabilities under the readings:\n%s", first)
	}
	code, second, errs := forkcast(t, first, "solve", "--json", "-")
	if code != 0 || second != first {
		t.Fatalf("exit %d, %s; the solved JSON does not read back to itself", code, errs)
	}
	wrong := strings.Replace(first, `"probability": 0.7377`, `"probability": 0.5`, 1)
	code, _, errs = forkcast(t, wrong, "solve", "-")
	if code != 1 || !strings.Contains(errs, "of its own, but the declaration gives 0.7377") {
		t.Fatalf("exit %d; a changed probability under a named node must be refused:\n%s", code, errs)
	}
}

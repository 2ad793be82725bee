package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// The simulation's text and JSON for a seed, checked against golden
// files; the figures themselves are checked against exact results in
// package eval (TestSimulateMeanMatchesExact, TestSimulateRiskSum).
func TestSimulateGolden(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
	}{
		{"simulate_project.txt", []string{"simulate", "example:project-cost", "--runs", "2000"}},
		{"simulate_project_inputs.json", []string{"simulate", "example:project-cost", "--runs", "500", "--seed", "9", "--inputs-only", "--json"}},
		{"simulate_release.txt", []string{"simulate", "example:release", "--runs", "1000", "--at", "Alarm/Release"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := forkcast(t, "", c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			golden(t, c.name, out)
		})
	}
}

// The same seed gives byte-identical JSON with 1, 2 and 4 workers, in
// both modes; another seed gives other figures.
func TestSimulateWorkersIdenticalJSON(t *testing.T) {
	for _, mode := range [][]string{nil, {"--inputs-only"}} {
		var first string
		for _, w := range []string{"1", "2", "4"} {
			args := append([]string{"simulate", "example:project-cost", "--runs", "3000", "--seed", "11", "--json", "--workers", w}, mode...)
			code, out, errs := forkcast(t, "", args...)
			if code != 0 {
				t.Fatalf("%v: exit %d: %s", args, code, errs)
			}
			if first == "" {
				first = out
			} else if out != first {
				t.Errorf("%v: JSON differs from 1 worker's", args)
			}
		}
		_, other, _ := forkcast(t, "", append([]string{"simulate", "example:project-cost", "--runs", "3000", "--seed", "12", "--json"}, mode...)...)
		if other == first {
			t.Errorf("%v: seeds 11 and 12 gave the same JSON", mode)
		}
	}
}

// --save-draws writes one CSV row a run: the draws and the payoffs; the
// payoffs' mean is the reported mean, and the charts are written.
func TestSimulateFiles(t *testing.T) {
	dir := t.TempDir()
	draws, hist, cum := filepath.Join(dir, "d.csv"), filepath.Join(dir, "h.svg"), filepath.Join(dir, "c.png")
	code, out, errs := forkcast(t, "", "simulate", "example:project-cost", "--runs", "300", "--json",
		"--save-draws", draws, "--chart", hist, "--cumulative", cum)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, f := range []string{draws, hist, cum} {
		if !strings.Contains(errs, "wrote "+f) {
			t.Errorf("no word of %s: %s", f, errs)
		}
	}
	var res struct {
		Inputs  []struct{ Name string }
		Options []struct {
			Label string
			Mean  float64
		}
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	rows := readCSVFile(t, draws)
	if len(rows) != 301 || len(rows[0]) != 1+len(res.Inputs)+len(res.Options)+1 {
		t.Fatalf("%d rows of %d columns", len(rows), len(rows[0]))
	}
	if rows[0][1] != res.Inputs[0].Name || rows[0][1+len(res.Inputs)] != "cost: "+res.Options[0].Label {
		t.Errorf("header %v", rows[0])
	}
	for j, o := range res.Options {
		sum := 0.0
		for _, r := range rows[1:] {
			sum += mustFloat(t, r[1+len(res.Inputs)+j])
		}
		if mean := sum / 300; mean < o.Mean*(1-1e-12) || mean > o.Mean*(1+1e-12) {
			t.Errorf("%s: CSV mean %v, reported %v", o.Label, mean, o.Mean)
		}
	}
	svg, _ := os.ReadFile(hist)
	png, _ := os.ReadFile(cum)
	if !bytes.Contains(svg, []byte("<svg")) || !bytes.HasPrefix(png, []byte("\x89PNG")) {
		t.Errorf("charts: %d bytes of SVG, %d of PNG", len(svg), len(png))
	}
}

// --set works in simulate as in every command that reads a model: the
// contract's fixed price moved to 600,000 is its figure at the means.
func TestSimulateSet(t *testing.T) {
	code, out, errs := forkcast(t, "", "simulate", "example:project-cost", "--runs", "200", "--set", "contract=600_000", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Options []struct {
			Label   string `json:"label"`
			AtMeans string `json:"at_means"`
		} `json:"options"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	// 600,000 + 35% of the minor scope change's PERT mean (10,000 + 4 ·
	// 20,000 + 45,000)/6 = 22,500 and 10% of the major one's (60,000 + 4 ·
	// 90,000 + 160,000)/6 = 96,666.67: the PERT mean (Malcolm et al. 1959).
	if len(r.Options) != 2 || !strings.HasPrefix(r.Options[1].AtMeans, "617541.66666") {
		t.Errorf("options %+v, want the contract at 617,541.67", r.Options)
	}
	// An input written as a distribution is drawn: fixing it with --set
	// would leave its draws in the report and the CSV, unused.
	code, _, errs = forkcast(t, "", "simulate", "example:project-cost", "--set", "building=400_000")
	if code != exitUsage || !strings.Contains(errs, "--set building=400_000: building is written as a distribution") {
		t.Errorf("--set of a drawn input: exit %d, %s", code, errs)
	}
	code, _, errs = forkcast(t, "", "simulate", "example:project-cost", "--set", "contrct=600_000")
	if code != exitUsage || !strings.Contains(errs, `did you mean "contract"?`) {
		t.Errorf("an unknown --set name: exit %d, %s", code, errs)
	}
}

func TestSimulateUsage(t *testing.T) {
	dir := t.TempDir()
	badP := writeFile(t, "badp.fork", "let p = normal(50%, 40%)\ndecision \"D\"\n  \"a\"\n    chance \"M\"\n      \"u\"  p  gain 1\n      \"d\"  rest\n  \"b\"\n")
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"simulate", "example:project-cost", "--runs", "0"}, exitUsage, "--runs 0"},
		// One run has no spread: its SD and standard error would show as 0.
		{[]string{"simulate", "example:project-cost", "--runs", "1"}, exitUsage, "--runs 1: give a number of at least 2"},
		{[]string{"simulate", "example:project-cost", "--runs", "20000000"}, exitUsage, "at most 10000000"},
		{[]string{"simulate", "example:project-cost", "--seed", "-1"}, exitUsage, "seed"},
		{[]string{"simulate", "example:project-cost", "--workers", "-2"}, exitUsage, "--workers -2"},
		{[]string{"simulate", "example:project-cost", "--at", "Nowhere"}, exitUsage, "no decision labelled"},
		{[]string{"simulate", "example:project-cost", "--chart", "x.pdf"}, exitUsage, ".svg or .png"},
		{[]string{"simulate", "example:project-cost", "--save-draws", "-"}, exitUsage, "needs a file name"},
		// Two charts into one file: the second would replace the first.
		{[]string{"simulate", "example:project-cost", "--chart", filepath.Join(dir, "s.svg"), "--cumulative", dir + "/./s.svg"}, exitUsage, "--chart and --cumulative name the same file"},
		// normal(50%, 40%) as a probability is warned about when read, and
		// the first draw outside [0, 1] stops the runs, naming the node
		// and where it is written.
		{[]string{"simulate", badP, "--runs", "1000"}, exitModel, `a probability under "M" at 4:5 is drawn as`},
		{[]string{"simulate", badP, "--runs", "1000"}, exitModel, `normal(50%, 40%) is unbounded: 21.1% of its draws fall outside 0 .. 1`},
	} {
		code, out, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(out+errs, c.want) {
			t.Errorf("%v: exit %d, want %d with %q:\n%s%s", c.args, code, c.code, c.want, out, errs)
		}
	}
}

func mustFloat(t *testing.T, s string) float64 {
	t.Helper()
	f, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// Every exact analysis says that inputs written as distributions stand for
// their means: in its text, and in its JSON's "means" (solve's JSON is
// the interchange format, whose inputs show the distributions as
// written).
func TestExactAnalysesSayMeans(t *testing.T) {
	for _, args := range [][]string{
		{"solve"}, {"voi"}, {"breakeven", "--vary", "contract"}, {"sensitivity"},
		{"sweep", "--vary", "contract", "--steps", "2"}, {"profile"},
	} {
		code, out, errs := forkcast(t, "", append(args, "example:project-cost")...)
		if code != 0 || !strings.Contains(out, "the 9 distributions stand for their means here") ||
			!strings.Contains(out, "building = pert(310_000, 340_000, 450_000): mean ≈353,333.333333") {
			t.Errorf("%v: exit %d:\n%s%s", args, code, out, errs)
		}
		if args[0] == "solve" {
			continue
		}
		code, out, errs = forkcast(t, "", append(args, "--json", "example:project-cost")...)
		var res struct {
			Means []struct {
				Input, Written, Mean string
				Exact                bool
			}
		}
		if err := json.Unmarshal([]byte(out), &res); code != 0 || err != nil || len(res.Means) != 9 ||
			res.Means[0].Input != "design" || res.Means[0].Mean != "48000" || !res.Means[0].Exact || res.Means[7].Input != "" {
			t.Errorf("%v --json: exit %d, %v, means %+v\n%s", args, code, err, res.Means, errs)
		}
	}
}

// A tree with no decision simulates as one distribution, of the whole
// tree's cost: text and JSON against golden files, byte-identical for 1
// and 2 workers, and a CSV of the draws with no "best" column. Its mean
// is checked against the exact expected value in package eval
// (TestSimulateWholeTree).
func TestSimulateWholeTreeCLI(t *testing.T) {
	file := filepath.Join("testdata", "refit.fork")
	for _, c := range []struct {
		name string
		args []string
	}{
		{"simulate_refit.txt", []string{"simulate", file, "--runs", "2000"}},
		{"simulate_refit_inputs.json", []string{"simulate", file, "--runs", "500", "--seed", "5", "--inputs-only", "--json"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var first string
			for _, w := range []string{"1", "2"} {
				code, out, errs := forkcast(t, "", append(c.args, "--workers", w)...)
				if code != 0 {
					t.Fatalf("exit %d: %s", code, errs)
				}
				if first == "" {
					first = out
					golden(t, c.name, out)
				} else if out != first {
					t.Errorf("%s workers: output differs from 1 worker's", w)
				}
			}
		})
	}
	draws := filepath.Join(t.TempDir(), "d.csv")
	if code, _, errs := forkcast(t, "", "simulate", file, "--runs", "50", "--save-draws", draws); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	rows := readCSVFile(t, draws)
	if want := []string{"run", "strip", "fit", "p_asb", "removal", "cost: whole tree"}; len(rows) != 51 || !reflect.DeepEqual(rows[0], want) {
		t.Errorf("%d rows, header %q; want 51 rows, header %q", len(rows), rows[0], want)
	}
}

// readCSVFile reads the CSV file at path whole (the draws --save-draws
// writes), failing the test when it cannot.
func readCSVFile(t *testing.T, path string) [][]string {
	t.Helper()
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const exampleRegisterCSV = "../../examples/library-register.csv"

// The register report of the example sheet, text and JSON, for a seed;
// the figures themselves are checked against exact results in package
// register.
func TestRegisterGolden(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
	}{
		{"register_library.txt", []string{"register", exampleRegisterCSV, "--currency", "EUR", "--runs", "4000", "--budget", "150_000"}},
		{"register_library_90.json", []string{"register", exampleRegisterCSV, "--runs", "2000", "--seed", "3", "--confidence", "90%", "--json"}},
		{"register_import.fork", []string{"register", "import", exampleRegisterCSV, "--currency", "EUR"}},
		// The same register as text, and a model whose tree takes two.
		{"register_library_fork.txt", []string{"register", "example:library-register", "--runs", "4000", "--budget", "150_000"}},
		{"register_library_wet.txt", []string{"register", "example:library-register", "--runs", "2000", "--set", "p_wet_winter=60%", "--confidence", "90%"}},
		{"register_modular.json", []string{"register", "example:library", "--name", "modular", "--runs", "2000", "--json"}},
		{"solve_library.txt", []string{"solve", "example:library"}},
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

// The JSON carries the keys a program reads, EMVs as exact decimals.
func TestRegisterJSONKeys(t *testing.T) {
	code, out, errs := forkcast(t, "", "register", exampleRegisterCSV, "--runs", "500", "--budget", "100000", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Risks []struct {
			ID       string `json:"id"`
			EMV      string `json:"emv"`
			EMVAfter string `json:"emv_after"`
		} `json:"risks"`
		EMVTotal     string             `json:"emv_total"`
		Percentiles  map[string]float64 `json:"percentiles"`
		Confidence   float64            `json:"confidence"`
		Reserve      float64            `json:"reserve"`
		WithinBudget *float64           `json:"p_within_budget"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Risks) != 10 || doc.Risks[0].ID != "R01" || doc.Risks[0].EMV != "20000" || doc.Risks[0].EMVAfter != "5000" {
		t.Errorf("risks %+v", doc.Risks)
	}
	// 20000 + 7733.3… + 12500 + 8166.6… + 6166.6… − 5000 − 7500 + 5500 +
	// 6225 + 4050 = 57841.6…: no finite decimal, so rounded, with the
	// fraction beside it.
	if doc.EMVTotal != "57841.66666666666666666666666666667" || !strings.Contains(out, `"emv_total_fraction": "347050/6"`) && !strings.Contains(out, `"emv_total_fraction": "173525/3"`) {
		t.Errorf("emv_total %s", doc.EMVTotal)
	}
	for _, k := range []string{"P50", "P80", "P90", "P95"} {
		if _, ok := doc.Percentiles[k]; !ok {
			t.Errorf("no percentile %s", k)
		}
	}
	if doc.Confidence != 0.8 || doc.Reserve != doc.Percentiles["P80"] || doc.WithinBudget == nil {
		t.Errorf("confidence %v reserve %v P80 %v within %v", doc.Confidence, doc.Reserve, doc.Percentiles["P80"], doc.WithinBudget)
	}
}

// --csv writes the sheet back, every column as it was, with the figures
// added; the same seed gives the same file whatever --workers.
func TestRegisterCSVOut(t *testing.T) {
	dir := t.TempDir()
	var files []string
	for _, w := range []string{"1", "2"} {
		p := filepath.Join(dir, "out"+w+".csv")
		code, _, errs := forkcast(t, "", "register", exampleRegisterCSV, "--runs", "1000", "--workers", w, "--csv", p)
		if code != 0 || !strings.Contains(errs, "wrote "+p) {
			t.Fatalf("exit %d: %s", code, errs)
		}
		files = append(files, p)
	}
	a, _ := os.ReadFile(files[0])
	b, _ := os.ReadFile(files[1])
	if !bytes.Equal(a, b) {
		t.Error("1 and 2 workers wrote different sheets")
	}
	in, _ := os.ReadFile(exampleRegisterCSV)
	inRows, _ := csv.NewReader(bytes.NewReader(in)).ReadAll()
	outRows, err := csv.NewReader(bytes.NewReader(a)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for i, row := range inRows {
		for j, cell := range row {
			if outRows[i][j] != cell {
				t.Errorf("row %d, column %d: %q became %q", i+1, j+1, cell, outRows[i][j])
			}
		}
	}
	want := []string{"emv", "emv_after", "response_net", "take_response", "rank", "share", "contribution_p80"}
	if got := outRows[0][len(inRows[0]):]; strings.Join(got, ",") != strings.Join(want, ",") {
		t.Errorf("added columns %v, want %v", got, want)
	}
	if outRows[1][len(inRows[0])] != "20000.00" {
		t.Errorf("R01's emv %q", outRows[1][len(inRows[0])])
	}
}

// A bad sheet: every bad cell as FILE:ROW:COLUMN: message, exit 1.
func TestRegisterBadCSV(t *testing.T) {
	p := writeFile(t, "bad.csv", "id,title,type,probability,low,likely,high\nR1,Flood,threat,130%,1,2,3\nR1,Fire,threat,5%,9,2,3\n")
	for _, args := range [][]string{{"register", p}, {"register", "import", p}} {
		code, out, errs := forkcast(t, "", args...)
		want := p + ":2:4: probability 130% is above 100%\n" +
			p + ":3:1: the id \"R1\" is used twice (first on row 2); give each risk its own\n" +
			p + ":3:5: low 9 is above high 3\n" +
			"forkcast: " + p + ": 3 bad cells; nothing was analysed\n"
		if code != 1 || out != "" || errs != want {
			t.Errorf("%v: exit %d, stdout %q, stderr\n%s\nwant\n%s", args, code, out, errs, want)
		}
	}
}

func TestRegisterUsage(t *testing.T) {
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"register", exampleRegisterCSV, "--confidence", "100%"}, 2, "--confidence 100%: give a level between 0% and 100%"},
		{[]string{"register", exampleRegisterCSV, "--confidence", "eighty"}, 2, "--confidence eighty"},
		{[]string{"register", exampleRegisterCSV, "--budget", "1,000"}, 2, "--budget 1,000"},
		{[]string{"register", exampleRegisterCSV, "--set", "x=1"}, 2, "a CSV register has none"},
		{[]string{"register", exampleRegisterCSV, "--tornado", "t.txt"}, 2, "--tornado t.txt: charts are written as .svg or .png"},
		{[]string{"register"}, 2, "register needs a model FILE"},
		{[]string{"register", "import"}, 2, "import needs a model FILE"},
		{[]string{"register", "missing.csv"}, 1, "no such file: missing.csv"},
		{[]string{"register", "import", "example:library-register"}, 2, "register import reads a spreadsheet saved as CSV; example:library-register is already text"},
		{[]string{"register", "example:library"}, 2, "example:library holds 2 registers (extend, modular): say which with --name NAME"},
		{[]string{"register", "example:library", "--name", "works"}, 2, "--name works: example:library has no register of that name; its registers: extend, modular"},
		{[]string{"register", "example:sourcing"}, 1, "example:sourcing: the model has no register"},
		{[]string{"solve", "example:library-register"}, 1, "example:library-register has no tree, only register library (10 risks): analyse it with `forkcast register example:library-register`"},
		{[]string{"register", "example:library-register", "--set", "p_wet_winter=130%"}, 1, "the probability 1.3 is outside 0 .. 1"},
	} {
		code, _, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want %d and %q", c.args, code, errs, c.code, c.want)
		}
	}
}

// The round trip a spreadsheet user makes: import the sheet as text, then
// quantify the text and write the sheet back with --csv. Every column of
// the original comes back, each cell the same value (numbers as numbers:
// "40,000" may come back as 40000), and the sheet written reads back as
// the same register.
func TestRegisterRoundTrip(t *testing.T) {
	dir := t.TempDir()
	fork := filepath.Join(dir, "risks.fork")
	if code, _, errs := forkcast(t, "", "register", "import", exampleRegisterCSV, "-o", fork); code != 0 {
		t.Fatalf("import: exit %d: %s", code, errs)
	}
	back := filepath.Join(dir, "back.csv")
	if code, _, errs := forkcast(t, "", "register", fork, "--runs", "500", "--csv", back); code != 0 {
		t.Fatalf("register: exit %d: %s", code, errs)
	}
	in, _ := os.ReadFile(exampleRegisterCSV)
	out, _ := os.ReadFile(back)
	inRows, _ := csv.NewReader(bytes.NewReader(in)).ReadAll()
	outRows, err := csv.NewReader(bytes.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(outRows) != len(inRows) {
		t.Fatalf("%d rows back, %d in", len(outRows), len(inRows))
	}
	col := map[string]int{}
	for j, h := range outRows[0] {
		col[h] = j
	}
	number := func(s string) string { return strings.ReplaceAll(s, ",", "") }
	for j, h := range inRows[0] {
		k, ok := col[h]
		if !ok {
			t.Errorf("column %q is lost", h)
			continue
		}
		for i := 1; i < len(inRows); i++ {
			a, b := inRows[i][j], outRows[i][k]
			if a == b || number(a) == b {
				continue
			}
			// A residual figure left empty means "as before the
			// response": the sheet written gives it in full.
			if a == "" && strings.HasPrefix(h, "residual_") {
				continue
			}
			// An empty distribution is PERT, the default, written out.
			if a == "" && h == "distribution" && b == "pert" {
				continue
			}
			t.Errorf("row %d, column %q: %q came back as %q", i+1, h, a, b)
		}
	}
	code, again, errs := forkcast(t, "", "register", back, "--runs", "500")
	_, first, _ := forkcast(t, "", "register", exampleRegisterCSV, "--runs", "500")
	if code != 0 {
		t.Fatalf("the sheet written does not read back: %s", errs)
	}
	// The heading names the register by its file; the figures agree.
	trim := func(s string) string { return s[strings.Index(s, "\n"):] }
	if trim(again) != trim(first) {
		t.Errorf("the sheet written gives other figures:\n%s\nthe original:\n%s", again, first)
	}
}

// check says what registers a model holds, with or without a tree.
func TestCheckRegisters(t *testing.T) {
	for _, c := range []struct{ file, want string }{
		{"example:library", "example:library: ok: 6 nodes, 2 registers (extend, modular), 0 warnings\n"},
		{"example:library-register", "example:library-register: ok: no tree, register library (10 risks), 0 warnings\n"},
	} {
		code, out, errs := forkcast(t, "", "check", c.file)
		if code != 0 || out != c.want || errs != "" {
			t.Errorf("check %s: exit %d, %q %q; want %q", c.file, code, out, errs, c.want)
		}
	}
}

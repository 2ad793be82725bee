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
	} {
		code, _, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want %d and %q", c.args, code, errs, c.code, c.want)
		}
	}
}

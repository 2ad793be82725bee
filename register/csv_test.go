package register

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/shopspring/decimal"
)

const goodCSV = `id,title,type,probability,low,likely,high,owner,category,response,response_cost,residual_probability,residual_low,residual_likely,residual_high,schedule_low,schedule_likely,schedule_high,Date raised,Status
R1,Contaminated ground,threat,30%,"40,000","60,000","150,000",Site manager,Ground,Trial pits first,8000,10%,30000,50000,90000,5,10,30,2025-03-01,open
R2,Reuse of fill on site,opportunity,0.4,10000,15000,25000,Site manager,Materials,,,,,,,,,,2025-03-04,open
R3,Crane hire price rise,threat,25%,,12000,,Buyer,Commercial,,,,,,,,,,2025-03-09,"closed, merged"
`

func readCSV(t *testing.T, src string) *Table {
	t.Helper()
	tb, err := ReadCSV(strings.NewReader(src))
	if err != nil {
		t.Fatalf("ReadCSV: %v", err)
	}
	return tb
}

func TestReadCSV(t *testing.T) {
	tb := readCSV(t, goodCSV)
	reg := tb.Register
	if len(reg.Risks) != 3 {
		t.Fatalf("%d risks, want 3", len(reg.Risks))
	}
	r1 := reg.Risks[0]
	if r1.ID != "R1" || r1.Kind != Threat || r1.P.String() != "0.3" || r1.Impact.String() != "pert(40000, 60000, 150000)" ||
		r1.Owner != "Site manager" || r1.Category != "Ground" || r1.Delay == nil || r1.Delay.String() != "pert(5, 10, 30)" {
		t.Errorf("R1 read as %+v", r1)
	}
	if rs := r1.Response; rs == nil || rs.Action != "Trial pits first" || rs.Cost.String() != "8000" || rs.P.String() != "0.1" ||
		rs.Impact.String() != "pert(30000, 50000, 90000)" {
		t.Errorf("R1's response read as %+v", rs)
	}
	if r2 := reg.Risks[1]; r2.Kind != Opportunity || r2.P.String() != "0.4" || r2.Response != nil || r2.Delay != nil {
		t.Errorf("R2 read as %+v", r2)
	}
	if r3 := reg.Risks[2]; !r3.Impact.IsFixed() || r3.Impact.Fixed.String() != "12000" {
		t.Errorf("R3's impact %s, want the fixed 12000", r3.Impact)
	}
	want := []Field{{"Date raised", "2025-03-09"}, {"Status", "closed, merged"}}
	if got := reg.Risks[2].Fields; len(got) != 2 || got[0] != want[0] || got[1] != want[1] {
		t.Errorf("R3's other columns %v, want %v", got, want)
	}
}

// A sheet saved with a byte-order mark (as spreadsheet programs do for
// "CSV UTF-8") reads as the same sheet without one: the mark is not part
// of the first column's name.
func TestReadCSVByteOrderMark(t *testing.T) {
	plain := readCSV(t, goodCSV)
	marked := readCSV(t, "\ufeff"+goodCSV)
	var a, b bytes.Buffer
	if err := plain.WriteCSV(&a, nil, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if err := marked.WriteCSV(&b, nil, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if a.String() != b.String() {
		t.Errorf("with a byte-order mark:\n%s\nwithout:\n%s", b.String(), a.String())
	}
}

// Bad sheets, each with its exact messages (ROW:COLUMN: message).
func TestReadCSVErrors(t *testing.T) {
	const head = "id,title,type,probability,low,likely,high\n"
	cases := []struct {
		name, src string
		want      []string
	}{
		{"empty file", "", []string{
			"1:1: the file is empty: a register needs a header row (id, title, type, probability, low, likely, high) and a row for each risk"}},
		{"header only", head, []string{
			"2:1: the file has a header but no risks: add a row for each risk below it"}},
		{"missing column", "id,title,type,low,likely,high\nR1,Flood,threat,1,2,3\n", []string{
			`1:1: the header has no column "probability"; a register needs the columns id, title, type, probability, low, likely, high`}},
		{"semicolons", "id;title;type;probability;low;likely;high\nR1;Flood;threat;30%;1;2;3\n", []string{
			"1:1: the columns are separated by `;`, not commas: save the sheet as comma-separated CSV"}},
		{"bad percentage", head + "R1,Flood,threat,3O%,1,2,3\n", []string{
			`2:4: probability "3O%" is not a number`}},
		{"percentage above 100", head + "R1,Flood,threat,130%,1,2,3\n", []string{
			"2:4: probability 130% is above 100%"}},
		{"percent sign missing", head + "R1,Flood,threat,30,1,2,3\n", []string{
			"2:4: probability 30 is above 1; write 30% for a percentage, or a decimal such as 0.3"}},
		{"low above high", head + "R1,Flood,threat,30%,50000,40000,20000\n", []string{
			"2:5: low 50000 is above high 20000"}},
		{"likely outside", head + "R1,Flood,threat,30%,10,40,20\n", []string{
			"2:6: likely 40 lies outside low .. high (10 .. 20)"}},
		{"duplicate id", head + "R1,Flood,threat,30%,1,2,3\nR2,Fire,threat,5%,1,2,3\nR1,Storm,threat,5%,1,2,3\n", []string{
			`4:1: the id "R1" is used twice (first on row 2); give each risk its own`}},
		{"wrong column count", head + "R1,Flood,threat,30%,1,2,3\nR2,Fire,threat,5%,1,2\n", []string{
			"3:7: this row has 6 cells and the header 7; every row needs one cell for each column (quote a cell that holds a comma)"}},
		{"unquoted comma", head + "R1,Flood, storm,threat,30%,1,2,3\n", []string{
			"2:8: this row has 8 cells and the header 7; every row needs one cell for each column (quote a cell that holds a comma)"}},
		{"unknown type", head + "R1,Flood,risk,30%,1,2,3\n", []string{
			`2:3: the type "risk" is neither threat nor opportunity`}},
		{"decimal comma", head + "R1,Flood,threat,\"0,3\",1,2,3\n", []string{
			`2:4: probability "0,3" uses a comma as the decimal point; write 0.3`}},
		{"currency sign", head + "R1,Flood,threat,30%,€1000,2000,3000\n", []string{
			`2:5: low "€1000" has a currency sign; write the number alone (the currency is set once for the register)`}},
		{"empty impact", head + "R1,Flood,threat,30%,,,\n", []string{
			"2:5: the impact is empty: give low, likely and high, or likely alone for a fixed figure"}},
		{"stray quote", head + "R1,Fl\"ood,threat,30%,1,2,3\n", []string{
			"2:2: the file is not valid CSV here: bare \" in non-quoted-field (a cell that holds a quote must be in quotes, with the quote doubled: \"6\"\" pipe\")"}},
		{"every bad cell", head + "R1,,threat,1.5,a,2,3\n,Fire,thread,5%,1,2,3\n", []string{
			"2:2: the title is empty; say in a few words what the risk is",
			"2:4: probability 1.5 is above 1; write 1.5% for a percentage, or a decimal such as 0.3",
			`2:5: low "a" is not a number`,
			"3:1: the id is empty; give each risk an id (R1, R2, …)",
			`3:3: the type "thread" is neither threat nor opportunity`}},
	}
	for _, c := range cases {
		_, err := ReadCSV(strings.NewReader(c.src))
		var ce *CSVError
		if !errors.As(err, &ce) {
			t.Errorf("%s: error %v, want a *CSVError", c.name, err)
			continue
		}
		got := ce.Lines("")
		if strings.Join(got, "\n") != strings.Join(c.want, "\n") {
			t.Errorf("%s:\n got %q\nwant %q", c.name, got, c.want)
		}
	}
}

// The round trip a project manager makes: the sheet read, written as
// the text language, and written back with the figures added keeps every
// column of the sheet, with the same values.
func TestCSVRoundTripKeepsColumns(t *testing.T) {
	tb := readCSV(t, goodCSV)
	a, err := Analyse(context.Background(), tb.Register, Options{Runs: 2000, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	if err := WriteCSV(&out, tb.Register, a, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	back := readCSV(t, out.String())
	in := readCSV(t, goodCSV)
	col := func(tb *Table) map[string]int {
		m := map[string]int{}
		for i, h := range tb.Header {
			m[normalColumn(h)] = i
		}
		return m
	}
	inCol, backCol := col(in), col(back)
	for name, i := range inCol {
		j, ok := backCol[name]
		if !ok {
			t.Errorf("column %q lost", name)
			continue
		}
		for r := range in.Rows {
			x, y := strings.TrimSpace(in.Rows[r][i]), strings.TrimSpace(back.Rows[r][j])
			if !sameCell(name, x, y) {
				t.Errorf("row %d, column %q: %q became %q", r+1, name, x, y)
			}
		}
	}
	for _, name := range []string{"emv", "emv_after", "rank", "share", "contribution_p80"} {
		if !strings.Contains(strings.SplitN(out.String(), "\n", 2)[0], name) {
			t.Errorf("no column %q in %q", name, strings.SplitN(out.String(), "\n", 2)[0])
		}
	}
	// Written again from the sheet itself, the columns stay in their
	// order and the old figures are replaced, not repeated.
	var again bytes.Buffer
	if err := back.WriteCSV(&again, a, CSVOptions{}); err != nil {
		t.Fatal(err)
	}
	if strings.Count(strings.SplitN(again.String(), "\n", 2)[0], "emv_after") != 1 {
		t.Errorf("the result columns repeated: %s", strings.SplitN(again.String(), "\n", 2)[0])
	}
}

// sameCell compares a cell as written with the same cell written back:
// numbers by value (40,000 is 40000; 30% is 0.3 is 30%).
func sameCell(name, x, y string) bool {
	if x == y {
		return true
	}
	pct := strings.Contains(name, "probability")
	a, _, e1 := parseNumber(x, pct)
	b, _, e2 := parseNumber(y, pct)
	return e1 == "" && e2 == "" && a.Equal(b)
}

func TestParseNumber(t *testing.T) {
	cases := []struct {
		in      string
		percent bool
		want    string
		msg     string
	}{
		{"120,000", false, "120000", ""},
		{"1_250_000.50", false, "1250000.5", ""},
		{" 30% ", true, "0.3", ""},
		{"12.5%", true, "0.125", ""},
		{"-40", false, "-40", ""},
		{"1,00", false, "", `"1,00" uses a comma as the decimal point; write 1.00`},
		{"1e6", false, "", `"1e6" is written with an exponent; write the number out in full`},
		{"12,34,567", false, "", `"12,34,567" is not a number`},
		{"30%", false, "", `"30%" is a percentage; write an amount of money`},
		{"3.", false, "", `"3." is not a number`},
	}
	for _, c := range cases {
		v, _, msg := parseNumber(c.in, c.percent)
		if msg != c.msg || (msg == "" && v.String() != c.want) {
			t.Errorf("parseNumber(%q) = %s, %q; want %s, %q", c.in, v, msg, c.want, c.msg)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	f.Add(goodCSV)
	f.Add("\ufeff" + goodCSV)
	f.Add("id,title,type,probability,low,likely,high\nR1,a,threat,5%,1,2,3\n")
	f.Add("id;title;type;probability;low;likely;high\n")
	f.Add("id,title,type,probability,low,likely,high,distribution\nR1,a,opportunity,0.5,1,,3,uniform\n")
	f.Add("id,title,type,probability,low,likely,high\n\"R1\nx\",a,threat,5%,1,2,3\n")
	f.Fuzz(func(t *testing.T, src string) {
		tb, err := ReadCSV(strings.NewReader(src))
		if err != nil {
			var ce *CSVError
			if !errors.As(err, &ce) || len(ce.Cells) == 0 {
				t.Fatalf("error %v is not a list of bad cells", err)
			}
			for _, c := range ce.Cells {
				if c.Row < 1 || c.Column < 1 || c.Msg == "" {
					t.Fatalf("bad cell %+v", c)
				}
			}
			return
		}
		if ps := tb.Register.Check(); len(ps) > 0 {
			t.Fatalf("a sheet read without errors has problems: %v", ps)
		}
		// What is read writes back and reads again as the same register.
		var out bytes.Buffer
		if err := WriteCSV(&out, tb.Register, nil, CSVOptions{}); err != nil {
			t.Fatal(err)
		}
		back, err := ReadCSV(&out)
		if err != nil {
			t.Fatalf("written back, the sheet does not read: %v\n%s", err, out.String())
		}
		if len(back.Register.Risks) != len(tb.Register.Risks) {
			t.Fatalf("%d risks became %d", len(tb.Register.Risks), len(back.Register.Risks))
		}
		for i := range tb.Register.Risks {
			a, b := tb.Register.Risks[i], back.Register.Risks[i]
			if a.ID != b.ID || a.Title != b.Title || !a.P.Equal(b.P) || a.Impact.String() != b.Impact.String() {
				t.Fatalf("risk %d: %+v became %+v", i, a, b)
			}
		}
	})
}

// WriteFork says what it had to change to write a sheet as text: a line
// break in a label, bytes that are not UTF-8.
func TestWriteForkWarnings(t *testing.T) {
	reg := &Register{Name: "r", Risks: []Risk{
		{ID: "A", Title: "two\nlines", P: decimal.RequireFromString("0.1"), Impact: FixedAmount(decimal.NewFromInt(5))},
		{ID: "B", Title: "caf\xe9", P: decimal.RequireFromString("0.1"), Impact: FixedAmount(decimal.NewFromInt(5))},
	}}
	var b strings.Builder
	warns, err := WriteFork(&b, reg, ForkOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(warns) != 2 || warns[0].Risk != 0 || !strings.Contains(warns[0].Msg, "line break") ||
		warns[1].Risk != 1 || !strings.Contains(warns[1].Msg, "not UTF-8") {
		t.Errorf("warnings %+v", warns)
	}
	if !strings.Contains(b.String(), `"two lines"`) || !strings.Contains(b.String(), "\"caf\uFFFD\"") {
		t.Errorf("text:\n%s", b.String())
	}
}

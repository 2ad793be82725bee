package lang

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/register"
	"github.com/forkcast/forkcast/tree"
)

// registerSrc is a register with every kind of line, beside a tree that
// takes its total and one risk as inputs. Invented demo data.
const registerSrc = `currency EUR
let base = 400_000
let rain = 35%

decision "Route"
  "Build"  cost base + works_risks
  "Build, mats first"  cost base + works_after
  "Buy"    cost 470_000 + ground

let works_risks = register works total
let works_after = register works total with responses
let ground = register works risk "G-1"

register works "Site works"
  threat "G-1" "Ground worse than surveyed"
    probability 30%
    impact pert(40_000, 60_000, 150_000)
    delay pert(5, 10, 30) days
    owner "Site manager"
    category "Ground"
    response "Trial pits" cost 5_000
      residual probability 10%
      residual impact pert(30_000, 45_000, 90_000)
    column "Status" "open"
    column "Raised" "2025-02-03"
  threat W2 "Wet winter"
    probability rain
    impact base * 5%
  opportunity W3 "Soil reused on site"
    probability 0.4
    impact triangular(5_000, 10_000, 15_000)
    delay 2 day
`

// TestRegisterBlock reads every line of a register into tree.Register.
func TestRegisterBlock(t *testing.T) {
	c := loadC(t, registerSrc)
	m := c.Source()
	if len(m.Registers) != 1 {
		t.Fatalf("%d registers, want 1", len(m.Registers))
	}
	r := m.Registers[0]
	if r.Name != "works" || r.Label != "Site works" || r.Pos != tree.At(14, 10) {
		t.Errorf("register %q %q at %v", r.Name, r.Label, r.Pos)
	}
	type risk struct {
		id, title            string
		opp                  bool
		prob, impact, delay  string
		owner, category      string
		action, cost, rp, ri string
		columns              []tree.RiskColumn
	}
	str := func(e tree.Expr) string {
		if e == nil {
			return ""
		}
		return e.String()
	}
	want := []risk{
		{id: "G-1", title: "Ground worse than surveyed", prob: "30%", impact: "pert(40_000, 60_000, 150_000)", delay: "pert(5, 10, 30)",
			owner: "Site manager", category: "Ground", action: "Trial pits", cost: "5_000", rp: "10%", ri: "pert(30_000, 45_000, 90_000)",
			columns: []tree.RiskColumn{{Name: "Status", Value: "open"}, {Name: "Raised", Value: "2025-02-03"}}},
		{id: "W2", title: "Wet winter", prob: "rain", impact: "(base * 5%)"},
		{id: "W3", title: "Soil reused on site", opp: true, prob: "0.4", impact: "triangular(5_000, 10_000, 15_000)", delay: "2"},
	}
	if len(r.Risks) != len(want) {
		t.Fatalf("%d risks, want %d", len(r.Risks), len(want))
	}
	for i, k := range r.Risks {
		got := risk{id: k.ID, title: k.Title, opp: k.Opportunity, prob: str(k.Prob), impact: str(k.Impact), delay: str(k.Delay),
			owner: k.Owner, category: k.Category, columns: k.Columns}
		if k.Response != nil {
			got.action, got.cost, got.rp, got.ri = k.Response.Action, str(k.Response.Cost), str(k.Response.Prob), str(k.Response.Impact)
		}
		if !reflect.DeepEqual(got, want[i]) {
			t.Errorf("risk %d:\n got %+v\nwant %+v", i+1, got, want[i])
		}
	}
	if k := r.Risks[0]; k.IDPos != tree.At(15, 10) || k.ProbPos != tree.At(16, 5) {
		t.Errorf("G-1's id at %v, probability line at %v", k.IDPos, k.ProbPos)
	}
	// The lets that take the register's figures.
	refs := map[string]string{}
	for _, p := range m.Params {
		if ref, ok := p.Expr.(*tree.RegisterRef); ok {
			refs[p.Name] = ref.String()
		}
	}
	wantRefs := map[string]string{"works_risks": "register works total", "works_after": "register works total with responses",
		"ground": `register works risk "G-1"`}
	if !reflect.DeepEqual(refs, wantRefs) {
		t.Errorf("register inputs %v, want %v", refs, wantRefs)
	}
	// Inputs used only in the register are used: no warning.
	_, ds := Load([]byte(registerSrc), Options{})
	if len(ds) != 0 {
		t.Errorf("diagnostics %v, want none", ds)
	}
}

// TestRegisterAlone: a file that holds only a register (and its inputs)
// reads, with no tree.
func TestRegisterAlone(t *testing.T) {
	src := "let p = 20%\nregister r\n  threat A \"One\"\n    probability p\n    impact 1_000\n"
	c := loadC(t, src)
	if c.HasTree() {
		t.Error("a model of a register alone has a tree")
	}
	reg, err := register.FromModel(c, "")
	if err != nil {
		t.Fatal(err)
	}
	if len(reg.Risks) != 1 || !reg.Risks[0].P.Equal(dec("0.2")) || !reg.Risks[0].Impact.Fixed.Equal(dec("1000")) {
		t.Errorf("register %+v", reg.Risks)
	}
}

// TestForkReadsBack: a register written as text by register.WriteFork —
// what `forkcast register import` prints — reads back as the same
// register, for the bundled spreadsheet and for hard cases (ids that are
// not names, quotes in labels, fixed and uniform impacts).
func TestForkReadsBack(t *testing.T) {
	sheets := map[string][]byte{}
	ex, err := os.ReadFile(filepath.Join("..", "examples", "library-register.csv"))
	if err != nil {
		t.Fatal(err)
	}
	sheets["library"] = ex
	sheets["hard"] = []byte("id,title,type,probability,low,likely,high,distribution,owner,response,response_cost,residual_probability,Notes\n" +
		"1.4,\"Quote \"\"here\"\" and \\ there\",Threat,12.5%,,2500,,,\"O'Neil\",,,,\"a, b\"\n" +
		"gain,Uniform one,opportunity,0.05,100,,300,uniform,,Do it,0,1%,\n" +
		"R_3,Fixed by equal figures,threat,100%,7,7,7,,,,,,\n")
	// A response given by its figures alone, columns without a heading
	// and one heading twice, as sheets have them.
	sheets["blank"] = []byte("id,title,type,probability,low,likely,high,residual_probability,,Notes,Notes,\n" +
		"R1,Flood,threat,30%,1,2,3,10%,x,a,b,\n")
	for name, sheet := range sheets {
		t.Run(name, func(t *testing.T) {
			tab, err := register.ReadCSV(bytes.NewReader(sheet))
			if err != nil {
				t.Fatal(err)
			}
			want := tab.Register
			want.Name = "sheet"
			var text bytes.Buffer
			if _, err := register.WriteFork(&text, want, register.ForkOptions{Comment: "read back", Currency: "EUR"}); err != nil {
				t.Fatal(err)
			}
			c := loadC(t, text.String())
			got, err := register.FromModel(c, "sheet")
			if err != nil {
				t.Fatalf("%v\n%s", err, text.String())
			}
			want.Currency = "EUR"
			if diff := registerDiff(got, want); diff != "" {
				t.Errorf("read back differs: %s\ntext:\n%s", diff, text.String())
			}
		})
	}
}

// TestRegisterMistakes: each mistake in a register is reported at its
// place (the full messages are in testdata/bad/register_*.fork).
func TestRegisterMistakes(t *testing.T) {
	head := "register r\n  threat A \"One\"\n"
	for _, c := range []struct{ src, at, msg string }{
		{head + "    probability 30%\n", "2:10", "threat A has no impact"},
		{head + "    impact 5\n", "2:10", "threat A has no probability"},
		{head + "    probability 30%\n    impact 5\n    probability 20%\n", "5:5", "the probability of threat A is given twice"},
		{head + "    probability 130%\n    impact 5\n", "3:17", "the probability 1.3 is outside 0 .. 1"},
		{head + "    probability 30%\n    impact pert(9, 5, 1)\n", "4:20", "LOW (9) is above LIKELY (5)"},
		{head + "    probabilty 30%\n    impact 5\n", "3:5", "did you mean `probability`"},
		{head + "    probability 30%\n    impact 5\n    delay 10\n", "5:13", "the delay has no unit"},
		{head + "    probability 30%\n    impact 5\n    delay 2 weeks\n", "5:13", "a delay in weeks"},
		{head + "    probability 30%\n    impact 5\n    residual probability 1%\n", "5:5", "a residual figure belongs to a response"},
		{head + "    probability 30%\n    impact 5\n    response \"x\" cost -5\n", "5:23", "the response costs -5"},
		{head + "    probability 30%\n    impact 5\n    owner Site\n", "5:11", "the owner must be in double quotes"},
		{head + "    probability 30%\n    impact x\n", "4:12", "unknown name \"x\""},
		{head + "    probability rest\n    impact 5\n", "3:17", "`rest` is only a chance branch's probability"},
		{"register r\n", "1:10", "register r has no risks"},
		{"register\n", "1:1", "the register has no name"},
		{"decision \"D\"\n  \"a\"\n  register r\n", "3:3", "a register goes at the top level"},
		{"let x = register q total\n" + head + "    probability 1%\n    impact 5\n", "1:18", "no register named \"q\""},
		{"let x = register r risk B\n" + head + "    probability 1%\n    impact 5\n", "1:25", "register r has no risk \"B\""},
		{"let x = register r totl\n" + head + "    probability 1%\n    impact 5\n", "1:20", "did you mean `total`"},
		{"let x = register r total in 1 .. 2\n" + head + "    probability 1%\n    impact 5\n", "1:26", "a range cannot be given"},
		{"let p = pert(1, 2, 3)\n" + head + "    probability 1%\n    impact p\n", "5:12", "drawn from a distribution"},
		{head + "    probability 30%\n    impact 5\n  threat A \"Again\"\n    probability 1%\n    impact 1\n", "5:10", "the id A is used twice"},
	} {
		_, ds := Load([]byte(c.src), Options{})
		found := false
		for _, d := range ds.Errors() {
			if d.Pos.String() == c.at && strings.Contains(d.Summary, c.msg) {
				found = true
			}
		}
		if !found {
			t.Errorf("%q: diagnostics\n%v\nwant one at %s saying %q", c.src, ds, c.at, c.msg)
		}
	}
}

// registerDiff says how two registers differ in what they mean (numbers
// compared by value, distributions by their shape and arguments), or "".
func registerDiff(a, b *register.Register) string {
	if a.Name != b.Name || a.Title != b.Title || a.Currency != b.Currency || len(a.Risks) != len(b.Risks) {
		return fmt.Sprintf("register %q %q %q (%d risks), want %q %q %q (%d risks)", a.Name, a.Title, a.Currency, len(a.Risks), b.Name, b.Title, b.Currency, len(b.Risks))
	}
	amount := func(x register.Amount) string {
		m, exact := x.Mean()
		return fmt.Sprintf("%s mean %s exact %v", x, m.RatString(), exact)
	}
	for i := range a.Risks {
		x, y := &a.Risks[i], &b.Risks[i]
		show := func(k *register.Risk) string {
			s := fmt.Sprintf("%q %q %s p=%s impact=%s owner=%q category=%q fields=%q", k.ID, k.Title, k.Kind, k.P, amount(k.Impact), k.Owner, k.Category, k.Fields)
			if k.Delay != nil {
				s += " delay=" + amount(*k.Delay)
			}
			if r := k.Response; r != nil {
				s += fmt.Sprintf(" response=%q cost=%s p=%s impact=%s", r.Action, r.Cost, r.P, amount(r.Impact))
			}
			return s
		}
		if sx, sy := show(x), show(y); sx != sy {
			return fmt.Sprintf("risk %d:\n got %s\nwant %s", i+1, sx, sy)
		}
	}
	return ""
}

// FuzzRegisterReadsBack: whatever spreadsheet reads as a register, the
// text register.WriteFork makes of it (what `forkcast register import`
// prints) reads back without errors as the same register. Sheets whose
// cells WriteFork had to change (a line break in a label) are left out:
// it says so, and they read back changed.
func FuzzRegisterReadsBack(f *testing.F) {
	ex, _ := os.ReadFile(filepath.Join("..", "examples", "library-register.csv"))
	for _, s := range []string{string(ex),
		"id,title,type,probability,low,likely,high\nR1,Flood,threat,30%,1,2,3\n",
		"id,title,type,probability,low,likely,high,distribution,owner,response,response_cost,residual_probability,Notes\n" +
			"1.4,\"Quote \"\"here\"\" and \\ there\",Threat,12.5%,,2500,,,\"O'Neil\",,,,\"a, b\"\n" +
			"gain,Uniform one,opportunity,0.05,100,,300,uniform,,Do it,0,1%,\n",
		"id,title,type,probability,low,likely,high,schedule_low,schedule_likely,schedule_high,residual_low,residual_likely,residual_high,response\n" +
			"x_1,A,threat,1,0.5,0.75,1,1,2,3,0,0,0,Stop\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, sheet []byte) {
		if len(sheet) > 1<<16 {
			t.Skip("larger than the input budget")
		}
		tab, err := register.ReadCSV(bytes.NewReader(sheet))
		if err != nil {
			return
		}
		want := tab.Register
		want.Name = "sheet"
		var text bytes.Buffer
		warns, err := register.WriteFork(&text, want, register.ForkOptions{})
		if err != nil {
			t.Fatalf("WriteFork: %v", err)
		}
		if len(warns) > 0 {
			return
		}
		c, ds := Load(text.Bytes(), Options{})
		if ds.HasErrors() {
			var b strings.Builder
			ds.Print(&b, "import.fork", text.Bytes())
			t.Fatalf("the text written does not read:\n%s\ntext:\n%s", b.String(), text.String())
		}
		got, err := register.FromModel(c, "sheet")
		if err != nil {
			t.Fatalf("FromModel: %v\ntext:\n%s", err, text.String())
		}
		if diff := registerDiff(got, want); diff != "" {
			t.Fatalf("read back differs: %s\ntext:\n%s", diff, text.String())
		}
	})
}

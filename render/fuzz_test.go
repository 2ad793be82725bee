package render

import (
	"bytes"
	"fmt"
	"math/big"
	"regexp"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/internal/fuzzkit"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Each fuzz target runs every input under a budget of its own (time and
// bytes allocated, fuzzkit.Check): a slow or greedy input fails the run.

// checkSafe fails the test if s holds a character no picture or terminal
// may get: what clean removes, or invalid UTF-8. DOT's own tabs and line
// breaks are allowed where allowLayout is set.
func checkSafe(t *testing.T, what, s string, allowLayout bool) {
	t.Helper()
	if !utf8.ValidString(s) {
		t.Fatalf("%s is not valid UTF-8: %q", what, s)
	}
	for _, r := range s {
		if allowLayout && (r == '\t' || r == '\n') {
			continue
		}
		if unsafeRune(r) {
			t.Fatalf("%s holds %U: %q", what, r, s)
		}
	}
}

func FuzzWrapText(f *testing.F) {
	for _, s := range []string{"", "short", "Integration with the fare back office", "ünï cödé", "a\x1b[2Jb\u202ec", strings.Repeat("x", 300), "bad \xff utf-8 \ufffe"} {
		f.Add(s, 24)
		f.Add(s, 1)
	}
	f.Fuzz(func(t *testing.T, s string, width int) {
		width = 1 + int(uint(width)%80)
		var c string
		var lines []string
		fuzzkit.Check(t, 2*time.Second, uint64(32*len(s))+1<<20, func() {
			c = clean(s)
			lines = wrapText(c, width)
		})
		checkSafe(t, "clean", c, false)
		if c != strings.TrimSpace(c) || strings.Contains(c, "  ") {
			t.Fatalf("clean left spaces at the ends or doubled: %q", c)
		}
		for _, l := range lines {
			if n := utf8.RuneCountInString(l); n == 0 || n > width {
				t.Fatalf("a line of %d characters at width %d: %q", n, width, l)
			}
			if l != strings.TrimSpace(l) {
				t.Fatalf("a line starts or ends with a space: %q", l)
			}
		}
		// The lines hold the text, in order, with nothing lost or added
		// but the spaces where lines break.
		if got, want := strings.ReplaceAll(strings.Join(lines, ""), " ", ""), strings.ReplaceAll(c, " ", ""); got != want {
			t.Fatalf("the lines %q do not hold the text %q", lines, c)
		}
	})
}

// amountPattern is an amount as Money writes it, before the code.
var amountPattern = regexp.MustCompile(`^-?[0-9]{1,3}(,[0-9]{3})*(\.[0-9]+)?$`)

// fuzzDecimal makes a decimal from fuzzed digits and an exponent: up to 120
// digits, exponents over the whole int16 range.
func fuzzDecimal(digits string, exp int16, neg bool) decimal.Decimal {
	var b strings.Builder
	for _, r := range digits {
		if r >= '0' && r <= '9' && b.Len() < 120 {
			b.WriteRune(r)
		}
	}
	n, ok := new(big.Int).SetString(b.String(), 10)
	if !ok {
		n = big.NewInt(0)
	}
	if neg {
		n.Neg(n)
	}
	return decimal.NewFromBigInt(n, int32(exp))
}

func FuzzMoney(f *testing.F) {
	f.Add("123456789", int16(-2), "EUR", false, uint8(2))
	f.Add("5", int16(-3), "JPY", true, uint8(0))
	f.Add("1", int16(40), "", false, uint8(6))
	f.Add("49999", int16(-7), "KWD", true, uint8(3))
	f.Add("0", int16(0), "E\x1b[2JUR", true, uint8(1))
	f.Fuzz(func(t *testing.T, digits string, exp int16, currency string, neg bool, places uint8) {
		d := fuzzDecimal(digits, exp, neg)
		unit := MinorUnit(currency)
		pd := int32(places % 8)
		var money, pct, cash string
		fuzzkit.Check(t, 2*time.Second, 64<<20, func() {
			money = Money(d, currency)
			pct = Percent(d, pd)
			cash = Cash(d, tree.Max, currency)
		})
		checkSafe(t, "Money", money, false)
		checkSafe(t, "Cash", cash, false)
		amount := money
		if code := safeCode(currency); code != "" {
			if !strings.HasSuffix(money, " "+code) {
				t.Fatalf("Money(%s, %q) = %q lacks the code %q", d, currency, money, code)
			}
			amount = strings.TrimSuffix(money, " "+code)
		}
		if !amountPattern.MatchString(amount) {
			t.Fatalf("Money(%s) = %q is not a grouped amount", d, money)
		}
		if i := strings.IndexByte(amount, '.'); (i < 0 && unit != 0) || (i >= 0 && int32(len(amount)-i-1) != unit) {
			t.Fatalf("Money(%s, %q) = %q: want %d decimals", d, currency, money, unit)
		}
		back, err := decimal.NewFromString(strings.ReplaceAll(amount, ",", ""))
		if err != nil || !back.Equal(d.Round(unit)) {
			t.Fatalf("Money(%s) = %q reads back as %s, want %s", d, money, back, d.Round(unit))
		}
		if back.IsZero() && strings.HasPrefix(amount, "-") {
			t.Fatalf("Money(%s) = %q: a zero with a minus sign", d, money)
		}
		if !strings.HasSuffix(pct, "%") {
			t.Fatalf("Percent(%s) = %q", d, pct)
		}
		if p, err := decimal.NewFromString(strings.TrimSuffix(pct, "%")); err != nil || !p.Equal(d.Mul(decimal.NewFromInt(100)).Round(pd)) {
			t.Fatalf("Percent(%s, %d) = %q", d, pd, pct)
		}
		switch {
		case d.IsZero() && cash != "":
			t.Fatalf("Cash(0) = %q, want nothing", cash)
		case d.IsPositive() && cash != "gain "+Money(d, currency):
			t.Fatalf("Cash(%s) = %q", d, cash)
		case d.IsNegative() && cash != "cost "+Money(d.Neg(), currency):
			t.Fatalf("Cash(%s) = %q", d, cash)
		}
	})
}

// fuzzOptions reads drawing options from one byte.
func fuzzOptions(b byte) Options {
	o := Options{PolicyOnly: b&1 != 0, MaxDepth: int(b>>1) % 4}
	if b&0x80 != 0 {
		o.WrapWidth = 1 + int(b>>3)%16
	}
	return o
}

// fuzzSeeds are inputs to start from: hostile labels in every place.
func fuzzSeeds() [][]byte {
	label := func(s string) []byte { return append([]byte{byte(len(s))}, s...) }
	var seeds [][]byte
	for _, l := range []string{"Road", "a <b> & \"c\" \\", "clear\x1b[2J", "\u202eevil \ufffe", "\xff\xfe", "]]> <!-- &#0; &amp;"} {
		var b []byte
		b = append(b, label("Title "+l)...)
		b = append(b, label("EUR")...)
		b = append(b, 0)           // objective max
		b = append(b, label(l)...) // root label
		b = append(b, 1, 2)        // a decision of 3 options
		for j := range 3 {
			b = append(b, label(l)...)           // option label (repeated: numbered)
			b = append(b, 0xff, 0x10*byte(j), 2) // cash
			b = append(b, 1)                     // a node under it
			b = append(b, label(l+" chance")...)
			b = append(b, 2, 1) // a chance node of 2 outcomes
			b = append(b, label("up")...)
			b = append(b, 0, 50, 1, 0)
			b = append(b, label("down")...)
			b = append(b, 0x80, 0, 1, 0)
		}
		seeds = append(seeds, b)
	}
	return seeds
}

// TestFuzzSeedsResolve: the model FromBytes makes resolves without errors,
// so the fuzz targets skip nothing they should not.
func TestFuzzSeedsResolve(t *testing.T) {
	for _, data := range append(fuzzSeeds(), nil, []byte{1, 2, 3}, bytes.Repeat([]byte{0xff}, 500)) {
		m := fuzzkit.FromBytes(data)
		if _, ds := compiled.Compile(m); ds.HasErrors() {
			t.Errorf("%q: %v", data, ds)
		}
	}
}

// htmlTag is a tag the drawing writes into an HTML-like label.
var htmlTag = regexp.MustCompile(`</?(TABLE|TR|TD|FONT|B|BR)( [A-Z-]+="[^"<>&]*")*/?>`)

// entity is an escape the drawing writes in label text.
var entity = regexp.MustCompile(`&(amp|lt|gt|quot|#39);`)

func FuzzDOT(f *testing.F) {
	for _, s := range fuzzSeeds() {
		f.Add(s, byte(0))
		f.Add(s, byte(0x83))
	}
	f.Fuzz(func(t *testing.T, data []byte, ob byte) {
		m := fuzzkit.FromBytes(data)
		c, ds := compiled.Compile(m)
		if ds.HasErrors() {
			t.Skipf("does not compile: %v", ds)
		}
		var sol *eval.Solution
		var pic, again *Picture
		var err, err2 error
		opts := fuzzOptions(ob)
		fuzzkit.Check(t, 5*time.Second, 256<<20, func() {
			var serr error
			if sol, serr = eval.Solve(c); serr != nil {
				return
			}
			pic, err = Layout(sol, opts)
			again, err2 = Layout(sol, opts)
		})
		if sol == nil {
			t.Skip("does not solve")
		}
		if err != nil || err2 != nil {
			t.Fatalf("Layout: %v / %v", err, err2)
		}
		if !bytes.Equal(pic.DOT, again.DOT) || pic.Width != again.Width || pic.Height != again.Height {
			t.Fatal("two layouts of the same tree differ")
		}
		if !(pic.Width > 0 && pic.Height > 0 && pic.Width < 1e7 && pic.Height < 1e7) {
			t.Fatalf("picture of %g × %g points", pic.Width, pic.Height)
		}
		dot := string(pic.DOT)
		checkSafe(t, "DOT", dot, true)
		for i := range sol.Nodes() {
			if c := strings.Count(dot, fmt.Sprintf("\tn%d [id=\"n%d\"", i, i)); c > 1 {
				t.Fatalf("node n%d written %d times", i, c)
			}
		}
		// Every HTML-like label is our tags around escaped text: once the
		// tags and escapes are taken out, no markup character is left.
		for _, line := range strings.Split(dot, "\n") {
			i := strings.Index(line, "label=<")
			if i < 0 {
				continue
			}
			j := strings.LastIndex(line, ">")
			body := line[i+len("label=<") : j]
			text := entity.ReplaceAllString(htmlTag.ReplaceAllString(body, ""), "")
			if strings.ContainsAny(text, "<>&") {
				t.Fatalf("markup left in a label's text: %q", text)
			}
		}
		if !strings.HasPrefix(dot, "digraph \"") || !strings.HasSuffix(dot, "}\n") {
			t.Fatalf("not one digraph: %.80q", dot)
		}
	})
}

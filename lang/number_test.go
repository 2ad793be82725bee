package lang

import (
	"errors"
	"fmt"
	"math/big"
	"strings"
	"testing"
	"time"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// TestParseNumber checks the number reader the command line shares with
// the language, against values worked by hand (a percent is divided by
// 100; _ only groups digits).
func TestParseNumber(t *testing.T) {
	good := []struct{ text, want string }{
		{"25%", "0.25"},
		{"1_000", "1000"},
		{"1_250_000.5", "1250000.5"},
		{"12.5%", "0.125"},
		{"0.1", "0.1"},
		{"-250", "-250"},
		{"-2.5%", "-0.025"},
		{"007", "7"},
	}
	for _, tt := range good {
		v, err := ParseNumber(tt.text)
		if err != nil || !v.Equal(dec(tt.want)) {
			t.Errorf("ParseNumber(%q) = %v, %v; want %s", tt.text, v, err, tt.want)
		}
	}
	bad := []struct{ text, problem string }{
		{"_2_5_0___000", "has two _ in a row"},
		{"+4_5_0_000_", "is not a number"},
		{"4_5_0_000_", "has a _ that is not between two digits"},
		{"1e6", "is not a number"},
		{"12%%", "has more than one %"},
		{"1.2.3", "has more than one decimal point"},
		{".5", "needs a digit before the decimal point"},
		{" 5", "is not a number"},
		{"5 %", "is not a number"},
		{"", "is not a number"},
		{"-", "is not a number"},
		{"--5", "is not a number"},
		{"%", "is not a number"},
		{"1,000", "is not a number"},
	}
	for _, tt := range bad {
		_, err := ParseNumber(tt.text)
		var ne *NumberError
		if !errors.As(err, &ne) || ne.Problem != tt.problem || ne.Text != tt.text || ne.Hint == "" {
			t.Errorf("ParseNumber(%q): %#v, want the problem %q", tt.text, err, tt.problem)
		}
	}
}

// TestParseNumberAgreesWithModels checks that a number reads the same on
// its own as in a model.
func TestParseNumberAgreesWithModels(t *testing.T) {
	for _, text := range []string{"25%", "1_000", "0.125", "3", "99.99%"} {
		c := loadC(t, fmt.Sprintf("let x = %s\ndecision \"D\"\n  \"a\"  gain x\n", text))
		inModel, _ := c.InputNamed("x")
		v, err := ParseNumber(text)
		if err != nil || !v.Equal(inModel.Value) {
			t.Errorf("%s: ParseNumber %v (%v), model %v", text, v, err, inModel.Value)
		}
	}
}

func ExampleParseNumber() {
	v, _ := ParseNumber("12.5%")
	fmt.Println(v)
	_, err := ParseNumber("1__000")
	fmt.Println(err)
	// Output:
	// 0.125
	// 1__000 has two _ in a row
}

// TestNumberDigits checks the limit on the digits of a number: at the
// limit the value is exact (compared with math/big), past it an error at
// the number's position, and a very long number is refused quickly.
func TestNumberDigits(t *testing.T) {
	digits := strings.Repeat("1234567890", MaxDigits/10)
	v, err := ParseNumber(digits[:MaxDigits-2] + "." + digits[MaxDigits-2:])
	want, _ := new(big.Int).SetString(digits, 10)
	if err != nil || !v.Shift(2).Equal(decimal.NewFromBigInt(want, 0)) {
		t.Errorf("%d digits: %v, %v", MaxDigits, v, err)
	}
	_, err = ParseNumber(digits + "7%")
	var ne *NumberError
	if !errors.As(err, &ne) || ne.Problem != fmt.Sprintf("has %d digits; a number may have at most %d", MaxDigits+1, MaxDigits) {
		t.Errorf("%d digits: %v", MaxDigits+1, err)
	}

	// Three million digits took 30 s to read when the conversion was
	// quadratic; the limit makes it a quick error at the position.
	src := "let a = " + strings.Repeat("7", 3_000_000) + "\ndecision \"D\"\n  \"x\"  gain a\n"
	start := time.Now()
	_, ds := Load([]byte(src), Options{})
	if took := time.Since(start); took > 10*time.Second {
		t.Errorf("3,000,000 digits read in %v", took)
	}
	if len(ds) != 1 || ds[0].Pos != (tree.Pos{Line: 1, Col: 9}) || !strings.Contains(ds[0].Summary, "has 3,000,000 digits") || len(ds[0].Summary) > 200 {
		t.Errorf("got %v", ds)
	}
}

// FuzzParseNumber checks the number reader the command line uses: no
// panic, each input under a time budget, and agreement with the language:
// a number it reads is a number token that the model reader reads to the
// same value, and a number token the model reader takes, it takes too.
func FuzzParseNumber(f *testing.F) {
	for _, s := range []string{"25%", "1_000", "-2.5%", "_2_5_0___000", "+4_5_0_000_", "1e6", "", "-", "%",
		"0.000_1", "12%%", "1.2.3", strings.Repeat("9", MaxDigits+1), "١٢", "5 %", "--1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		if len(text) > fuzzMaxInput {
			t.Skip("larger than the input budget")
		}
		underBudget(t, fuzzExprTime, func() string {
			v, err := ParseNumber(text)
			body, neg := strings.CutPrefix(text, "-")
			var ds tree.Diagnostics
			lx := lexLine(body, 1, 1, &ds)
			single := len(lx.toks) == 1 && lx.toks[0].Type == tokNumber && lx.toks[0].Value == body && len(ds) == 0
			want, msg, _ := parseNumber(body)
			switch {
			case err == nil && !single:
				return fmt.Sprintf("%q: ParseNumber reads %v, but a model would not read it as one number", text, v)
			case err == nil && neg && !v.Equal(want.Neg()), err == nil && !neg && !v.Equal(want):
				return fmt.Sprintf("%q: ParseNumber %v, a model %v", text, v, want)
			case err != nil && single && msg == "":
				return fmt.Sprintf("%q: a model reads it (%v), ParseNumber does not: %v", text, want, err)
			case err != nil && (err.Error() == "" || len(err.Error()) > 400):
				return fmt.Sprintf("%q: error of %d bytes", text, len(err.Error()))
			}
			return ""
		})
	})
}

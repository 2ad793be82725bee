package lang

import (
	"errors"
	"fmt"
	"testing"
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

package lang

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"
)

const numberForms = "numbers are written with digits, an optional decimal point, _ between digit groups and an optional % at the end: 1_250_000, 0.55, 55%"

// NumberError is a number that is not written the way the language writes
// numbers.
type NumberError struct {
	Text    string // the number as written
	Problem string // what is wrong with it, to follow the number: "has two _ in a row"
	Hint    string // how to write it
}

// Error gives the number (cut short if it is long) and what is wrong.
func (e *NumberError) Error() string { return shorten(e.Text) + " " + e.Problem }

// ParseNumber reads a number written as in a model: digits, `_` between
// digit groups, at most one decimal point and an optional `%` at the end
// (the value is then divided by 100); a leading minus sign is allowed, as
// `-250` in a model is minus 250. The value is exact: the digits go to a
// decimal as text, never through float64. Anything else, even with spaces
// around it, is a *NumberError saying what is wrong and how to write it.
//
// The command line reads the numbers it is given with it, so that they are
// written exactly as in a model.
func ParseNumber(text string) (decimal.Decimal, error) {
	body, neg := strings.CutPrefix(text, "-")
	if body == "" {
		return decimal.Decimal{}, &NumberError{Text: text, Problem: "is not a number", Hint: numberForms}
	}
	v, err := readNumber(body)
	if err != nil {
		err.Text = text
		return v, err
	}
	if neg {
		v = v.Neg()
	}
	return v, nil
}

// parseNumber is readNumber with the error as a message and a hint ("" for
// a good number), as diagnostics take them.
func parseNumber(text string) (v decimal.Decimal, msg, hint string) {
	v, err := readNumber(text)
	if err != nil {
		return v, err.Error(), err.Hint
	}
	return v, "", ""
}

// MaxDigits is the most digits a number may be written with. It is far
// more than any amount or probability needs (a division is carried to 50
// decimal places), and it keeps reading a number quick: converting digits
// to a decimal takes time that grows with the square of their count.
const MaxDigits = 100

// readNumber reads a number as written: digits with single _ between
// digits, at most one decimal point, and an optional % at the end. Its time
// is linear in the length of text.
func readNumber(text string) (decimal.Decimal, *NumberError) {
	var v decimal.Decimal
	fail := func(problem, hint string) (decimal.Decimal, *NumberError) {
		return v, &NumberError{Text: text, Problem: problem, Hint: hint}
	}
	digits := 0
	for i := 0; i < len(text); i++ {
		if text[i] >= '0' && text[i] <= '9' {
			digits++
		}
	}
	if digits > MaxDigits {
		return fail(fmt.Sprintf("has %s digits; a number may have at most %d", grouped(digits), MaxDigits),
			"round it; for very large amounts, count in a larger unit (thousands or millions) throughout the model")
	}
	body, percent := strings.CutSuffix(text, "%")
	switch {
	case strings.Count(text, "%") > 1:
		return fail("has more than one %", "write one % at the end: "+shorten(strings.TrimRight(text, "%"))+"%")
	case strings.Contains(body, "%"):
		return fail("is not a number: the % goes at the end", numberForms)
	case strings.Count(body, ".") > 1:
		return fail("has more than one decimal point", "a number has at most one decimal point; group digits with _ (1_000_000)")
	}
	for _, r := range body {
		if (r < '0' || r > '9') && r != '_' && r != '.' {
			h := numberForms
			if strings.ContainsAny(body, "eE") && !strings.ContainsAny(body, "abcdfghijklmnopqrstuvwxyzABCDFGHIJKLMNOPQRSTUVWXYZ") {
				h = "write the number out in full (1_000_000, not 1e6); " + numberForms
			}
			return fail("is not a number", h)
		}
	}
	switch {
	case body == "":
		return fail("is not a number", numberForms)
	case strings.HasPrefix(body, "."):
		return fail("needs a digit before the decimal point", "write 0"+shorten(text))
	case strings.HasSuffix(body, "."):
		pct := ""
		if percent {
			pct = "%"
		}
		return fail("has no digits after the decimal point", "write "+shorten(strings.TrimSuffix(body, "."))+pct+" or add the decimals")
	case strings.Contains(body, "__"):
		return fail("has two _ in a row", "put a single _ between digit groups, as in 1_000_000")
	case strings.HasPrefix(body, "_") || strings.HasSuffix(body, "_") || strings.Contains(body, "_.") || strings.Contains(body, "._"):
		return fail("has a _ that is not between two digits", "put _ only between digits, as in 1_000_000")
	}
	d, err := decimal.NewFromString(strings.ReplaceAll(body, "_", ""))
	if err != nil {
		return fail("is not a number", numberForms)
	}
	if percent {
		d = d.Shift(-2)
	}
	return d, nil
}

// shortLen is the most of a long word or number a message repeats.
const shortLen = 40

// shorten cuts a long text from the input to its first characters and an
// ellipsis, so that a message about it stays one readable line.
func shorten(s string) string {
	if len(s) <= shortLen {
		return s
	}
	n := 0
	for i := range s {
		if n == shortLen-1 {
			return s[:i] + "…"
		}
		n++
	}
	return s
}

package register

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"
)

// Numbers in a spreadsheet cell: digits with an optional sign, decimal
// point and thousands separators (1,250,000 or 1_250_000, as a
// spreadsheet exports a formatted number), and for probabilities an
// optional % (30% or 0.3). No exponent, no currency sign, at most
// maxDigits digits.

// maxDigits is the most digits a number in a cell may have, as in a
// model.
const maxDigits = 100

// parseNumber reads a cell as a number; percent says whether a trailing %
// is allowed (and divides by 100). It returns the value and, when the
// cell is not a number, what is wrong (the caller names the column).
func parseNumber(cell string, percent bool) (decimal.Decimal, bool, string) {
	s := strings.TrimSpace(cell)
	if s == "" {
		return decimal.Zero, false, "is empty"
	}
	shown := fmt.Sprintf("%q", short(s))
	pct := false
	if strings.HasSuffix(s, "%") {
		if !percent {
			return decimal.Zero, false, shown + " is a percentage; write an amount of money"
		}
		pct = true
		s = strings.TrimSpace(strings.TrimSuffix(s, "%"))
	}
	neg := false
	switch {
	case strings.HasPrefix(s, "-"), strings.HasPrefix(s, "−"):
		neg = true
		s = strings.TrimPrefix(strings.TrimPrefix(s, "-"), "−")
	case strings.HasPrefix(s, "+"):
		s = s[1:]
	}
	intPart, frac, hasPoint := strings.Cut(s, ".")
	if strings.ContainsAny(s, "€$£¥") {
		return decimal.Zero, false, shown + " has a currency sign; write the number alone (the currency is set once for the register)"
	}
	if strings.ContainsAny(s, "eE") && !strings.ContainsAny(s, "abcdfghijklmnopqrstuvwxyzABCDFGHIJKLMNOPQRSTUVWXYZ") {
		return decimal.Zero, false, shown + " is written with an exponent; write the number out in full"
	}
	digits, ok := groupedDigits(intPart)
	if !ok {
		if strings.Count(s, ",") == 1 && !hasPoint {
			if a, b, _ := strings.Cut(s, ","); allDigits(a) && allDigits(b) && a != "" && b != "" && len(b) != 3 {
				return decimal.Zero, false, shown + " uses a comma as the decimal point; write " + a + "." + b
			}
		}
		return decimal.Zero, false, shown + " is not a number"
	}
	if hasPoint && (frac == "" || !allDigits(frac)) {
		return decimal.Zero, false, shown + " is not a number"
	}
	if len(digits)+len(frac) > maxDigits {
		return decimal.Zero, false, fmt.Sprintf("has %d digits; a number may have at most %d", len(digits)+len(frac), maxDigits)
	}
	text := digits
	if hasPoint {
		text += "." + frac
	}
	d, err := decimal.NewFromString(text)
	if err != nil {
		return decimal.Zero, false, shown + " is not a number"
	}
	if neg {
		d = d.Neg()
	}
	if pct {
		d = d.Shift(-2)
	}
	return d, pct, ""
}

// groupedDigits returns the digits of s, which may group them by
// thousands with commas, underscores or spaces (one kind, groups of three
// after the first).
func groupedDigits(s string) (string, bool) {
	if s == "" {
		return "", false
	}
	sep := rune(0)
	for _, r := range s {
		if r == ',' || r == '_' || r == ' ' || r == '\u00a0' {
			if sep != 0 && r != sep {
				return "", false
			}
			sep = r
		} else if r < '0' || r > '9' {
			return "", false
		}
	}
	if sep == 0 {
		return s, true
	}
	parts := strings.Split(s, string(sep))
	for i, p := range parts {
		if !allDigits(p) || p == "" || (i > 0 && len(p) != 3) || (i == 0 && len(p) > 3) {
			return "", false
		}
	}
	return strings.Join(parts, ""), true
}

func allDigits(s string) bool {
	for _, r := range s {
		if r < '0' || r > '9' {
			return false
		}
	}
	return true
}

// short cuts a long cell for a message.
func short(s string) string {
	r := []rune(s)
	if len(r) > 40 {
		return string(r[:39]) + "…"
	}
	return s
}

package lang

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"
)

const numberForms = "numbers are written with digits, an optional decimal point, _ between digit groups and an optional % at the end: 1_250_000, 0.55, 55%"

// parseNumber reads a number as written: digits with single _ between
// digits, at most one decimal point, and an optional % at the end (the value
// is then divided by 100). It is exact: the digits go to decimal as text,
// never through float64. On failure it returns a message and a hint.
func parseNumber(text string) (v decimal.Decimal, msg, hint string) {
	body, percent := strings.CutSuffix(text, "%")
	switch {
	case strings.Count(text, "%") > 1:
		return v, fmt.Sprintf("%s has more than one %%", text), "write one % at the end: " + strings.TrimRight(text, "%") + "%"
	case strings.Contains(body, "%"):
		return v, fmt.Sprintf("%s is not a number: the %% goes at the end", text), numberForms
	case strings.Count(body, ".") > 1:
		return v, fmt.Sprintf("%s has more than one decimal point", text), "a number has at most one decimal point; group digits with _ (1_000_000)"
	}
	for _, r := range body {
		if (r < '0' || r > '9') && r != '_' && r != '.' {
			h := numberForms
			if strings.ContainsAny(body, "eE") && !strings.ContainsAny(body, "abcdfghijklmnopqrstuvwxyzABCDFGHIJKLMNOPQRSTUVWXYZ") {
				h = "write the number out in full (1_000_000, not 1e6); " + numberForms
			}
			return v, fmt.Sprintf("%s is not a number", text), h
		}
	}
	switch {
	case strings.HasPrefix(body, "."):
		return v, fmt.Sprintf("%s needs a digit before the decimal point", text), "write 0" + text
	case strings.HasSuffix(body, "."):
		return v, fmt.Sprintf("%s has no digits after the decimal point", text), "write " + strings.TrimSuffix(body, ".") + func() string {
			if percent {
				return "%"
			}
			return ""
		}() + " or add the decimals"
	case strings.Contains(body, "__"):
		return v, fmt.Sprintf("%s has two _ in a row", text), "put a single _ between digit groups, as in 1_000_000"
	case strings.HasPrefix(body, "_") || strings.HasSuffix(body, "_") || strings.Contains(body, "_.") || strings.Contains(body, "._"):
		return v, fmt.Sprintf("%s has a _ that is not between two digits", text), "put _ only between digits, as in 1_000_000"
	}
	d, err := decimal.NewFromString(strings.ReplaceAll(body, "_", ""))
	if err != nil {
		return v, fmt.Sprintf("%s is not a number", text), numberForms
	}
	if percent {
		d = d.Shift(-2)
	}
	return d, "", ""
}

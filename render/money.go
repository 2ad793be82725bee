// Package render presents solved trees to people: money and probabilities
// as text, and the tree as a picture.
package render

import (
	"strings"

	"github.com/shopspring/decimal"
)

// minorUnits holds the ISO 4217 minor unit (digits after the decimal point)
// of currencies whose minor unit is not 2. Any other code, or none, uses 2.
var minorUnits = map[string]int32{
	"BHD": 3, "BIF": 0, "CLF": 4, "CLP": 0, "DJF": 0, "GNF": 0, "IQD": 3,
	"ISK": 0, "JOD": 3, "JPY": 0, "KMF": 0, "KRW": 0, "KWD": 3, "LYD": 3,
	"OMR": 3, "PYG": 0, "RWF": 0, "TND": 3, "UGX": 0, "UYI": 0, "UYW": 4,
	"VND": 0, "VUV": 0, "XAF": 0, "XOF": 0, "XPF": 0,
}

// MinorUnit is the number of decimal places a currency's amounts are shown
// with (ISO 4217), 2 when the code is unknown or empty.
func MinorUnit(currency string) int32 {
	if u, ok := minorUnits[strings.ToUpper(currency)]; ok {
		return u
	}
	return 2
}

// Money formats an amount rounded half away from zero to the currency's
// minor unit, with thousands separators and the code after it:
// "1,234,567.89 EUR". A negative amount starts with a minus sign.
//
// The code is shown as it is safe to print: a code from a model file can
// hold anything, and control characters in it (a terminal escape
// sequence) are turned into spaces, as in labels.
func Money(d decimal.Decimal, currency string) string {
	s := Amount(d, currency)
	if c := safeCode(currency); c != "" {
		s += " " + c
	}
	return s
}

// safeCode is a currency code as Money shows it: itself when it is
// printable ASCII (every real code), else cleaned as labels are.
func safeCode(c string) string {
	for i := 0; i < len(c); i++ {
		if c[i] <= ' ' || c[i] >= 0x7f {
			return clean(c)
		}
	}
	return c
}

// Amount is Money without the currency code.
func Amount(d decimal.Decimal, currency string) string {
	return Grouped(d.Round(MinorUnit(currency)).StringFixed(MinorUnit(currency)))
}

// Grouped inserts thousands separators into a plain decimal string.
func Grouped(s string) string {
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	intPart, frac := s, ""
	if i := strings.IndexByte(s, '.'); i >= 0 {
		intPart, frac = s[:i], s[i:]
	}
	var b strings.Builder
	if neg && strings.Trim(intPart+frac, "0.") != "" {
		b.WriteByte('-')
	}
	for i, c := range intPart {
		if i > 0 && (len(intPart)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	b.WriteString(frac)
	return b.String()
}

// Percent formats a probability as a percentage with up to digits decimals,
// trailing zeros dropped: 0.25 → "25%", 1/7 → "14.29%" (digits 2).
func Percent(p decimal.Decimal, digits int32) string {
	s := p.Mul(decimal.NewFromInt(100)).Round(digits).String()
	return s + "%"
}

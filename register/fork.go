package register

import (
	"bufio"
	"fmt"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/shopspring/decimal"
)

// ForkOptions say how WriteFork writes a register.
type ForkOptions struct {
	// Comment is written as the file's first line (a comment), when set.
	Comment string
	// Currency is written as the model's currency header, when set.
	Currency string
}

// Warning is something WriteFork had to change to write a register as
// text: a line break in a cell, which a label cannot hold, became a space.
type Warning struct {
	Risk  int    // the risk's index
	Field string // the part: "title", "owner", a column's name, …
	Msg   string
}

// WriteFork writes reg as a register block of the text language, which
// lang reads back as the same register:
//
//	register NAME "Title"
//	  threat ID "Title"
//	    probability 30%
//	    impact pert(40_000, 60_000, 150_000)
//	    delay pert(5, 10, 30) days
//	    owner "…"
//	    category "…"
//	    response "…" cost 8_000      (the description may be left out)
//	      residual probability 10%
//	      residual impact pert(30_000, 50_000, 90_000)
//	    column "Heading" "value"
//
// reg.Name must be a name of the language (see NameFor). It returns what
// had to change in the text (line breaks in cells, which become spaces).
func WriteFork(w io.Writer, reg *Register, opts ForkOptions) ([]Warning, error) {
	if !isName(reg.Name) {
		return nil, fmt.Errorf("register: %q is not a name the language can read; NameFor makes one", reg.Name)
	}
	bw := bufio.NewWriter(w)
	var warns []Warning
	label := func(i int, field, s string) string {
		if !utf8.ValidString(s) {
			warns = append(warns, Warning{Risk: i, Field: field, Msg: "bytes that are not UTF-8 text became \uFFFD (save the sheet as UTF-8 to keep them)"})
			s = strings.ToValidUTF8(s, "\uFFFD")
		}
		if strings.ContainsAny(s, "\r\n\t") || strings.ContainsFunc(s, unicode.IsControl) {
			warns = append(warns, Warning{Risk: i, Field: field, Msg: "a line break or control character became a space (a label is one line of plain text)"})
			s = strings.Map(func(r rune) rune {
				if unicode.IsControl(r) {
					return ' '
				}
				return r
			}, s)
		}
		return quote(s)
	}
	if opts.Comment != "" {
		for _, line := range strings.Split(opts.Comment, "\n") {
			fmt.Fprintf(bw, "# %s\n", strings.Map(func(r rune) rune {
				if unicode.IsControl(r) {
					return ' '
				}
				return r
			}, line))
		}
	}
	if opts.Currency != "" {
		cur := opts.Currency
		if !isName(cur) {
			cur = quote(cur)
		}
		fmt.Fprintf(bw, "currency %s\n\n", cur)
	} else if opts.Comment != "" {
		bw.WriteString("\n")
	}
	fmt.Fprintf(bw, "register %s", reg.Name)
	if reg.Title != "" {
		fmt.Fprintf(bw, " %s", label(-1, "title", reg.Title))
	}
	bw.WriteString("\n")
	for i := range reg.Risks {
		k := &reg.Risks[i]
		id := k.ID
		if !isName(id) {
			id = label(i, "id", id)
		}
		if i > 0 {
			bw.WriteString("\n")
		}
		fmt.Fprintf(bw, "  %s %s %s\n", k.Kind, id, label(i, "title", k.Title))
		fmt.Fprintf(bw, "    probability %s\n", percent(k.P))
		fmt.Fprintf(bw, "    impact %s\n", amountText(k.Impact))
		if k.Delay != nil {
			fmt.Fprintf(bw, "    delay %s days\n", amountText(*k.Delay))
		}
		if k.Owner != "" {
			fmt.Fprintf(bw, "    owner %s\n", label(i, "owner", k.Owner))
		}
		if k.Category != "" {
			fmt.Fprintf(bw, "    category %s\n", label(i, "category", k.Category))
		}
		if rs := k.Response; rs != nil {
			bw.WriteString("    response")
			if rs.Action != "" {
				fmt.Fprintf(bw, " %s", label(i, "response", rs.Action))
			}
			if !rs.Cost.IsZero() {
				fmt.Fprintf(bw, " cost %s", number(rs.Cost))
			}
			bw.WriteString("\n")
			if !rs.P.Equal(k.P) {
				fmt.Fprintf(bw, "      residual probability %s\n", percent(rs.P))
			}
			if amountText(rs.Impact) != amountText(k.Impact) {
				fmt.Fprintf(bw, "      residual impact %s\n", amountText(rs.Impact))
			}
		}
		for _, f := range k.Fields {
			fmt.Fprintf(bw, "    column %s %s\n", label(i, f.Name, f.Name), label(i, f.Name, f.Value))
		}
	}
	return warns, bw.Flush()
}

// amountText writes an amount in the language: 25_000 or
// pert(40_000, 60_000, 150_000).
func amountText(a Amount) string {
	if a.Dist == nil {
		return number(a.Fixed)
	}
	if a.Shape == "" {
		return a.Dist.String()
	}
	args := make([]string, len(a.Args))
	for i, x := range a.Args {
		args[i] = number(x)
	}
	return a.Shape + "(" + strings.Join(args, ", ") + ")"
}

// number writes a decimal as the language reads it: digits grouped by
// thousands with _ when the whole part has four digits or more.
func number(d decimal.Decimal) string {
	s := d.String()
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	whole, frac, hasFrac := strings.Cut(s, ".")
	if len(whole) >= 4 {
		var b strings.Builder
		for i, c := range whole {
			if i > 0 && (len(whole)-i)%3 == 0 {
				b.WriteByte('_')
			}
			b.WriteRune(c)
		}
		whole = b.String()
	}
	if hasFrac {
		whole += "." + frac
	}
	if neg {
		return "-" + whole
	}
	return whole
}

// percent writes a probability as a percentage: 0.3 → 30%.
func percent(p decimal.Decimal) string { return p.Shift(2).String() + "%" }

// quote writes s as a label: in double quotes, with \" and \\.
func quote(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch r {
		case '"', '\\':
			b.WriteByte('\\')
		}
		b.WriteRune(r)
	}
	b.WriteByte('"')
	return b.String()
}

// reserved are the words the language keeps for itself.
var reserved = map[string]bool{"gain": true, "cost": true, "rest": true, "if": true, "in": true, "on": true}

// isName reports whether s is a name of the language: a letter or _, then
// letters, digits and _, and not a reserved word.
func isName(s string) bool {
	if s == "" || reserved[s] {
		return false
	}
	for i, r := range s {
		if r != '_' && !unicode.IsLetter(r) && (i == 0 || !unicode.IsDigit(r)) {
			return false
		}
	}
	return utf8.ValidString(s)
}

// NameFor makes a name of the language from s (a file's name, say):
// every character that cannot be in a name becomes _, a leading digit
// gets a letter before it, and an empty or reserved result becomes
// "register".
func NameFor(s string) string {
	var b strings.Builder
	for i, r := range s {
		switch {
		case r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r):
			if i == 0 && unicode.IsDigit(r) {
				b.WriteString("r_")
			}
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	n := strings.Trim(b.String(), "_")
	if n == "" || reserved[n] {
		return "register"
	}
	if !isName(n) {
		return "register"
	}
	return n
}

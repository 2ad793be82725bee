package register

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"

	"github.com/shopspring/decimal"
)

// CSVOptions say how figures are written to a spreadsheet.
type CSVOptions struct {
	// Places is the number of decimal places money is rounded to (the
	// currency's minor unit; 2 when 0 and Whole is not set).
	Places int32
	// Whole writes money with no decimal places (a currency with no
	// minor unit).
	Whole bool
}

func (o CSVOptions) places() int32 {
	if o.Whole {
		return 0
	}
	if o.Places == 0 {
		return 2
	}
	return o.Places
}

// resultHeader is the names of the columns an analysis adds.
func resultHeader(a *Analysis) []string {
	return []string{"emv", "emv_after", "response_net", "take_response", "rank", "share",
		"contribution_p" + strconv.FormatFloat(100*a.Confidence, 'f', -1, 64)}
}

// resultCells are risk i's figures in the result columns.
func resultCells(a *Analysis, i int, o CSVOptions) []string {
	x := a.Risks[i]
	p := o.places()
	money := func(f Figure) string { return f.Decimal().Round(p).StringFixed(p) }
	net, take := "", ""
	if x.Response != nil {
		net = money(x.Response.Net)
		take = "no"
		if x.Response.Take {
			take = "yes"
		}
	}
	rank, contrib := "", ""
	if x.Rank > 0 {
		rank = strconv.Itoa(x.Rank)
		contrib = decimal.NewFromFloat(x.Contribution).Round(p).StringFixed(p)
	}
	return []string{money(x.EMV), money(x.EMVAfter), net, take, rank,
		strconv.FormatFloat(100*x.Share, 'f', 1, 64) + "%", contrib}
}

// WriteCSV writes the sheet back as it was read, each row with the
// analysis's figures for its risk in columns added at the end: emv,
// emv_after, response_net, take_response (yes or no), rank, share (of the
// total EMV) and contribution_pNN (what the risk adds to the total's
// percentile at the confidence). a must be the analysis of t.Register; nil
// writes the sheet alone.
func (t *Table) WriteCSV(w io.Writer, a *Analysis, o CSVOptions) error {
	cw := csv.NewWriter(w)
	head := append([]string(nil), t.Header...)
	if a != nil {
		head = append(head, resultHeader(a)...)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	for i, row := range t.Rows {
		out := append([]string(nil), row...)
		if a != nil {
			out = append(out, resultCells(a, i, o)...)
		}
		if err := cw.Write(out); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// threeCells writes an amount as low, likely, high and its distribution.
func threeCells(a Amount) (lo, ml, hi, shape string, err error) {
	switch {
	case a.Dist == nil:
		return "", a.Fixed.String(), "", "", nil
	case (a.Shape == "pert" || a.Shape == "triangular") && len(a.Args) == 3:
		return a.Args[0].String(), a.Args[1].String(), a.Args[2].String(), a.Shape, nil
	case a.Shape == "uniform" && len(a.Args) == 2:
		return a.Args[0].String(), "", a.Args[1].String(), a.Shape, nil
	}
	return "", "", "", "", fmt.Errorf("%s cannot be written as low, likely and high; a spreadsheet holds pert, triangular and uniform estimates and fixed figures", a)
}

// WriteCSV writes reg as a spreadsheet ReadCSV reads back: the columns it
// uses (id, title, type, probability, low, likely, high, and owner,
// category, the response's and the schedule's columns where any risk has
// them), the register's other columns, and, when a is not nil, the
// analysis's figures as Table.WriteCSV adds them.
func WriteCSV(w io.Writer, reg *Register, a *Analysis, o CSVOptions) error {
	var hasOwner, hasCategory, hasResponse, hasDelay bool
	var fields []string
	seen := map[string]bool{}
	for _, k := range reg.Risks {
		hasOwner = hasOwner || k.Owner != ""
		hasCategory = hasCategory || k.Category != ""
		hasResponse = hasResponse || k.Response != nil
		hasDelay = hasDelay || k.Delay != nil
		for _, f := range k.Fields {
			if !seen[f.Name] {
				seen[f.Name] = true
				fields = append(fields, f.Name)
			}
		}
	}
	type col struct {
		name string
		cell func(k *Risk) (string, error)
	}
	amount := func(get func(k *Risk) *Amount, part int) func(k *Risk) (string, error) {
		return func(k *Risk) (string, error) {
			a := get(k)
			if a == nil {
				return "", nil
			}
			lo, ml, hi, shape, err := threeCells(*a)
			if err != nil {
				return "", fmt.Errorf("risk %s: %w", k.ID, err)
			}
			return [...]string{lo, ml, hi, shape}[part], nil
		}
	}
	impact := func(k *Risk) *Amount { return &k.Impact }
	residual := func(k *Risk) *Amount {
		if k.Response == nil {
			return nil
		}
		return &k.Response.Impact
	}
	delay := func(k *Risk) *Amount { return k.Delay }
	text := func(f func(k *Risk) string) func(k *Risk) (string, error) {
		return func(k *Risk) (string, error) { return f(k), nil }
	}
	cols := []col{
		{"id", text(func(k *Risk) string { return k.ID })},
		{"title", text(func(k *Risk) string { return k.Title })},
		{"type", text(func(k *Risk) string { return k.Kind.String() })},
		{"probability", text(func(k *Risk) string { return percentText(k.P) })},
		{"low", amount(impact, 0)}, {"likely", amount(impact, 1)}, {"high", amount(impact, 2)}, {"distribution", amount(impact, 3)},
	}
	if hasOwner {
		cols = append(cols, col{"owner", text(func(k *Risk) string { return k.Owner })})
	}
	if hasCategory {
		cols = append(cols, col{"category", text(func(k *Risk) string { return k.Category })})
	}
	if hasResponse {
		resp := func(f func(r *Response) string) func(k *Risk) (string, error) {
			return func(k *Risk) (string, error) {
				if k.Response == nil {
					return "", nil
				}
				return f(k.Response), nil
			}
		}
		cols = append(cols,
			col{"response", resp(func(r *Response) string { return r.Action })},
			col{"response_cost", resp(func(r *Response) string { return r.Cost.String() })},
			col{"residual_probability", resp(func(r *Response) string { return percentText(r.P) })},
			col{"residual_low", amount(residual, 0)}, col{"residual_likely", amount(residual, 1)},
			col{"residual_high", amount(residual, 2)}, col{"residual_distribution", amount(residual, 3)})
	}
	if hasDelay {
		cols = append(cols, col{"schedule_low", amount(delay, 0)}, col{"schedule_likely", amount(delay, 1)},
			col{"schedule_high", amount(delay, 2)}, col{"schedule_distribution", amount(delay, 3)})
	}
	for _, name := range fields {
		cols = append(cols, col{name, text(func(k *Risk) string {
			for _, f := range k.Fields {
				if f.Name == name {
					return f.Value
				}
			}
			return ""
		})})
	}
	cw := csv.NewWriter(w)
	head := make([]string, 0, len(cols)+7)
	for _, c := range cols {
		head = append(head, c.name)
	}
	if a != nil {
		head = append(head, resultHeader(a)...)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	for i := range reg.Risks {
		row := make([]string, 0, len(head))
		for _, c := range cols {
			v, err := c.cell(&reg.Risks[i])
			if err != nil {
				return err
			}
			row = append(row, v)
		}
		if a != nil {
			row = append(row, resultCells(a, i, o)...)
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// percentText writes a probability as a percentage: 0.3 → "30%".
func percentText(p decimal.Decimal) string {
	return p.Shift(2).String() + "%"
}

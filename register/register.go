package register

import (
	"fmt"
	"math"
	"math/big"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/dist"
	"github.com/shopspring/decimal"
)

// Kind says whether a risk is a threat (it would add cost) or an
// opportunity (it would save money).
type Kind uint8

const (
	// Threat is a risk that adds to the cost if it occurs.
	Threat Kind = iota
	// Opportunity is a risk that saves money if it occurs.
	Opportunity
)

// String returns "threat" or "opportunity".
func (k Kind) String() string {
	if k == Opportunity {
		return "opportunity"
	}
	return "threat"
}

// ParseKind reads "threat" or "opportunity", in any case.
func ParseKind(s string) (Kind, bool) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "threat":
		return Threat, true
	case "opportunity":
		return Opportunity, true
	}
	return Threat, false
}

// sign is +1 for a threat and −1 for an opportunity: what the risk adds
// to the total cost per unit of its impact.
func (k Kind) sign() int64 {
	if k == Opportunity {
		return -1
	}
	return 1
}

// Amount is an impact: a fixed figure, or a distribution when Dist is set.
// The zero Amount is the figure 0.
type Amount struct {
	Fixed decimal.Decimal
	Dist  dist.Distribution
	// Shape and Args say how the distribution is written in the
	// language — "pert" and its three arguments, exactly — when that is
	// known (Written); Shape is "" otherwise.
	Shape string
	Args  []decimal.Decimal
}

// FixedAmount is the figure d.
func FixedAmount(d decimal.Decimal) Amount { return Amount{Fixed: d} }

// Uncertain is an amount drawn from d.
func Uncertain(d dist.Distribution) Amount { return Amount{Dist: d} }

// Written is the distribution the language writes as shape(args...), such
// as pert(40000, 60000, 150000), checked as a model's is.
func Written(shape string, args ...decimal.Decimal) (Amount, error) {
	d, err := compiled.Distribution(shape, args)
	if err != nil {
		return Amount{}, err
	}
	return Amount{Dist: d, Shape: shape, Args: append([]decimal.Decimal(nil), args...)}, nil
}

// IsFixed reports whether the amount is a plain figure.
func (a Amount) IsFixed() bool { return a.Dist == nil }

// Mean returns the amount's mean: exact when it is a figure or a
// distribution with a rational mean (PERT, triangular, uniform, normal,
// discrete built from exact decimals); otherwise the float64 mean and
// exact false.
func (a Amount) Mean() (mean *big.Rat, exact bool) {
	if a.Dist == nil {
		return a.Fixed.Rat(), true
	}
	if m, ok := a.Dist.MeanExact(); ok {
		return m, true
	}
	r, ok := new(big.Rat).SetString(fmt.Sprintf("%.17g", a.Dist.Mean()))
	if !ok {
		return new(big.Rat), false
	}
	return r, false
}

// MeanFloat returns the mean in float64.
func (a Amount) MeanFloat() float64 {
	if a.Dist == nil {
		f, _ := a.Fixed.Float64()
		return f
	}
	return a.Dist.Mean()
}

// Variance returns the amount's variance (0 for a figure).
func (a Amount) Variance() float64 {
	if a.Dist == nil {
		return 0
	}
	return a.Dist.Variance()
}

// String writes the amount as the language does: 25000 or
// pert(10000, 20000, 50000).
func (a Amount) String() string {
	switch {
	case a.Dist == nil:
		return a.Fixed.String()
	case a.Shape != "":
		args := make([]string, len(a.Args))
		for i, x := range a.Args {
			args[i] = x.String()
		}
		return a.Shape + "(" + strings.Join(args, ", ") + ")"
	}
	return a.Dist.String()
}

// Field is a column of the register that forkcast does not use itself,
// kept so that it can be written back: "Date raised", "Status", ….
type Field struct {
	Name, Value string
}

// Response is a planned response to a risk: what is done, what it costs,
// and the probability and impact that remain once it is done. For an
// opportunity the response enhances it: the probability and saving that
// result.
type Response struct {
	// Action says what is done.
	Action string
	// Cost is what the response costs, paid whether or not the risk
	// occurs.
	Cost decimal.Decimal
	// P is the probability that remains; Impact the impact that remains.
	P      decimal.Decimal
	Impact Amount
}

// Risk is one entry of a register.
type Risk struct {
	// ID identifies the risk within its register; Title says what it is.
	ID, Title string
	Kind      Kind
	// P is the probability that the risk occurs.
	P decimal.Decimal
	// Impact is the effect on cost if it occurs, written as a positive
	// amount for both kinds: a cost for a threat, a saving for an
	// opportunity.
	Impact Amount
	// Delay is the effect on the schedule in days if it occurs; nil when
	// none is given.
	Delay *Amount
	// Owner and Category are free text.
	Owner, Category string
	// Response is the planned response, nil when there is none.
	Response *Response
	// Fields are the register's other columns for this risk.
	Fields []Field
}

// Register is a list of risks.
type Register struct {
	// Name identifies the register in a model (`register NAME`); Title
	// says what it is about. Either may be empty.
	Name, Title string
	// Currency is the currency of the amounts, for display.
	Currency string
	Risks    []Risk
}

// Problem is something wrong with a register: the risk (its index, or −1
// for the register as a whole), the part at fault, named as the column of
// a spreadsheet is ("id", "probability", "low", "response_cost", …), and
// what is wrong.
type Problem struct {
	Risk  int
	Field string
	Msg   string
}

// Error returns "risk ID: MSG" or the message alone.
func (p Problem) Error() string { return p.Msg }

// Check returns every problem of r: a risk without an id or a title, two
// risks with one id, a probability outside [0, 1], a negative response
// cost, an impact whose mean or variance is not finite.
func (r *Register) Check() []Problem {
	var out []Problem
	seen := map[string]int{}
	add := func(i int, field, format string, a ...any) {
		out = append(out, Problem{Risk: i, Field: field, Msg: fmt.Sprintf(format, a...)})
	}
	for i := range r.Risks {
		k := &r.Risks[i]
		switch {
		case strings.TrimSpace(k.ID) == "":
			add(i, "id", "the risk has no id")
		default:
			if j, dup := seen[k.ID]; dup {
				add(i, "id", "the id %q is used twice (first by risk %d)", k.ID, j+1)
			} else {
				seen[k.ID] = i
			}
		}
		if strings.TrimSpace(k.Title) == "" {
			add(i, "title", "the risk has no title")
		}
		if !isProbability(k.P) {
			add(i, "probability", "the probability %s is outside 0 .. 1 (0%% to 100%%)", k.P)
		}
		if msg := amountProblem(k.Impact); msg != "" {
			add(i, "impact", "the impact %s", msg)
		}
		if k.Delay != nil {
			if msg := amountProblem(*k.Delay); msg != "" {
				add(i, "schedule", "the schedule impact %s", msg)
			}
		}
		if rs := k.Response; rs != nil {
			if rs.Cost.Sign() < 0 {
				add(i, "response_cost", "the response costs %s; a cost is written as a positive amount", rs.Cost)
			}
			if !isProbability(rs.P) {
				add(i, "residual_probability", "the residual probability %s is outside 0 .. 1 (0%% to 100%%)", rs.P)
			}
			if msg := amountProblem(rs.Impact); msg != "" {
				add(i, "residual_impact", "the residual impact %s", msg)
			}
		}
	}
	return out
}

func isProbability(p decimal.Decimal) bool {
	return p.Sign() >= 0 && p.Cmp(decimal.NewFromInt(1)) <= 0
}

// amountProblem says what makes a unusable, or "".
func amountProblem(a Amount) string {
	if a.Dist == nil {
		if f, _ := a.Fixed.Float64(); math.IsInf(f, 0) {
			return "is too large to simulate"
		}
		return ""
	}
	if m, v := a.Dist.Mean(), a.Dist.Variance(); math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprintf("%s has no finite mean and variance", a.Dist)
	}
	return ""
}

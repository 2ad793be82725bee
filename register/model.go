package register

import (
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Registers written in the text language (`register NAME "Title"`, read
// by package lang into tree.Register): their figures are expressions over
// the model's inputs, evaluated here through a compiled.Scope, so that a
// register read from a model is the same plain Register a spreadsheet
// gives.

// FromModel returns the register called name of the compiled model c —
// the model's only register when name is "" — with its figures evaluated
// at c's inputs (as --set or compiled.Model.With left them). A figure
// that cannot be used (a probability outside 0 .. 1, a distribution's
// arguments out of order, an input drawn from a distribution) is reported
// as a tree.Diagnostics error at its position; a name that matches no
// register as a plain error.
func FromModel(c *compiled.Model, name string) (*Register, error) {
	m := c.Source()
	var r *tree.Register
	switch {
	case len(m.Registers) == 0:
		return nil, fmt.Errorf("the model has no register: write one with `register NAME \"Title\"` and its risks beneath it")
	case name == "" && len(m.Registers) > 1:
		return nil, fmt.Errorf("the model has %d registers (%s); say which with its name", len(m.Registers), registerNames(m))
	case name == "":
		r = m.Registers[0]
	default:
		if r = m.Register(name); r == nil {
			return nil, fmt.Errorf("the model has no register %q; its registers: %s", name, registerNames(m))
		}
	}
	reg, ds := fromTree(r, c.Scope())
	if ds.HasErrors() {
		return nil, ds
	}
	reg.Currency = m.Currency
	return reg, nil
}

// Check returns the problems of every register of the compiled model c,
// at their positions (none when every register can be analysed).
// lang.Load runs it, so that a model is reported whole.
func Check(c *compiled.Model) tree.Diagnostics {
	var ds tree.Diagnostics
	for _, r := range c.Source().Registers {
		_, rds := fromTree(r, c.Scope())
		ds = append(ds, rds...)
	}
	return ds
}

func registerNames(m *tree.Model) string {
	names := make([]string, len(m.Registers))
	for i, r := range m.Registers {
		names[i] = r.Name
	}
	return strings.Join(names, ", ")
}

// Uses returns every expression of m's registers, for
// compiled.Options.Uses: an input used only in a register is used.
func Uses(m *tree.Model) []tree.Expr {
	var out []tree.Expr
	add := func(es ...tree.Expr) {
		for _, e := range es {
			if e != nil {
				out = append(out, e)
			}
		}
	}
	for _, r := range m.Registers {
		for _, k := range r.Risks {
			add(k.Prob, k.Impact, k.Delay)
			if rs := k.Response; rs != nil {
				add(rs.Cost, rs.Prob, rs.Impact)
			}
		}
	}
	return out
}

// Resolver gives compiled.CompileWith the values that m's lets take from
// its registers (tree.RegisterRef): the distribution of a register's total
// cost impact or of one risk's, as Total. The register's figures are
// evaluated with the inputs defined above the let.
func Resolver(m *tree.Model) compiled.Resolver {
	return func(e tree.Outside, s *compiled.Scope) (dist.Distribution, error) {
		ref, ok := e.(*tree.RegisterRef)
		if !ok {
			return nil, &compiled.EvalError{Pos: e.Pos(), Msg: fmt.Sprintf("%s is not a register's figure", e)}
		}
		r := m.Register(ref.Register)
		if r == nil {
			return nil, &compiled.EvalError{Pos: ref.RegisterAt, Msg: fmt.Sprintf("no register named %q", ref.Register),
				Hint: "define it with `register " + ref.Register + " \"Title\"` and its risks beneath it"}
		}
		reg, ds := fromTree(r, s)
		if errs := ds.Errors(); len(errs) > 0 {
			d := errs[0]
			return nil, &compiled.EvalError{Pos: d.Pos, Msg: d.Summary, Hint: d.Hint}
		}
		only := -1
		if ref.Risk != "" {
			for i := range reg.Risks {
				if reg.Risks[i].ID == ref.Risk {
					only = i
				}
			}
			if only < 0 {
				return nil, &compiled.EvalError{Pos: ref.RiskAt, Msg: fmt.Sprintf("register %s has no risk %q", r.Name, ref.Risk)}
			}
		}
		return NewTotal(reg, TotalOptions{Risk: only, Responses: ref.Responses, Written: ref.String()})
	}
}

// fromTree evaluates the figures of register r through s.
func fromTree(r *tree.Register, s *compiled.Scope) (*Register, tree.Diagnostics) {
	var ds tree.Diagnostics
	fail := func(err *compiled.EvalError) {
		ds = append(ds, tree.Diagnostic{Severity: tree.Error, Pos: err.Pos, Summary: err.Msg, Hint: err.Hint})
	}
	prob := func(e tree.Expr, what string) decimal.Decimal {
		v, _, err := s.Number(e)
		if err != nil {
			fail(err)
			return decimal.Zero
		}
		if !isProbability(v) {
			ds.Add(e.Pos(), "a probability lies between 0 and 1: write it as 30% or 0.3",
				"the %s %s is outside 0 .. 1 (0%% to 100%%)", what, v)
		}
		return v
	}
	amount := func(e tree.Expr, what string) Amount {
		v, err := s.Value(e)
		if err != nil {
			fail(err)
			return Amount{}
		}
		if v.Dist == nil {
			return FixedAmount(v.Num)
		}
		a := Amount{Dist: v.Dist, Shape: v.Func, Args: v.Args}
		if msg := amountProblem(a); msg != "" {
			ds.Add(e.Pos(), "give it a distribution with a finite mean and variance", "the %s %s", what, msg)
		}
		return a
	}
	reg := &Register{Name: r.Name, Title: r.Label, Risks: make([]Risk, 0, len(r.Risks))}
	for _, t := range r.Risks {
		k := Risk{ID: t.ID, Title: t.Title, Owner: t.Owner, Category: t.Category}
		if t.Opportunity {
			k.Kind = Opportunity
		}
		if t.Prob != nil {
			k.P = prob(t.Prob, "probability")
		}
		if t.Impact != nil {
			k.Impact = amount(t.Impact, "impact")
		}
		if t.Delay != nil {
			d := amount(t.Delay, "delay")
			k.Delay = &d
		}
		if rs := t.Response; rs != nil {
			resp := &Response{Action: rs.Action, P: k.P, Impact: k.Impact}
			if rs.Cost != nil {
				v, _, err := s.Number(rs.Cost)
				switch {
				case err != nil:
					fail(err)
				case v.Sign() < 0:
					ds.Add(rs.Cost.Pos(), "write what the response costs as a positive amount",
						"the response costs %s", v)
				}
				resp.Cost = v
			}
			if rs.Prob != nil {
				resp.P = prob(rs.Prob, "residual probability")
			}
			if rs.Impact != nil {
				resp.Impact = amount(rs.Impact, "residual impact")
			}
			k.Response = resp
		}
		for _, c := range t.Columns {
			k.Fields = append(k.Fields, Field{Name: c.Name, Value: c.Value})
		}
		reg.Risks = append(reg.Risks, k)
	}
	return reg, ds
}

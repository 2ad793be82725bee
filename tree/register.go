package tree

import "strings"

// Register is a risk register as written (`register NAME "Title"`): the
// threats and opportunities of a project, each with figures that are
// expressions over the model's inputs. Package register quantifies it.
type Register struct {
	Name  string
	Label string // the title; may be empty
	Pos   Pos    // where the name is written
	Risks []*Risk
}

// Display is how messages name the register: its title, or its name.
func (r *Register) Display() string {
	if r.Label != "" {
		return r.Label
	}
	return r.Name
}

// Risk is one entry of a register.
type Risk struct {
	// ID identifies the risk within its register; Title says what it is.
	ID, Title string
	// Opportunity marks an opportunity (a saving if it occurs); a risk
	// is a threat otherwise.
	Opportunity bool
	// Prob is the probability that it occurs; Impact its effect on cost
	// if it does (a figure or a distribution, written as a positive
	// amount for both kinds); Delay its effect on the schedule in days,
	// nil when none is given.
	Prob, Impact, Delay Expr
	// Owner and Category are free text.
	Owner, Category string
	// Response is the planned response, nil when none is given.
	Response *RiskResponse
	// Columns are the register's other columns (`column "Heading"
	// "value"`), kept for a spreadsheet.
	Columns []RiskColumn
	// Pos is where the risk's line starts, IDPos where its id is.
	Pos, IDPos Pos
	// ProbPos and ImpactPos are the lines that give the probability and
	// the impact (for messages about them); invalid when missing.
	ProbPos, ImpactPos Pos
}

// RiskResponse is a risk's planned response: what is done, its cost, and
// the probability and impact that remain (nil: unchanged).
type RiskResponse struct {
	Action string
	Cost   Expr // nil: no cost given
	Prob   Expr // the residual probability; nil: the risk's own
	Impact Expr // the residual impact; nil: the risk's own
	Pos    Pos
}

// RiskColumn is one of a register's other columns for a risk.
type RiskColumn struct {
	Name, Value string
}

// Register returns the register with that name, or nil.
func (m *Model) Register(name string) *Register {
	for _, r := range m.Registers {
		if r.Name == name {
			return r
		}
	}
	return nil
}

// RegisterRef is an input taken from a risk register (`register NAME
// total`, `register NAME risk ID`, either followed by `with responses`):
// the register's total cost impact, or one risk's, as a random input.
// Exact analyses take its expected value; simulation draws it. Compiling
// it needs the resolver package register provides (lang.Load supplies
// it).
type RegisterRef struct {
	At       Pos
	Register string
	// Risk is the risk's id; empty for the register's total.
	Risk string
	// Responses says that the planned responses are taken: the residual
	// probabilities and impacts, and the responses' costs.
	Responses bool
	// RegisterAt and RiskAt are where the register's name and the risk's
	// id are written.
	RegisterAt, RiskAt Pos
}

// Pos is where the reference starts (its `register`).
func (e *RegisterRef) Pos() Pos { return e.At }

// String writes the reference as the language does.
func (e *RegisterRef) String() string {
	var b strings.Builder
	b.WriteString("register ")
	b.WriteString(e.Register)
	if e.Risk == "" {
		b.WriteString(" total")
	} else {
		b.WriteString(" risk ")
		if isPlainName(e.Risk) {
			b.WriteString(e.Risk)
		} else {
			b.WriteString(`"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`).Replace(e.Risk) + `"`)
		}
	}
	if e.Responses {
		b.WriteString(" with responses")
	}
	return b.String()
}

// outside marks the expressions whose value a part of the model outside
// the tree's own figures supplies.
func (e *RegisterRef) outside() {}

// Outside is an expression whose value another part of the model
// supplies, such as a register's total (RegisterRef): a random input
// whose expected value exact analyses take and which simulation draws.
// Package compiled compiles it with a resolver it is given.
type Outside interface {
	Expr
	outside()
}

// isPlainName reports whether s is written as a bare name: ASCII letters,
// digits and _, not starting with a digit.
func isPlainName(s string) bool {
	if s == "" {
		return false
	}
	for i, r := range s {
		if r != '_' && (r < 'a' || r > 'z') && (r < 'A' || r > 'Z') && (i == 0 || r < '0' || r > '9') {
			return false
		}
	}
	switch s {
	case "gain", "cost", "rest", "if", "in", "on":
		return false
	}
	return true
}

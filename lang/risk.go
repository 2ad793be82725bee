package lang

import (
	"strings"

	"github.com/forkcast/forkcast/tree"
)

// riskForm is how a risk line is written, for hints.
const riskForm = "a risk line reads `risk tolerance AMOUNT`, the amount in the model's money, e.g. `risk tolerance 250_000`"

// riskLine reads `risk tolerance AMOUNT` into the model. The amount is a
// plain positive number: the risk tolerance of an exponential utility.
func (b *builder) riskLine(l *srcLine) {
	toks := l.lx.toks
	if len(toks) < 2 || toks[1].Type != tokIdent || toks[1].Value != "tolerance" {
		at, n := l.pos(), l.firstWidth()
		if len(toks) > 1 {
			at, n = tokPos(toks[1]), tokWidth(l.lx, toks[1])
		}
		b.errAt(at, n, riskForm, "the risk line gives a risk tolerance: `risk tolerance AMOUNT`")
		return
	}
	rest := toks[2:]
	if len(rest) == 0 {
		b.errAt(tokPos(toks[1]), tokWidth(l.lx, toks[1]), riskForm, "the risk tolerance has no amount")
		return
	}
	amount := rest[0]
	if amount.Type == tokPunct && amount.Value == "-" {
		b.errAt(tokPos(amount), 1, "a risk tolerance is a positive amount of money", "a risk tolerance cannot be negative")
		return
	}
	if amount.Type != tokNumber {
		b.errAt(tokPos(amount), tokWidth(l.lx, amount), riskForm+"; a name or a calculation is not allowed here", "expected a number after `risk tolerance`, found %s", describe(amount))
		return
	}
	if len(rest) > 1 {
		b.errAt(tokPos(rest[1]), tokWidth(l.lx, rest[1]), riskForm, "unexpected %s after the risk tolerance", describe(rest[1]))
		return
	}
	at := tokPos(amount)
	if strings.HasSuffix(amount.Value, "%") {
		b.errAt(at, tokWidth(l.lx, amount), "the risk tolerance is an amount of money, not a share: write e.g. `risk tolerance 250_000`", "a risk tolerance is not a percentage")
		return
	}
	v, msg, hint := parseNumber(amount.Value)
	if msg != "" {
		b.errAt(at, tokWidth(l.lx, amount), hint, "%s", msg)
		return
	}
	if v.Sign() <= 0 {
		b.errAt(at, tokWidth(l.lx, amount), "a risk tolerance is a positive amount of money", "a risk tolerance of 0 means no gamble is ever worth taking; give a positive amount")
		return
	}
	n := tree.WrittenDecimal(at, v, amount.Value)
	b.m.RiskTolerance = &n
}

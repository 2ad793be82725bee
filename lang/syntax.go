package lang

import (
	"errors"
	"fmt"
	"strings"
	"unicode/utf8"

	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// lineKind is what a line is, from its first word.
type lineKind uint8

const (
	kNone        lineKind = iota
	kTitle                // title "..."
	kCurrency             // currency EUR
	kObjective            // objective max|min
	kRisk                 // risk tolerance AMOUNT
	kLet                  // let name = expr [in lo .. hi]
	kUncertainty          // uncertainty name ["Label"]
	kTest                 // test name ["Label"] [on unc [cost expr]]
	kSubtree              // subtree name
	kDecision             // decision "Label"
	kChance               // chance [name] ["Label"]
	kUse                  // use name
	kCorrelate            // correlate name name rho
	kRegister             // register name ["Title"] (register.go)
	kItem                 // "Label" ...: a branch, a state or a reading
	kUnknown              // starts with a word that is no keyword
	kStray                // starts with something that cannot start a line
)

// lineKinds maps a line's first word to its kind. Header keywords come
// first.
var lineKinds = map[string]lineKind{
	"title": kTitle, "currency": kCurrency, "objective": kObjective, "risk": kRisk,
	"let": kLet, "uncertainty": kUncertainty, "test": kTest, "subtree": kSubtree,
	"decision": kDecision, "chance": kChance, "use": kUse, "correlate": kCorrelate,
	"register": kRegister,
}

// topKeywords and nodeKeywords are listed in hints, in this order.
var (
	topKeywords  = []string{"title", "currency", "objective", "let", "uncertainty", "test", "subtree", "decision", "chance", "use", "correlate", "register"}
	nodeKeywords = []string{"decision", "chance", "test", "use"}
)

func isNodeKeyword(w string) bool {
	switch w {
	case "decision", "chance", "test", "use":
		return true
	}
	return false
}

// itemRole says what a quoted-label line is under: it decides the hint
// given for a syntax error.
type itemRole uint8

const (
	roleBranch itemRole = iota
	roleState
	roleReading
)

// form returns the shape of a line of the given kind, for hints.
func form(k lineKind, role itemRole) string {
	switch k {
	case kTitle:
		return "a title line reads `title \"The model's title\"`"
	case kCurrency:
		return "a currency line reads `currency EUR` (any short code)"
	case kObjective:
		return "an objective line reads `objective max` or `objective min`"
	case kLet:
		return "a let line reads `let NAME = VALUE`, optionally followed by `in LOW .. HIGH`"
	case kUncertainty:
		return "an uncertainty line reads `uncertainty NAME \"Label\"` (the label is optional), with its states indented beneath it"
	case kTest:
		return "a test is declared as `test NAME \"Label\" on UNCERTAINTY cost AMOUNT` (label and cost optional) and run in the tree with `test NAME`"
	case kSubtree:
		return "a subtree line reads `subtree NAME`, with one node indented beneath it"
	case kDecision:
		return "a decision line reads `decision \"Label\"`, with its options indented beneath it"
	case kChance:
		return "a chance line reads `chance \"Label\"`, `chance NAME` (a declared uncertainty) or `chance NAME \"Label\"`"
	case kUse:
		return "a use line reads `use NAME`, where NAME is a subtree"
	case kCorrelate:
		return "a correlate line reads `correlate NAME NAME CORRELATION`, two inputs written as distributions and their rank correlation between -1 and 1, e.g. `correlate build labour 0.6`"
	case kItem:
		switch role {
		case roleState:
			return "a state reads `\"Label\" PROBABILITY`, such as `\"On time\" 55%` or `\"Late\" rest`"
		case roleReading:
			return "a reading reads `\"Label\" 90% if \"State A\", 8% if \"State B\"`, or `\"Label\" rest`"
		}
		return "a branch reads `\"Label\"`, then its probability if it is under a plain chance node, then `gain AMOUNT` and/or `cost AMOUNT`"
	}
	return ""
}

// describe names a token the way a message shows it ("label \"x\"",
// "number 5", "word foo", "`=`").
func describe(t lexer.Token) string {
	switch t.Type {
	case lexer.EOF:
		return "end of the line"
	case tokString:
		return "label " + shorten(t.Value)
	case tokNumber:
		return "number " + shorten(t.Value)
	case tokIdent:
		return "word " + shorten(t.Value)
	}
	return "`" + shorten(t.Value) + "`"
}

// the puts an article before a description.
func the(s string) string {
	if strings.HasPrefix(s, "`") {
		return s
	}
	return "the " + s
}

// expectedPhrase turns the first element of participle's expectation into
// words, or "" when it says nothing useful.
func expectedPhrase(msg string) string {
	_, exp, ok := strings.Cut(msg, "(expected ")
	if !ok {
		return ""
	}
	exp = strings.TrimSuffix(exp, ")")
	first := exp
	if strings.HasPrefix(first, `"`) {
		if end := strings.Index(first[1:], `"`); end >= 0 {
			first = first[:end+2]
		}
	} else if i := strings.IndexAny(first, " ()"); i > 0 {
		first = first[:i]
	}
	switch first {
	case `"="`:
		return "`=`"
	case `".."`:
		return "`..` between the low and high ends of the range"
	case `")"`:
		return "a closing `)`"
	case `"("`:
		return "`(`"
	case "<ident>":
		return "a name"
	case "<string>":
		return "a label in double quotes"
	case "GExpr", "ExprValue", "exprValue", "PrimaryValue", "primaryValue":
		return "a number, a name or a calculation"
	case "GGiven":
		return "a likelihood such as `8% if \"Sound\"`"
	case "GLabel":
		return "a label in double quotes"
	}
	return ""
}

// syntaxError turns a participle error on one line into a diagnostic.
func syntaxError(err error, k lineKind, role itemRole, lx lexed) tree.Diagnostic {
	d := tree.Diagnostic{Severity: tree.Error, Hint: form(k, role)}
	var ute *participle.UnexpectedTokenError
	var perr participle.Error
	switch {
	case errors.As(err, &ute):
	case errors.As(err, &perr):
		p := perr.Position()
		d.Pos = tree.At(p.Line, p.Column)
		d.Summary = perr.Message()
		return d
	default:
		d.Summary = err.Error()
		return d
	}
	t := ute.Unexpected
	idx := tokenIndex(lx, t)
	if t.EOF() {
		d.Pos = tree.At(t.Pos.Line, lx.endCol)
		d.Len = 1
	} else {
		d.Pos = tree.At(t.Pos.Line, t.Pos.Column)
		if idx >= 0 {
			d.Len = lx.width[idx]
		}
	}
	exp := expectedPhrase(ute.Message())
	found := describe(t)
	prevNumber := idx > 0 && (lx.toks[idx-1].Type == tokNumber || lx.toks[idx-1].Type == tokIdent || lx.toks[idx-1].Value == ")")
	if num, from, to, ok := strayPercent(lx, idx); ok {
		d.Pos, d.Len = tokPos(lx.toks[from]), lx.toks[to].Pos.Column+lx.width[to]-lx.toks[from].Pos.Column
		d.Summary = "a space between the number and its percent sign"
		if from == idx {
			d.Summary = "the percent sign comes before the number"
		}
		d.Hint = "write the percent sign right after the number: " + shorten(strings.TrimSuffix(num, "%")) + "%"
		return d
	}
	switch {
	case k == kLet && exp == "`..` between the low and high ends of the range":
		d.Summary = fmt.Sprintf("expected `..` between the low and high ends of the range, found %s", the(found))
		d.Hint = "write the range as in LOW .. HIGH, for example in 15% .. 45%"
	case k == kItem && idx >= 2 && lx.toks[1].Type == tokIdent && isNodeKeyword(lx.toks[1].Value):
		d.Pos, d.Len = tokPos(lx.toks[1]), lx.endCol-lx.toks[1].Pos.Column
		d.Summary = "a node goes on a line of its own"
		d.Hint = fmt.Sprintf("put `%s` on the next line, indented under %s", joinFrom(lx, 1), lx.toks[0].Value)
	case t.Value == ".." && k != kLet:
		d.Summary = "a range (LOW .. HIGH) only goes on a let line"
		d.Hint = "give the value itself here; put the range on the let that defines it: let NAME = VALUE in LOW .. HIGH"
	case k == kItem && role == roleBranch && t.Type == tokNumber && prevNumber && !hasKeywordBefore(lx, idx, "gain", "cost"):
		d.Summary = fmt.Sprintf("the amount %s needs `gain` or `cost` before it", shorten(t.Value))
		d.Hint = fmt.Sprintf("write gain %s for money received, or cost %s for money paid", shorten(t.Value), shorten(t.Value))
	case t.Type == tokKeyword && exp == "a name":
		d.Summary = fmt.Sprintf("`%s` is a reserved word and cannot be a name", t.Value)
		d.Hint = "the reserved words are gain, cost, rest, if, in and on; pick another name"
	case k == kItem && role != roleReading && t.Type == tokPunct && strings.Contains("+-*/", t.Value) && idx >= 2 && prevNumber && !hasKeywordBefore(lx, idx, "gain", "cost"):
		d.Summary = "a probability that is a calculation must be in parentheses"
		d.Hint = "write it as (" + joinFrom(lx, 1) + ")"
		if role == roleBranch {
			d.Hint += ", or move the calculation to a `let` and use its name"
		}
	case t.Value == "," && idx > 0 && lx.toks[idx-1].Type == tokNumber && adjacent(lx, idx-1, idx) && idx+1 < len(lx.toks) && lx.toks[idx+1].Type == tokNumber && adjacent(lx, idx, idx+1):
		d.Summary = fmt.Sprintf("a comma inside the number %s,%s", shorten(lx.toks[idx-1].Value), shorten(lx.toks[idx+1].Value))
		d.Hint = "group digits with _ instead: " + shorten(lx.toks[idx-1].Value) + "_" + shorten(lx.toks[idx+1].Value)
	case t.Type == tokIdent && exp == "" && (k == kChance || k == kDecision || k == kTitle || k == kUncertainty || k == kTest):
		d.Summary = fmt.Sprintf("unexpected word %s: a label goes in double quotes", shorten(t.Value))
	case exp != "" && t.EOF():
		d.Summary = fmt.Sprintf("the line ends where %s was expected", exp)
	case exp != "":
		d.Summary = fmt.Sprintf("expected %s, found %s", exp, the(found))
	case t.EOF():
		d.Summary = "the line ends too early"
	default:
		d.Summary = fmt.Sprintf("unexpected %s", found)
		if t.Type == tokIdent || t.Type == tokKeyword {
			if s := suggest(t.Value, []string{"gain", "cost", "rest", "if", "in", "on"}); s != "" {
				d.Summary += fmt.Sprintf(" (did you mean `%s`?)", s)
			}
		}
	}
	return d
}

// strayPercent recognises a % written before its number (%65) or apart
// from it (65 %) at token idx; it returns the number and the span of
// tokens to mark.
func strayPercent(lx lexed, idx int) (num string, from, to int, ok bool) {
	if idx < 0 || lx.toks[idx].Type != tokPunct || lx.toks[idx].Value != "%" {
		return "", 0, 0, false
	}
	next := idx+1 < len(lx.toks) && lx.toks[idx+1].Type == tokNumber
	prev := idx > 0 && lx.toks[idx-1].Type == tokNumber
	switch {
	case next && adjacent(lx, idx, idx+1), next && !prev:
		return lx.toks[idx+1].Value, idx, idx + 1, true
	case prev:
		return lx.toks[idx-1].Value, idx - 1, idx, true
	}
	return "", 0, 0, false
}

func tokenIndex(lx lexed, t lexer.Token) int {
	for i, x := range lx.toks {
		if x.Pos == t.Pos {
			return i
		}
	}
	return -1
}

func hasKeywordBefore(lx lexed, idx int, words ...string) bool {
	for i := 0; i < idx && i < len(lx.toks); i++ {
		for _, w := range words {
			if lx.toks[i].Type == tokKeyword && lx.toks[i].Value == w {
				return true
			}
		}
	}
	return false
}

// adjacent reports whether tokens i and j touch (no space between them).
func adjacent(lx lexed, i, j int) bool {
	return lx.toks[i].Pos.Line == lx.toks[j].Pos.Line && lx.toks[i].Pos.Column+lx.width[i] == lx.toks[j].Pos.Column
}

// joinFrom renders the tokens from index i on, up to a gain/cost keyword.
func joinFrom(lx lexed, i int) string {
	var b strings.Builder
	for ; i < len(lx.toks); i++ {
		t := lx.toks[i]
		if t.Type == tokKeyword && (t.Value == "gain" || t.Value == "cost") {
			break
		}
		if b.Len() > 0 && !adjacent(lx, i-1, i) {
			b.WriteByte(' ')
		}
		b.WriteString(t.Value)
	}
	return b.String()
}

// suggest returns the word in list closest to w, if it is a likely typo.
func suggest(w string, list []string) string {
	budget := suggestBudget
	return suggestWithin(w, list, &budget)
}

// suggestBudget bounds the work of suggestions in one file, in cells of
// the edit-distance table: thousands of unknown names against thousands of
// lets must not take minutes. Past it, names get no suggestion.
const suggestBudget = 20_000_000

// suggestWithin is suggest, spending from *budget.
func suggestWithin(w string, list []string, budget *int) string {
	best, bestD := "", 3
	n := utf8.RuneCountInString(w)
	for _, c := range list {
		if c == w {
			continue
		}
		m := utf8.RuneCountInString(c)
		if n-m >= bestD || m-n >= bestD || m/2 < 1 {
			continue // the lengths alone rule it out
		}
		if *budget -= n * m; *budget < 0 {
			return ""
		}
		d := distance(w, c)
		if d < bestD && d <= m/2 {
			best, bestD = c, d
		}
	}
	return best
}

// distance is the edit distance between two short words, counting a swap
// of two neighbouring letters as one edit (the usual typo: rets for rest).
func distance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	if len(ra) > 64 || len(rb) > 64 {
		return 99
	}
	// Three rows: the one before the previous is needed for swaps.
	prev2 := make([]int, len(rb)+1)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := 1
			if ra[i-1] == rb[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(rb)]
}

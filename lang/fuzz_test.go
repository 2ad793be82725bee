package lang

import (
	"io"
	"reflect"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
)

// designExample is the model from DESIGN.md.
const designExample = `# Sourcing the fare-gate controller for the depots (invented demo data)
title     "Fare-gate controller sourcing"
currency  EUR
objective max

# Inputs. ` + "`in LOW .. HIGH`" + ` is the range sweeps and breakeven searches use.
let licence = 240_000   in 200_000 .. 300_000
let p_slip  = 30%       in 15% .. 45%
let dev     = 380_000

# A named uncertainty: declared once, used wherever it occurs in the tree, so
# value-of-information analysis knows that two chance nodes are one event.
uncertainty schedule "Build schedule"
  "On time"    55%
  "Slips"      p_slip
  "Abandoned"  rest

decision "Sourcing route"
  "Build in house"  cost dev
    chance schedule
      "On time"    gain 1_150_000
      "Slips"      gain   900_000
      "Abandoned"
  "Buy a licence"  cost licence
    chance "Integration"
      "Clean"   80%   gain 1_000_000
      "Rework"  rest  gain   780_000
  "Lease per depot"  gain 12 * 61_000
`

// FuzzLoad checks that no input makes the reader panic, that a model read
// without errors has a tree, that every diagnostic has a position and
// prints, and that the fast path agrees with participle on every line.
func FuzzLoad(f *testing.F) {
	for _, s := range []string{
		designExample, fullExample, doubling(3), string(genModel(3, 2)),
		"", "# nothing\n", "decision \"D\"\n  \"a\"\n",
		"decision \"D\"\n\t\"a\"\n", "decision \"D\n", "let x = rest\n", "let x = ((((1\n",
		"subtree a\n  use a\nuse a\n", "\"a\" 1 + 2 gain -3 cost f(1, 2)\n",
		"test t on u cost 1\n  \"r\" 1% if \"s\", rest\nuncertainty u\n  \"s\" 1\n  \"t\" rest\ntest t\n  \"r\"\n",
		"decision “Go”\n  \"a\":  gain €1,000\n",
	} {
		f.Add([]byte(s))
	}
	for _, s := range badInputSeeds() {
		f.Add([]byte(s))
	}
	ps := getParsers()
	f.Fuzz(func(t *testing.T, src []byte) {
		m, ds := Parse(src, Options{NodeLimit: 20_000})
		if m == nil {
			t.Fatal("nil model")
		}
		if !ds.HasErrors() && m.Root == nil {
			t.Fatal("no errors but no tree")
		}
		if !ds.HasErrors() {
			// What reads without errors compiles, or says why not, and
			// what compiles solves.
			c, cs := compiled.Compile(m)
			if (c == nil) != cs.HasErrors() {
				t.Fatalf("compiled %v with errors %v", c != nil, cs)
			}
			if c != nil {
				c.Rollback()
			}
			ds = append(ds, cs...)
		}
		for _, d := range ds {
			if !d.Pos.IsValid() || d.Summary == "" {
				t.Fatalf("diagnostic without position or text: %#v", d)
			}
		}
		ds.Print(io.Discard, "fuzz.fork", src)
		tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
			if n.Kind == kindUse {
				t.Fatal("placeholder left in the model")
			}
			return true
		})
		for _, l := range scan(src) {
			if len(l.lx.toks) == 0 || l.lx.noParse {
				continue
			}
			ps.parseLine(l)
			fast := fastParse(l.kind, l.lx.toks)
			if fast == nil {
				continue
			}
			slow := &srcLine{num: l.num, indent: l.indent, lx: l.lx}
			ps.slowParse(slow)
			if slow.err != nil || !reflect.DeepEqual(fast, slow.ast) {
				t.Fatalf("line %d: fast path %#v, participle %#v (%v)", l.num, fast, slow.ast, slow.err)
			}
		}
	})
}

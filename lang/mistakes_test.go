package lang

import (
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
)

// chanceModel writes a decision with one option per chance node given, each
// as a plain chance node "label" with the outcome lines given.
func chanceModel(nodes ...string) string {
	var b strings.Builder
	b.WriteString("decision \"D\"\n")
	for i, n := range nodes {
		label, outcomes, _ := strings.Cut(n, "|")
		b.WriteString("  \"option " + string(rune('a'+i)) + "\"\n    chance \"" + label + "\"\n")
		for _, o := range strings.Split(outcomes, ";") {
			b.WriteString("      " + o + "\n")
		}
	}
	return b.String()
}

func TestRepeatedChance(t *testing.T) {
	const (
		a  = `Market|"Strong" 60% gain 10;"Weak" rest`
		a2 = `Market|"Weak" 40%;"Strong" 0.6 gain 5` // the same outcomes, written otherwise
		b  = `Market|"Strong" 50%;"Weak" rest`
		c  = `Weather|"Strong" 60%;"Weak" rest`
	)
	tests := []struct {
		name  string
		nodes []string
		want  []tree.Pos // where the warnings are
	}{
		{"twice", []string{a, a}, []tree.Pos{{Line: 7, Col: 5}}},
		{"written otherwise", []string{a, a2}, []tree.Pos{{Line: 7, Col: 5}}},
		{"three times: one warning", []string{a, a, a}, []tree.Pos{{Line: 7, Col: 5}}},
		{"after another kind", []string{a, b, a}, []tree.Pos{{Line: 11, Col: 5}}},
		{"other probabilities", []string{a, b}, nil},
		{"other labels", []string{a, c}, nil},
		{"once", []string{a}, nil},
	}
	for _, tt := range tests {
		_, ds := Parse([]byte(chanceModel(tt.nodes...)), Options{})
		var got []tree.Pos
		for _, d := range ds {
			if d.Severity == tree.Warning && strings.Contains(d.Summary, "repeats the one on line") {
				got = append(got, d.Pos)
			}
		}
		if len(ds.Errors()) > 0 || len(got) != len(tt.want) || len(got) > 0 && got[0] != tt.want[0] {
			t.Errorf("%s: warnings at %v, want %v (%v)", tt.name, got, tt.want, ds)
		}
	}
	// Named uncertainties are the remedy: no warning.
	src := "uncertainty m \"Market\"\n  \"Strong\" 60%\n  \"Weak\" rest\ndecision \"D\"\n  \"a\"\n    chance m\n      \"Strong\"\n      \"Weak\"\n  \"b\"\n    chance m\n      \"Strong\"\n      \"Weak\"\n"
	if _, ds := Parse([]byte(src), Options{}); len(ds) != 0 {
		t.Errorf("named uncertainty: %v", ds)
	}
}

func TestUncertaintyName(t *testing.T) {
	for in, want := range map[string]string{
		"Market": "market", "Build schedule": "build_schedule", "  Q3 — demand!": "q3_demand",
		"2025 sales": "NAME", "In": "NAME", "chance": "NAME", "!!!": "NAME",
	} {
		if got := uncertaintyName(in); got != want {
			t.Errorf("uncertaintyName(%q) = %q, want %q", in, got, want)
		}
	}
}

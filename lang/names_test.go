package lang

import "testing"

// TestDistance checks the edit distance used for suggestions against
// textbook values.
func TestDistance(t *testing.T) {
	tests := []struct {
		a, b string
		want int
	}{
		// kitten → sitting: the classic Levenshtein example, 3 edits
		// (Levenshtein distance, as worked in most algorithm texts).
		{"kitten", "sitting", 3},
		// A swap of two neighbours is one edit (optimal string alignment).
		{"rets", "rest", 1},
		{"licnece", "licence", 1},
		// OSA does not edit a substring twice: CA → ABC is 3, where the
		// unrestricted Damerau–Levenshtein distance is 2 (the standard
		// example that tells the two apart).
		{"ca", "abc", 3},
		{"", "abc", 3},
		{"same", "same", 0},
	}
	for _, tt := range tests {
		if got := distance(tt.a, tt.b); got != tt.want {
			t.Errorf("distance(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
	}
}

func TestSuggest(t *testing.T) {
	tests := []struct {
		w    string
		list []string
		want string
	}{
		{"rets", []string{"p", "rest"}, "rest"},
		{"prize", []string{"price", "prise_total"}, "price"},
		{"x", []string{"rest"}, ""},              // too far from anything
		{"cost_each", []string{"cost_each"}, ""}, // the word itself is no suggestion
	}
	for _, tt := range tests {
		if got := suggest(tt.w, tt.list); got != tt.want {
			t.Errorf("suggest(%q) = %q, want %q", tt.w, got, tt.want)
		}
	}
}

package compiled_test

import (
	"math/rand"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
)

// WithInto gives the model With gives, whatever the model it reuses
// changed before: for random models, a run of changes from one model c,
// each made reusing the one before (two in three set money inputs only,
// the third probabilities too, so that the arrays are taken over, refused
// and left), solves byte for byte as c.With of the same settings, and c's
// own solution is unchanged all along.
func TestWithIntoIsWith(t *testing.T) {
	rng := rand.New(rand.NewSource(6))
	n := 200
	if testing.Short() {
		n = 40
	}
	for it := 0; it < n; it++ {
		m := randomModel(rng)
		c := mustCompile(t, m)
		base, _ := eval.Solve(c)
		baseJSON := solvedJSON(t, base)
		var prev *compiled.Model
		for round := 0; round < 8; round++ {
			set := randomSettings(rng)
			var settings []compiled.Setting
			for _, name := range []string{"a0", "a1", "a2", "p0", "p1", "b"} {
				v, ok := set[name]
				if !ok || (round%3 != 2 && name[0] == 'p') {
					continue // two rounds in three move money only
				}
				s, err := c.Set(name, v)
				if err != nil {
					t.Fatal(err)
				}
				settings = append(settings, s)
			}
			want, err := c.With(settings...)
			if err != nil {
				t.Fatal(err)
			}
			got, err := c.WithInto(prev, settings...)
			if err != nil {
				t.Fatal(err)
			}
			ws, _ := eval.Solve(want)
			gs, _ := eval.Solve(got)
			if a, b := solvedJSON(t, gs), solvedJSON(t, ws); a != b {
				t.Fatalf("model %d round %d: WithInto\n%s\nWith\n%s", it, round, a, b)
			}
			if got := solvedJSON(t, base); got != baseJSON {
				t.Fatalf("model %d round %d: the model changes were made from changed", it, round)
			}
			prev = got
		}
	}
}

package main

import (
	"encoding/json"
	"strings"
	"testing"
)

// Switches are exact or approximate, never both; an exact switch that is
// no finite decimal is shown as a fraction beside its rounded decimal, and
// the JSON carries the fraction.
func TestBreakevenExactness(t *testing.T) {
	// By hand (examples/release.fork, invented data; objective min): with
	// a prior defect rate p below 11.25%, deciding without the test ships
	// at 400,000 p. Testing costs 12,000, reworks after an alarm
	// (45,000 × P(alarm) = 45,000 × (0.08 + 0.82 p)) and ships after a
	// clear reading (400,000 × 0.1 p): 15,600 + 76,900 p. Equal at
	// p = 15,600 / 323,100 = 52/1077 ≈ 4.8282%. Above 11.25% deciding
	// without the test reworks at 45,000: equal at p = 29,400 / 76,900 =
	// 294/769 ≈ 38.2315%.
	code, out, errs := forkcast(t, "", "breakeven", "example:release", "--vary", "p_defect")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{
		`Switch at p_defect = 52/1077 (exact; ≈ 4.8282%): "Decide without testing" below, "Run the soak test" above`,
		`Switch at p_defect = 294/769 (exact; ≈ 38.2315%): "Run the soak test" below, "Decide without testing" above`,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "≈4.8282% (exact)") || strings.Contains(out, "= ≈") {
		t.Errorf("a switch marked both approximate and exact:\n%s", out)
	}
	_, out, _ = forkcast(t, "", "breakeven", "example:release", "--vary", "p_defect", "--json")
	var v struct {
		Switches []struct {
			At       string `json:"at"`
			Exact    bool   `json:"exact"`
			Fraction string `json:"fraction"`
		} `json:"switches"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if len(v.Switches) != 2 || v.Switches[0].Fraction != "52/1077" || v.Switches[1].Fraction != "294/769" ||
		!strings.HasPrefix(v.Switches[0].At, "0.048282265552460538") || !v.Switches[0].Exact {
		t.Errorf("switches %+v", v.Switches)
	}
	_, out, _ = forkcast(t, "", "breakeven", "example:sourcing", "--vary", "licence", "--json")
	if !strings.Contains(out, `"fraction": "301000"`) {
		t.Errorf("the exact whole-number switch has no fraction:\n%s", out)
	}

	// A probability used twice on one path enters the value as its
	// square: "Double" is worth 100 p², "Safe" 30, equal at p = √0.3 ≈
	// 54.7723%, which no fraction is: the switch is approximate.
	sq := writeFile(t, "square.fork", `let p = 50% in 10% .. 90%
decision "d"
  "Double"
    chance "first"
      "hit"   p
        chance "second"
          "hit"   p     gain 100
          "miss"  rest
      "miss"  rest
  "Safe"  gain 30
`)
	code, out, errs = forkcast(t, "", "breakeven", sq, "--vary", "p")
	if code != 0 || !strings.Contains(out, `Switch at p ≈ 54.7723% (approximate, to `) || strings.Contains(out, "(exact") {
		t.Errorf("exit %d, %s:\n%s", code, errs, out)
	}
	_, out, _ = forkcast(t, "", "breakeven", sq, "--vary", "p", "--json")
	if !strings.Contains(out, `"exact": false`) || strings.Contains(out, `"fraction"`) {
		t.Errorf("an approximate switch in JSON:\n%s", out)
	}
}

package main

import (
	"encoding/json"
	"strings"
	"testing"
)

func TestVOIRelease(t *testing.T) {
	code, out, errs := forkcast(t, "", "voi", "example:release")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// By hand (examples/release.fork, invented data): deciding without
	// the test costs 45,000; with it 30,980 (12,000 + 0.244·45,000 +
	// 0.756·(0.02/0.756)·400,000); EVSI 45,000 − 18,980 = 26,020.
	for _, want := range []string{
		"everything uncertain, together          21,980.00 EUR",
		"EVSI: what the test's information is worth         26,020.00 EUR",
		"expected net saving of testing (EVSI − cost)       14,020.00 EUR",
		"EVPI of defect against deciding without the test   36,000.00 EUR",
		"efficiency of the test (EVSI / EVPI)                       72.3%",
		"P(reading)                             24.4%    75.6%",
		"Recommendation: run the test: it is expected to save 14,020.00 EUR after its cost.",
		"An upper bound",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestVOIJSON(t *testing.T) {
	code, out, errs := forkcast(t, "", "voi", "example:release", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var v struct {
		EVPI          string `json:"evpi"`
		Uncertainties []struct {
			Name string `json:"name"`
			EVPI string `json:"evpi"`
		} `json:"uncertainties"`
		Tests []struct {
			Name     string `json:"name"`
			Readings []struct {
				Label       string   `json:"label"`
				Probability string   `json:"probability"`
				Posterior   []string `json:"posterior"`
			} `json:"readings"`
			Sites []struct {
				EVSI           string  `json:"evsi"`
				Efficiency     *string `json:"efficiency"`
				Recommendation string  `json:"recommendation"`
			} `json:"sites"`
		} `json:"tests"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// Exact: the tree is rolled back on joint probabilities, with no
	// rounded posterior on the way.
	if v.EVPI != "21980" {
		t.Errorf("evpi %q", v.EVPI)
	}
	if len(v.Uncertainties) != 1 || v.Uncertainties[0].Name != "defect" || v.Uncertainties[0].EVPI != v.EVPI {
		t.Errorf("uncertainties %+v", v.Uncertainties)
	}
	if len(v.Tests) != 1 || len(v.Tests[0].Sites) != 1 {
		t.Fatalf("tests %+v", v.Tests)
	}
	tv := v.Tests[0]
	if tv.Readings[0].Probability != "0.244" || !strings.HasPrefix(tv.Readings[0].Posterior[0], "0.7377049180327868852459016393442622950819672131147") {
		t.Errorf("readings %+v", tv.Readings)
	}
	s := tv.Sites[0]
	if !strings.HasPrefix(s.EVSI, "26019.99999999999999999999999999999999999999999") && !strings.HasPrefix(s.EVSI, "26020") {
		t.Errorf("evsi %q", s.EVSI)
	}
	if s.Efficiency == nil || s.Recommendation != "test" {
		t.Errorf("site %+v", s)
	}
}

func TestVOINoTests(t *testing.T) {
	code, out, _ := forkcast(t, "", "voi", "example:sourcing")
	// By hand (examples/sourcing.fork, invented data): with every chance
	// node known, "Lease" met or "Buy" clean gives 1,000,000 (probability
	// 1 − 0.15·0.3); otherwise the better of 850,000 and building
	// (880,000 on time): 993,857.50 against 964,000.
	if code != 0 || !strings.Contains(out, "everything uncertain, together   29,857.50 EUR") || !strings.Contains(out, "declares no `test`") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestBreakevenCLI(t *testing.T) {
	code, out, errs := forkcast(t, "", "breakeven", "example:sourcing", "--vary", "licence")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// By hand: buying is worth 1,265,000 − licence, leasing 964,000.
	for _, want := range []string{
		`Switch at licence = 301,000 (exact): "Buy a licence" below, "Lease the service" above`,
		"Lease the service   964,000.00 EUR",
		"250,000 .. 301,000   Buy a licence",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	code, out, _ = forkcast(t, "", "breakeven", "--json", "--vary", "Supplier service level/Met", "example:sourcing")
	var v struct {
		Switches []struct {
			At    string `json:"at"`
			Exact bool   `json:"exact"`
			Below string `json:"below"`
		} `json:"switches"`
		Adjust string `json:"adjust"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil || code != 0 {
		t.Fatalf("exit %d, %v\n%s", code, err, out)
	}
	// By hand: leasing is worth 760,000 + 240,000 m against 955,000.
	if len(v.Switches) != 1 || v.Switches[0].At != "0.8125" || !v.Switches[0].Exact || v.Switches[0].Below != "Buy a licence" {
		t.Errorf("switches %+v", v.Switches)
	}
	if !strings.Contains(v.Adjust, `"Missed"`) {
		t.Errorf("adjust %q", v.Adjust)
	}
	code, out, _ = forkcast(t, "", "breakeven", "example:release", "--vary", "p_defect", "--in", "30%..40%", "--at", "Before release")
	if code != 0 || !strings.Contains(out, `"Run the soak test" below, "Decide without testing" above`) {
		t.Errorf("exit %d:\n%s", code, out)
	}
	code, out, _ = forkcast(t, "", "breakeven", "example:sourcing", "--vary", "dev_cost", "--in", "600_000..700_000")
	if code != 0 || !strings.Contains(out, `No switch: "Lease the service" is best over the whole range.`) {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestBreakevenErrors(t *testing.T) {
	bad := writeFile(t, "bad.fork", "decision \"d\"\n  \"a\"  cost nope\n")
	for _, c := range []struct {
		args   []string
		code   int
		stderr string
	}{
		{[]string{"breakeven", "example:sourcing"}, 2, "breakeven needs --vary"},
		{[]string{"breakeven", "example:sourcing", "--vary", "nonesuch"}, 2, `no parameter "nonesuch"`},
		{[]string{"breakeven", "example:sourcing", "--vary", "delivery:Late", "--in", "0..2"}, 2, "[0, 1]"},
		{[]string{"breakeven", "example:sourcing", "--vary", "licence", "--in", "3..x"}, 2, `"x" is not a number`},
		{[]string{"breakeven", "example:sourcing", "--vary", "benefit"}, 2, "has no range"},
		{[]string{"breakeven", "example:sourcing", "--vary", "licence", "--at", "Nowhere"}, 2, `no decision labelled "Nowhere"`},
		{[]string{"breakeven", bad, "--vary", "x"}, 1, "unknown name"},
		{[]string{"voi", bad}, 1, "unknown name"},
		{[]string{"voi"}, 2, "voi needs a model FILE"},
	} {
		code, _, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(errs, c.stderr) {
			t.Errorf("%v: exit %d, stderr:\n%s\nwant exit %d and %q", c.args, code, errs, c.code, c.stderr)
		}
	}
}

// A budget reached names the flag that raises it, not the library's
// option; so does a request the model cannot answer as it stands.
func TestMessagesNameFlags(t *testing.T) {
	for _, c := range []struct {
		args   []string
		stream string // "stdout" or "stderr"
		code   int
		want   string
	}{
		{[]string{"breakeven", "example:sourcing", "--vary", "licence", "--max-samples", "5"}, "stderr", 1, "more than 5 rollbacks (raise --max-samples to allow more)"},
		// Past the budget the figures not computed are listed as such;
		// the analysis still ends with what it has.
		{[]string{"voi", "example:sourcing", "--max-work", "5"}, "stdout", 0, "not computed: the analysis is over its work budget: more than 5 units of work (EVPI of delivery) (raise --max-work to allow more)"},
		{[]string{"voi", "example:release", "--max-scenarios", "1"}, "stdout", 0, "more than 1 joint states of the named uncertainties (raise --max-scenarios to allow more)"},
		{[]string{"voi", "example:release", "--max-scenarios", "1", "--json"}, "stdout", 0, "(raise --max-scenarios to allow more)"},
		{[]string{"breakeven", "example:sourcing", "--vary", "benefit"}, "stderr", 2, "has no range: give --in LOW..HIGH, or write `let benefit = ... in LOW .. HIGH`"},
		{[]string{"breakeven", "example:sourcing", "--vary", "licence", "--max-samples", "0"}, "stderr", 2, "--max-samples 0: give a number of at least 1"},
	} {
		code, out, errs := forkcast(t, "", c.args...)
		got := map[string]string{"stdout": out, "stderr": errs}[c.stream]
		if code != c.code || !strings.Contains(got, c.want) || strings.Contains(out+errs, "Options.") {
			t.Errorf("%v: exit %d, stdout:\n%s\nstderr:\n%s\nwant exit %d and %q on %s", c.args, code, out, errs, c.code, c.want, c.stream)
		}
	}
}

// delayModel is a launch decision with a market test whose branch also
// carries a delay cost (invented data). The figures, by hand (objective
// max; demand High 40% / Low 60%; launching pays 200,000 if High and
// costs 85,000 if Low; the test reads "Good" with probability 94% if High
// and 20% if Low; it costs 5,000 and the branch that runs it also costs
// DELAY):
//
//   - deciding now: launch, 0.4 × 200,000 − 0.6 × 85,000 = 29,000;
//   - after "Good" (joint 0.376 High, 0.12 Low) launching adds
//     0.376 × 200,000 − 0.12 × 85,000 = 65,000; after "Poor" (joint
//     0.024, 0.48) it would add 4,800 − 40,800 < 0, so do not launch:
//     with the test's information the value is 65,000;
//   - EVSI, the information alone: 65,000 − 29,000 = 36,000 (and not
//     36,000 − DELAY, which counts the delay as part of the information);
//   - EVPI at the decision: knowing the demand, launch only if High:
//     0.4 × 200,000 = 80,000, so 80,000 − 29,000 = 51,000; efficiency
//     36,000 / 51,000 = 70.6%;
//   - net gain of testing: 36,000 − 5,000 − DELAY; the most worth paying
//     for the test: 36,000 − DELAY.
const delayModel = `title "Market test with a launch delay"
currency EUR

uncertainty demand "Demand"
  "High"  40%
  "Low"   rest

test probe "Market test" on demand cost 5_000
  "Good"  94% if "High", 20% if "Low"
  "Poor"  rest

subtree launch
  decision "Launch"
    "Launch"
      chance demand
        "High"  gain 200_000
        "Low"   cost 85_000
    "Do not launch"

decision "First"
  "Decide now"
    use launch
  "Test first"  cost DELAY
    test probe
      "Good"
        use launch
      "Poor"
        use launch
`

// EVSI on a testing branch that carries other costs is the information
// alone, reported apart from those costs, each figure labelled for what
// it is.
func TestVOIOtherCosts(t *testing.T) {
	p := writeFile(t, "delay.fork", strings.Replace(delayModel, "DELAY", "15_000", 1))
	code, out, errs := forkcast(t, "", "voi", p)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// DELAY = 15,000: net gain 16,000; the most worth paying 21,000.
	for _, want := range []string{
		"expected value deciding without the test                         29,000.00 EUR",
		"expected value with the test's information, before any cost      65,000.00 EUR",
		"EVSI: what the test's information is worth                       36,000.00 EUR",
		"other cost on the testing branch (not the test's)                15,000.00 EUR",
		"the test's cost                                                   5,000.00 EUR",
		"expected net gain of testing (EVSI − test's cost − other cost)   16,000.00 EUR",
		"the most worth paying for the test, given the other cost         21,000.00 EUR",
		"EVPI of demand against deciding without the test                 51,000.00 EUR",
		"efficiency of the test (EVSI / EVPI)                                     70.6%",
		"Recommendation: run the test: it is expected to gain 16,000.00 EUR after its cost and the other cost on its branch.",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = forkcast(t, "", "voi", p, "--json")
	var v struct {
		Tests []struct {
			Sites []map[string]any `json:"sites"`
		} `json:"tests"`
	}
	if err := json.Unmarshal([]byte(out), &v); err != nil || len(v.Tests) != 1 || len(v.Tests[0].Sites) != 1 {
		t.Fatalf("%v:\n%s", err, out)
	}
	// In the objective's terms (a payoff under max): the delay is −15,000.
	want := map[string]string{"value_without": "29000", "value_with_information": "65000", "other_cash": "-15000",
		"value_with_before_cost": "50000", "value_with_after_cost": "45000", "evsi": "36000", "test_cost": "5000",
		"net_gain": "16000", "most_to_pay": "21000", "evpi": "51000", "recommendation": "test"}
	for k, w := range want {
		if got := v.Tests[0].Sites[0][k]; got != w {
			t.Errorf("%s = %v, want %s", k, got, w)
		}
	}

	// DELAY = 35,000: the information is still worth 36,000, but after the
	// delay the test is worth at most 1,000, less than its 5,000.
	p = writeFile(t, "delay.fork", strings.Replace(delayModel, "DELAY", "35_000", 1))
	_, out, _ = forkcast(t, "", "voi", p)
	for _, want := range []string{
		"EVSI: what the test's information is worth                       36,000.00 EUR",
		"expected net gain of testing (EVSI − test's cost − other cost)   -4,000.00 EUR",
		"Recommendation: decide without the test: its information is worth 36,000.00 EUR; with the other cost on its branch, the test is worth paying at most 1,000.00 EUR, less than its cost of 5,000.00 EUR.",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

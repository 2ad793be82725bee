package main

import (
	"bytes"
	"encoding/xml"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite testdata/golden from the current output")

// golden compares out with testdata/golden/name, or rewrites it with
// -update.
func golden(t *testing.T, name, out string) {
	t.Helper()
	p := filepath.Join("testdata", "golden", name)
	if *update {
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(out), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(p)
	if err != nil {
		t.Fatalf("%v (run go test ./cmd/forkcast -run %s -update to create it)", err, t.Name())
	}
	if out != string(want) {
		t.Errorf("output differs from %s (-update rewrites it):\n%s", p, out)
	}
}

// The outputs of sensitivity and sweep on the bundled examples. Their
// figures follow from the examples' own numbers; the ones checked by hand:
// sourcing, licence: Buy is worth 1,265,000 − licence against 964,000 for
// the lease, so they switch at 301,000 and at 250,000 Buy is worth
// 1,015,000 (swing 51,000); the two-way map's boundary is
// lease_fee = licence + 39,000 (the lease is worth 1,304,000 − lease_fee).
func TestSensitivityAndSweepGolden(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
	}{
		{"sensitivity_sourcing.txt", []string{"sensitivity", "example:sourcing"}},
		{"sensitivity_sourcing_pct.json", []string{"sensitivity", "example:sourcing", "--pct", "20", "--json"}},
		{"sensitivity_release.txt", []string{"sensitivity", "example:release", "--vary", "defect:Defective=5%..40%", "--vary", "recall=100_000..800_000"}},
		{"sensitivity_expansion_at.txt", []string{"sensitivity", "example:expansion", "--vary", "demand:Strong=25%..55%", "--pct", "10%", "--at", "Opening plan"}},
		{"sweep_licence.txt", []string{"sweep", "example:sourcing", "--vary", "licence", "--steps", "8"}},
		{"sweep_licence.csv", []string{"sweep", "example:sourcing", "--vary", "licence", "--steps", "4", "--csv"}},
		{"sweep_release.json", []string{"sweep", "example:release", "--vary", "p_defect", "--in", "0..50%", "--steps", "5", "--json"}},
		{"map_sourcing.txt", []string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "lease_fee=250_000..450_000", "--in", "250_000..450_000", "--steps", "10"}},
		{"map_sourcing.csv", []string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "lease_fee=250_000..450_000", "--steps", "2", "--csv"}},
		{"map_sourcing.json", []string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "lease_fee=250_000..450_000", "--steps", "2", "--json"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := forkcast(t, "", c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			golden(t, c.name, out)
			_, again, _ := forkcast(t, "", c.args...)
			if again != out {
				t.Errorf("a second run printed other bytes")
			}
		})
	}
}

func TestSensitivityUsage(t *testing.T) {
	dir := t.TempDir()
	chanceOnly := writeFile(t, "weather.fork", "let x = 150 in 100 .. 200\nchance \"Weather\"\n  \"Sun\"  40%  gain x\n  \"Rain\" rest gain 50\n")
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{"sensitivity", "example:sourcing", "--vary", "nope"}, exitUsage, "the parameters are benefit, dev_cost, licence, lease_fee, p_late"},
		{[]string{"sensitivity", "example:sourcing", "--vary", "licence=1..x"}, exitUsage, "--vary"},
		{[]string{"sensitivity", "example:sourcing", "--pct", "-5"}, exitUsage, "above 0"},
		{[]string{"sensitivity", "example:sourcing", "--pct", "abc"}, exitUsage, "--pct"},
		{[]string{"sensitivity", "example:sourcing", "--tornado", "t.pdf"}, exitUsage, ".svg or .png"},
		{[]string{"sensitivity", "example:sourcing", "--tornado", "-"}, exitUsage, "not standard output"},
		{[]string{"sensitivity", "example:sourcing", "--spider", dir + "/"}, exitUsage, ".svg or .png"},
		{[]string{"sensitivity", "example:expansion"}, exitUsage, "--pct N"},
		{[]string{"sensitivity", "example:sourcing", "--at", "Nowhere"}, exitUsage, "no decision labelled"},
		{[]string{"sensitivity", "example:sourcing", "--vary", "delivery:Late=0.5..1.5"}, exitUsage, "[0, 1]"},
		{[]string{"sensitivity", "example:sourcing", "--max-samples", "3"}, exitModel, "--max-samples"},
		{[]string{"sensitivity", chanceOnly}, exitOK, "40.00"},
		{[]string{"sensitivity", chanceOnly}, exitOK, "largest first (expected value at each end)\n"},
		{[]string{"sweep", "example:sourcing"}, exitUsage, "needs --vary"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "p_late", "--vary", "dev_cost"}, exitUsage, "got 3"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--in", "1..2", "--in", "3..4"}, exitUsage, "2 --in for 1 --vary"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence=1..2", "--in", "3..4"}, exitUsage, "already has a range"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--csv", "--json"}, exitUsage, "choose one"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--steps", "0"}, exitUsage, "--steps"},
		{[]string{"sweep", "example:sourcing", "--vary", "benefit"}, exitUsage, "no range"},
		{[]string{"sweep", chanceOnly, "--vary", "x"}, exitUsage, "forkcast sensitivity " + chanceOnly + " --vary x --spider"},
		{[]string{"sensitivity", "example:sourcing", "--vary", "licence=300_000..300_000"}, exitUsage, "is empty: give a LOW below HIGH"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--in", "5..5"}, exitUsage, "is empty"},
		{[]string{"sweep", "example:sourcing", "--vary", "p_late=0..150%", "--steps", "2"}, exitOK, "cut from 150% to 55%"},
		{[]string{"sensitivity", "example:sourcing", "--set", "licnce=1"}, exitUsage, `did you mean "licence"`},
		{[]string{"sensitivity", "example:sourcing", "--set", "licence=abc"}, exitUsage, "is not a number"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "licence"}, exitUsage, "two different"},
		{[]string{"sweep", "example:sourcing", "--vary", "licence", "--vary", "p_late", "--steps", "5000"}, exitUsage, "at most 999"},
	} {
		code, out, errs := forkcast(t, "", c.args...)
		if code != c.code || !strings.Contains(out+errs, c.want) {
			t.Errorf("%v: exit %d, want %d with %q:\n%s%s", c.args, code, c.code, c.want, out, errs)
		}
	}
}

// The chart flags write well-formed SVG and a PNG, through a file that
// appears whole, and say so on standard error.
func TestSensitivityChartFiles(t *testing.T) {
	dir := t.TempDir()
	tornado, spider := filepath.Join(dir, "t.svg"), filepath.Join(dir, "s.png")
	code, _, errs := forkcast(t, "", "sensitivity", "example:sourcing", "--pct", "20", "--tornado", tornado, "--spider", spider)
	if code != 0 || !strings.Contains(errs, "wrote "+tornado) || !strings.Contains(errs, "wrote "+spider) {
		t.Fatalf("exit %d: %s", code, errs)
	}
	svg, err := os.ReadFile(tornado)
	if err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(bytes.NewReader(svg))
	for {
		if _, err := dec.Token(); err == io.EOF {
			break
		} else if err != nil {
			t.Fatalf("tornado SVG: %v", err)
		}
	}
	png, err := os.ReadFile(spider)
	if err != nil || !bytes.HasPrefix(png, []byte("\x89PNG")) {
		t.Errorf("spider PNG: %v, %d bytes", err, len(png))
	}
	for _, args := range [][]string{
		{"sweep", "example:sourcing", "--vary", "licence", "--chart", filepath.Join(dir, "sweep.svg")},
		{"sweep", "example:sourcing", "--vary", "licence", "--vary", "lease_fee=250_000..450_000", "--steps", "4", "--chart", filepath.Join(dir, "map.png")},
	} {
		if code, _, errs := forkcast(t, "", args...); code != 0 {
			t.Errorf("%v: exit %d: %s", args, code, errs)
		}
	}
	// Every chart is the same, byte for byte, when drawn again.
	for _, args := range [][]string{
		{"sensitivity", "example:sourcing", "--pct", "20", "--tornado", "%s.svg"},
		{"sensitivity", "example:release", "--vary", "defect:Defective=5%..40%", "--spider", "%s.svg"},
		{"sweep", "example:sourcing", "--vary", "licence", "--chart", "%s.svg"},
		{"sweep", "example:sourcing", "--vary", "licence", "--vary", "lease_fee=250_000..450_000", "--steps", "6", "--chart", "%s.svg"},
	} {
		var drawn [][]byte
		for run := 0; run < 2; run++ {
			a := append([]string(nil), args...)
			name := filepath.Join(dir, fmt.Sprintf("again%d", run))
			a[len(a)-1] = fmt.Sprintf(a[len(a)-1], name)
			if code, _, errs := forkcast(t, "", a...); code != 0 {
				t.Fatalf("%v: exit %d: %s", a, code, errs)
			}
			b, err := os.ReadFile(name + ".svg")
			if err != nil {
				t.Fatal(err)
			}
			drawn = append(drawn, b)
		}
		if !bytes.Equal(drawn[0], drawn[1]) || len(drawn[0]) == 0 {
			t.Errorf("%v: two runs drew different charts", args)
		}
	}
	// A directory where the chart should go: refused.
	if err := os.Mkdir(filepath.Join(dir, "d.svg"), 0o755); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := forkcast(t, "", "sensitivity", "example:sourcing", "--tornado", filepath.Join(dir, "d.svg")); code != exitModel || !strings.Contains(errs, "is a directory") {
		t.Errorf("a directory as the tornado: exit %d: %s", code, errs)
	}
}

// --set answers as editing the let line would: the same JSON, byte for
// byte, from sensitivity and from a sweep.
func TestSensitivitySetAsEdited(t *testing.T) {
	src, err := os.ReadFile("../../examples/sourcing.fork")
	if err != nil {
		t.Fatal(err)
	}
	edited := strings.Replace(string(src), "let licence   = 310_000", "let licence   = 280_000", 1)
	edited = strings.Replace(edited, "let benefit   = 1_400_000", "let benefit   = 1_500_000", 1)
	if edited == string(src) {
		t.Fatal("the example's let lines changed; fix the test")
	}
	file := writeFile(t, "edited.fork", edited)
	for _, args := range [][]string{
		{"sensitivity", "--pct", "20", "--json"},
		{"sweep", "--vary", "lease_fee=250_000..450_000", "--steps", "5", "--json"},
	} {
		_, want, errs := forkcast(t, "", append(append([]string{}, args...), file)...)
		code, got, errs2 := forkcast(t, string(src), append(append([]string{}, args...), "--set", "licence=280_000", "--set", "benefit=1_500_000", "-")...)
		if code != 0 || got != want || want == "" {
			t.Errorf("%v: --set and the edited file differ (exit %d):\n%s\n%s\n%s%s", args, code, got, want, errs, errs2)
		}
	}
}

package lang

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite testdata/bad/*.diag from the current output")

// badInputs returns the text of every bad input.
func badInputs(t *testing.T) []string {
	out := badInputSeeds()
	if len(out) == 0 {
		t.Fatal("no bad inputs found")
	}
	return out
}

// badInputSeeds returns the text of every bad input (none if unreadable).
func badInputSeeds() []string {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.fork"))
	var out []string
	for _, f := range files {
		if b, err := os.ReadFile(f); err == nil {
			out = append(out, string(b))
		}
	}
	return out
}

// TestBadInputs runs every testdata/bad/NAME.fork through Load and compares
// what tree.Diagnostics.Print writes with NAME.diag, exactly.
func TestBadInputs(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.fork"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 25 {
		t.Fatalf("found %d bad inputs, want at least 25", len(files))
	}
	for _, file := range files {
		name := filepath.Base(file)
		t.Run(strings.TrimSuffix(name, ".fork"), func(t *testing.T) {
			src, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			_, ds := Load(src, Options{})
			if len(ds) == 0 {
				t.Fatalf("%s: no diagnostics", name)
			}
			var got bytes.Buffer
			ds.Print(&got, name, src)
			golden := strings.TrimSuffix(file, ".fork") + ".diag"
			if *update {
				if err := os.WriteFile(golden, got.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(golden)
			if err != nil {
				t.Fatalf("%v (run go test ./lang -run TestBadInputs -update to create it)", err)
			}
			if got.String() != string(want) {
				t.Errorf("diagnostics differ\n--- got\n%s--- want\n%s", got.String(), want)
			}
		})
	}
}

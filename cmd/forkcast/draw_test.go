package main

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

func TestDraw(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile("../../examples/expansion.fork")
	if err != nil {
		t.Fatal(err)
	}
	svgOK := func(t *testing.T, b []byte) {
		t.Helper()
		if !bytes.Contains(b, []byte("</svg>")) || !bytes.Contains(b, []byte(`class="node decision optimal"`)) {
			t.Errorf("not an SVG of a solved tree: %.200s", b)
		}
	}
	cases := []struct {
		name  string
		stdin string
		args  []string
		file  string // the picture written, if any
		check func(t *testing.T, b []byte)
	}{
		{"svg file", "", []string{"draw", "example:sourcing", "-o", filepath.Join(dir, "a.svg")}, "a.svg", svgOK},
		{"png by extension", "", []string{"draw", "example:sourcing", "-o", filepath.Join(dir, "a.png")}, "a.png", func(t *testing.T, b []byte) {
			if !bytes.HasPrefix(b, []byte("\x89PNG")) {
				t.Errorf("not a PNG")
			}
		}},
		{"dot by extension", "", []string{"draw", "example:release", "--policy-only", "-o", filepath.Join(dir, "a.gv")}, "a.gv", func(t *testing.T, b []byte) {
			if !bytes.HasPrefix(b, []byte("digraph ")) || !bytes.Contains(b, []byte("others")) {
				t.Errorf("not the DOT of a policy-only drawing: %.100s", b)
			}
		}},
		{"flags after the file, depth", "", []string{"draw", "../../examples/expansion.fork", "--depth", "1", "-o", filepath.Join(dir, "d.svg")}, "d.svg", func(t *testing.T, b []byte) {
			svgOK(t, b)
			if !bytes.Contains(b, []byte("not drawn")) {
				t.Error("no depth stub")
			}
		}},
		{"stdin to stdout", string(src), []string{"draw", "-"}, "", svgOK},
		{"stdout dot", "", []string{"draw", "example:sourcing", "-o", "-", "--format", "dot"}, "", func(t *testing.T, b []byte) {
			if !bytes.HasPrefix(b, []byte("digraph ")) {
				t.Errorf("not DOT: %.100s", b)
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := forkcast(t, c.stdin, c.args...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			b := []byte(out)
			if c.file != "" {
				if !strings.Contains(errs, "wrote ") || out != "" {
					t.Errorf("stdout %q, stderr %q", out, errs)
				}
				if b, err = os.ReadFile(filepath.Join(dir, c.file)); err != nil {
					t.Fatal(err)
				}
			}
			c.check(t, b)
		})
	}
}

func TestDrawDefaultOutput(t *testing.T) {
	t.Chdir(t.TempDir())
	if code, _, errs := forkcast(t, "", "draw", "example:expansion"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if code, _, errs := forkcast(t, "", "draw", "--format", "png", "example:expansion"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, name := range []string{"expansion.svg", "expansion.png"} {
		if _, err := os.Stat(name); err != nil {
			t.Errorf("no %s: %v", name, err)
		}
	}
}

func TestDrawErrors(t *testing.T) {
	bad := writeFile(t, "bad.fork", "decision \"d\"\n  \"a\"  cost nope\n")
	var many strings.Builder
	many.WriteString("decision \"Many options\"\n")
	for i := range 1200 {
		fmt.Fprintf(&many, "  \"Option %d\"  gain %d\n", i, i)
	}
	tall := writeFile(t, "tall.fork", many.String())
	sub := t.TempDir()
	dir := t.TempDir()
	out := filepath.Join(dir, "x.svg")
	jpg, png, ctl := filepath.Join(dir, "out.jpg"), filepath.Join(dir, "out.png"), filepath.Join(dir, "\x1b[2J.jpg")
	for _, c := range []struct {
		name   string
		args   []string
		code   int
		stderr string
	}{
		{"model error", []string{"draw", bad, "-o", out}, 1, "1 error; nothing was solved"},
		{"no file", []string{"draw"}, 2, "draw needs a model FILE"},
		{"bad format", []string{"draw", "example:sourcing", "--format", "gif"}, 2, `--format "gif": choose svg, png or dot`},
		{"bad depth", []string{"draw", "example:sourcing", "--depth", "-2"}, 2, "--depth -2"},
		{"bad wrap", []string{"draw", "example:sourcing", "--wrap", "0"}, 2, "--wrap 0"},
		{"unsupported extension", []string{"draw", "example:sourcing", "-o", jpg}, 2, "draw writes SVG (.svg), PNG (.png) or Graphviz DOT (.dot, .gv), not .jpg"},
		{"extension against format", []string{"draw", "example:sourcing", "--format", "svg", "-o", png}, 2, "is PNG by its extension, but --format says SVG"},
		{"control characters in OUT", []string{"draw", "example:sourcing", "-o", ctl}, 2, `\x1b[2J.jpg`},
		{"png too big", []string{"draw", tall, "-o", filepath.Join(dir, "tall.png")}, 2, "pixels is too big (at most 32768 a side)"},
		{"directory as OUT", []string{"draw", "example:sourcing", "-o", sub}, 1, "is a directory; give the name of the picture"},
		{"missing dir", []string{"draw", "example:sourcing", "-o", filepath.Join(t.TempDir(), "no", "such", "x.svg")}, 1, "no such file or directory"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := forkcast(t, "", c.args...)
			if code != c.code || !strings.Contains(errs, c.stderr) {
				t.Fatalf("exit %d, stderr:\n%s\nwant exit %d and %q", code, errs, c.code, c.stderr)
			}
			if strings.Contains(errs, "\x1b") {
				t.Errorf("a control character reached standard error: %q", errs)
			}
		})
	}
	// Nothing at all is written when draw refuses.
	if left, _ := os.ReadDir(dir); len(left) > 0 {
		t.Errorf("files written by refused draws: %v", left)
	}
}

// TestDrawConcurrentSamePath has several forkcast processes draw to the
// same file at once: each says it wrote it, and what is left is one whole
// picture.
func TestDrawConcurrentSamePath(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "same.svg")
	var cmds []*exec.Cmd
	for k := range 6 {
		ex := []string{"example:sourcing", "example:release"}[k%2]
		cmd := command("draw", ex, "-o", out)
		cmds = append(cmds, cmd)
	}
	outs := make([]bytes.Buffer, len(cmds))
	for k, cmd := range cmds {
		cmd.Stderr = &outs[k]
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
	}
	for k, cmd := range cmds {
		if err := cmd.Wait(); err != nil || !strings.Contains(outs[k].String(), "wrote ") {
			t.Errorf("draw %d: %v: %s", k, err, outs[k].String())
		}
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	d := xml.NewDecoder(bytes.NewReader(b))
	for {
		_, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the SVG left is not well-formed: %v", err)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("files left: %v", entries)
	}
}

func TestDrawRefusesSymlink(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "precious.txt")
	if err := os.WriteFile(target, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "tree.svg")
	if err := os.Symlink(target, link); err != nil {
		t.Skipf("no symbolic links: %v", err)
	}
	code, _, errs := forkcast(t, "", "draw", "example:sourcing", "-o", link)
	if code != 1 || !strings.Contains(errs, "is a symbolic link") {
		t.Fatalf("exit %d, stderr %q; want exit 1 and a symbolic-link refusal", code, errs)
	}
	if b, _ := os.ReadFile(target); string(b) != "keep" {
		t.Errorf("the link's target was written: %q", b)
	}
}

// Package docs_test checks the repository's documentation: every relative
// link in README.md, the other top-level Markdown files and docs/*.md must
// lead to a file inside the repository (and to a heading there, when it
// names one), and no path in them may point outside the repository.
package docs_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"unicode"
)

var (
	// inlineLink matches [text](target) and ![alt](target); the target
	// ends at a space (before a title) or the closing parenthesis.
	inlineLink = regexp.MustCompile(`!?\[[^\]]*\]\(\s*<?([^)\s>]+)>?(?:\s+"[^"]*")?\s*\)`)
	// refLink matches a reference definition: [name]: target
	refLink = regexp.MustCompile(`(?m)^\s{0,3}\[[^\]]+\]:\s*<?(\S+?)>?(?:\s|$)`)
	// upPath matches a relative path that climbs out of its folder, in
	// links or in plain text (`../shared/notes.md`).
	upPath = regexp.MustCompile(`(?:^|[\s(` + "`" + `"'])((?:\.\./)+[\w./-]*)`)
)

// markdownFiles returns the Markdown files the check covers, relative to
// the repository root.
func markdownFiles(t *testing.T, root string) []string {
	var out []string
	for _, pattern := range []string{"*.md", filepath.Join("docs", "*.md")} {
		m, err := filepath.Glob(filepath.Join(root, pattern))
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range m {
			rel, _ := filepath.Rel(root, f)
			out = append(out, rel)
		}
	}
	return out
}

// stripCode removes fenced code blocks, which may hold text that looks
// like links (grammar, sample output) but is not.
func stripCode(s string) string {
	var b strings.Builder
	fenced := false
	for _, line := range strings.SplitAfter(s, "\n") {
		if strings.HasPrefix(strings.TrimSpace(line), "```") {
			fenced = !fenced
			b.WriteString("\n")
			continue
		}
		if fenced {
			b.WriteString("\n")
			continue
		}
		b.WriteString(line)
	}
	return b.String()
}

// slug is the anchor a heading gets on the usual Markdown hosts: lower
// case, spaces to hyphens, punctuation other than - and _ dropped.
func slug(heading string) string {
	var b strings.Builder
	for _, r := range strings.ToLower(strings.TrimSpace(heading)) {
		switch {
		case r == ' ':
			b.WriteByte('-')
		case r == '-' || r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r):
			b.WriteRune(r)
		}
	}
	return b.String()
}

// anchors returns the anchors of a Markdown file's headings.
func anchors(text string) map[string]bool {
	out := map[string]bool{}
	for _, line := range strings.Split(stripCode(text), "\n") {
		if h, ok := strings.CutPrefix(line, "#"); ok {
			out[slug(strings.TrimLeft(h, "#"))] = true
		}
	}
	return out
}

// inside reports whether path (absolute, cleaned) is inside root.
func inside(root, path string) bool {
	rel, err := filepath.Rel(root, path)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}

func TestLinksResolveInsideRepository(t *testing.T) {
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	files := markdownFiles(t, root)
	if len(files) < 3 {
		t.Fatalf("found only %v", files)
	}
	checked := 0
	for _, file := range files {
		raw, err := os.ReadFile(filepath.Join(root, file))
		if err != nil {
			t.Fatal(err)
		}
		text := stripCode(string(raw))
		dir := filepath.Dir(filepath.Join(root, file))
		var targets []string
		for _, m := range inlineLink.FindAllStringSubmatch(text, -1) {
			targets = append(targets, m[1])
		}
		for _, m := range refLink.FindAllStringSubmatch(text, -1) {
			targets = append(targets, m[1])
		}
		for _, target := range targets {
			if strings.Contains(target, "://") || strings.HasPrefix(target, "mailto:") {
				continue // a web address: not checked here
			}
			checked++
			path, frag, _ := strings.Cut(target, "#")
			abs := filepath.Join(root, file) // a bare #anchor is in the file itself
			if path != "" {
				if filepath.IsAbs(path) {
					t.Errorf("%s: link %q is an absolute path; links must be relative to the file", file, target)
					continue
				}
				abs = filepath.Clean(filepath.Join(dir, filepath.FromSlash(path)))
			}
			if !inside(root, abs) {
				t.Errorf("%s: link %q points outside the repository", file, target)
				continue
			}
			info, err := os.Stat(abs)
			if err != nil {
				t.Errorf("%s: link %q leads to no file", file, target)
				continue
			}
			if frag == "" || info.IsDir() || !strings.HasSuffix(abs, ".md") {
				continue
			}
			linked, err := os.ReadFile(abs)
			if err != nil {
				t.Fatal(err)
			}
			if !anchors(string(linked))[frag] {
				t.Errorf("%s: link %q names no heading of %s", file, target, filepath.Base(abs))
			}
		}
		// A path mentioned in plain text must not lead out of the
		// repository either: a reader cannot follow it.
		for _, m := range upPath.FindAllStringSubmatch(text, -1) {
			abs := filepath.Clean(filepath.Join(dir, filepath.FromSlash(m[1])))
			if !inside(root, abs) {
				t.Errorf("%s: %q points outside the repository", file, m[1])
			}
		}
	}
	if checked < 10 {
		t.Errorf("only %d links checked; is the link pattern right?", checked)
	}
}

// TestLinkCheckFindsMistakes runs the pieces of the check on known cases,
// so that a pattern that matches nothing cannot pass for a clean result.
func TestLinkCheckFindsMistakes(t *testing.T) {
	text := "See [the design](../shared/DESIGN.md), ![a tree](docs/img/tree.png \"T\") " +
		"and [ref]: docs/json.md\n```\n[not](a-link.md)\n```\n"
	var got []string
	for _, m := range inlineLink.FindAllStringSubmatch(stripCode(text), -1) {
		got = append(got, m[1])
	}
	if strings.Join(got, " ") != "../shared/DESIGN.md docs/img/tree.png" {
		t.Errorf("inline links %q", got)
	}
	if m := upPath.FindAllStringSubmatch("the format of `../shared/DESIGN.md` here", -1); len(m) != 1 || m[0][1] != "../shared/DESIGN.md" {
		t.Errorf("plain-text path: %q", m)
	}
	root := filepath.FromSlash("/repo")
	if inside(root, filepath.FromSlash("/shared/DESIGN.md")) || !inside(root, filepath.FromSlash("/repo/docs/json.md")) {
		t.Error("inside is wrong")
	}
	// The anchor of "Money: gain and cost", as the language guide links it.
	if got := slug("Money: gain and cost"); got != "money-gain-and-cost" {
		t.Errorf("slug %q", got)
	}
}

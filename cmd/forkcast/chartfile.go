package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/forkcast/forkcast/internal/atomicfile"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/urfave/cli/v2"
)

// chartFile is a chart the command line asks to be written: the file and
// its format (by extension), checked before any work is done.
type chartFile struct {
	flag, path string
	format     chart.Format
}

// chartTarget reads the chart file named by --flag, or nil when the flag
// is not given.
func chartTarget(c *cli.Context, flag string) (*chartFile, error) {
	if !c.IsSet(flag) {
		return nil, nil
	}
	p := c.String(flag)
	switch {
	case strings.TrimSpace(p) == "":
		return nil, usageErr("--%s needs a file name ending in .svg or .png", flag)
	case p == "-":
		return nil, usageErr("--%s -: a chart goes to a file, not standard output; give a name ending in .svg or .png", flag)
	}
	f, err := chart.FormatOf(p)
	if err != nil {
		return nil, usageErr("--%s %s: charts are written as .svg or .png; end the name with one of them", flag, shown(p))
	}
	if st, err := os.Stat(p); err == nil && st.IsDir() {
		return nil, modelErr("--%s %s is a directory; give the name of the chart to write", flag, shown(p))
	}
	return &chartFile{flag: flag, path: p, format: f}, nil
}

// sameChartFile refuses two chart flags that name one file: the second
// chart would silently replace the first.
func sameChartFile(a, b *chartFile) error {
	if a == nil || b == nil {
		return nil
	}
	same := filepath.Clean(a.path) == filepath.Clean(b.path)
	if !same {
		sa, errA := os.Stat(a.path)
		sb, errB := os.Stat(b.path)
		same = errA == nil && errB == nil && os.SameFile(sa, sb)
	}
	if same {
		return usageErr("--%s and --%s name the same file, %s; give each chart its own", a.flag, b.flag, shown(b.path))
	}
	return nil
}

// write draws the chart into its file (through a temporary file renamed
// into place) and says so on standard error.
func (f *chartFile) write(c *cli.Context, draw func(w io.Writer, opt chart.Options) error) error {
	if f == nil {
		return nil
	}
	err := atomicfile.WriteFunc(f.path, 0o644, func(w io.Writer) error { return draw(w, chart.Options{Format: f.format}) })
	if err != nil {
		return modelErr("--%s: %s", f.flag, shown(err.Error()))
	}
	fmt.Fprintf(c.App.ErrWriter, "wrote %s\n", shown(f.path))
	return nil
}

// repeated is a flag that may be given several times, each value kept
// whole (a label may hold a comma).
type repeated struct{ values []string }

// Set implements flag.Value: one more value.
func (r *repeated) Set(v string) error {
	r.values = append(r.values, v)
	return nil
}

// String implements flag.Value.
func (r *repeated) String() string { return strings.Join(r.values, " ") }

// repeatedValues are the values of a repeated flag.
func repeatedValues(c *cli.Context, name string) []string {
	if r, ok := c.Generic(name).(*repeated); ok {
		return r.values
	}
	return nil
}

// progress shows how far a long analysis has got, on one line of standard
// error that it rewrites, when standard error is a terminal; nil (no
// progress) otherwise. done is called once the work is over.
func progress(c *cli.Context, what string) (report func(done, total int), done func()) {
	if !isTerminal(c.App.ErrWriter) {
		return nil, func() {}
	}
	w := c.App.ErrWriter
	start := time.Now()
	var last time.Time
	shown := false
	report = func(n, total int) {
		now := time.Now()
		// Quick work shows nothing; then at most ten updates a second.
		if now.Sub(start) < 300*time.Millisecond || (now.Sub(last) < 100*time.Millisecond && n < total) {
			return
		}
		last, shown = now, true
		fmt.Fprintf(w, "\r%s: %d of %d", what, n, total)
	}
	done = func() {
		if shown {
			fmt.Fprint(w, "\r\033[K")
		}
	}
	return report, done
}

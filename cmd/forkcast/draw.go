package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/forkcast/forkcast/internal/atomicfile"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/graphviz"
	"github.com/urfave/cli/v2"
)

func drawCommand() *cli.Command {
	return &cli.Command{
		Name:      "draw",
		Usage:     "draw the solved tree as a picture (SVG, PNG or Graphviz DOT)",
		ArgsUsage: "FILE",
		UsageText: "forkcast draw [-o OUT] [--format svg|png|dot] [--policy-only] [--depth N] [--set NAME=VALUE]... FILE\n\n" +
			"   forkcast draw examples/sourcing.fork              writes sourcing.svg\n" +
			"   forkcast draw example:sourcing -o docs/tree.png\n" +
			"   forkcast draw big.json --policy-only --depth 4 -o big.svg\n" +
			"   forkcast draw model.fork -o - | gzip > tree.svgz\n" +
			"   forkcast draw example:sourcing --set licence=280_000 -o cheaper.svg",
		Description: "Solves the model and draws the tree left to right: decisions as squares,\n" +
			"chance nodes as circles, end nodes as triangles. Every branch shows its label,\n" +
			"probability and cash flow (gain or cost). Each figure says what it counts:\n" +
			"  EV from here        at a node: what follows it, not the cash on the branch\n" +
			"                      into it\n" +
			"  option EV           at each option of a decision: the option's value with\n" +
			"                      its own cash; these are the figures a decision compares\n" +
			"  path total          at an end: all the cash along the path, with the path's\n" +
			"                      probability\n" +
			"(under objective min: expected cost from here, option expected cost, path\n" +
			"total cost). The optimal policy is thick and dark blue; options a decision\n" +
			"rejects are dashed and marked ‖. In SVG, everything on the optimal policy has\n" +
			"the class \"optimal\".\n\n" +
			"OUT defaults to FILE's base name with the format's extension, in the current\n" +
			"directory (standard output when FILE is -); -o - writes to standard output.\n" +
			"The format comes from --format, else from OUT's extension (.svg, .png, .dot\n" +
			"or .gv), else SVG. Another extension needs --format; an extension that names\n" +
			"another format than --format is refused. The picture is written to a\n" +
			"temporary file beside OUT and renamed into place, so OUT is never left half\n" +
			"written; a symbolic link at OUT is refused, not followed.\n\n" +
			"For big trees, --policy-only folds the options each decision rejects into one\n" +
			"stub, and --depth N draws N levels and sums up each deeper subtree in a stub.\n" +
			"Drawing stops at " + render.Grouped(fmt.Sprint(render.DefaultMaxDrawn)) + " nodes; PNG at 32,768 pixels a side.",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "output", Aliases: []string{"o"}, Usage: "write the picture to `OUT` (- for standard output)"},
			&cli.StringFlag{Name: "format", Usage: "picture format: svg, png or dot (`FORMAT`)"},
			&cli.BoolFlag{Name: "policy-only", Usage: "draw only the optimal policy; fold each decision's other options into one stub"},
			&cli.IntFlag{Name: "depth", Usage: "draw `N` levels below the root and sum up deeper subtrees (0: all)"},
			&cli.IntFlag{Name: "wrap", Usage: "wrap labels at `N` characters", Value: render.DefaultWrapWidth},
			setFlag(),
			maxNodesFlag,
		},
		Action: drawAction,
	}
}

// drawFormat is what draw writes: a graphviz.Format or DOT text.
type drawFormat string

const formatDOT drawFormat = "dot"

func drawAction(c *cli.Context) error {
	name, err := fileArg(c)
	if err != nil {
		return err
	}
	out, format, err := drawTarget(c, name)
	if err != nil {
		return err
	}
	if c.Int("depth") < 0 {
		return usageErr("--depth %d: give a positive number of levels, or 0 for the whole tree", c.Int("depth"))
	}
	if c.Int("wrap") < 1 {
		return usageErr("--wrap %d: give a line length of at least 1", c.Int("wrap"))
	}
	if out == "-" && format == drawFormat(graphviz.PNG) && isTerminal(c.App.Writer) {
		return usageErr("will not write a PNG to a terminal; give -o FILE.png or redirect the output")
	}
	l, sol, err := loadAndSolve(c)
	if err != nil {
		return err
	}
	opts := render.Options{PolicyOnly: c.Bool("policy-only"), MaxDepth: c.Int("depth"), WrapWidth: c.Int("wrap")}
	laid, err := render.Layout(sol, opts)
	if err != nil {
		var big *render.TooBigError
		if errors.As(err, &big) {
			return usageErr("%s: the drawing would have %d nodes, more than the %d a picture can usefully hold; draw less with --policy-only or --depth N", l.Name, big.Nodes, big.Limit)
		}
		return modelErr("%s: %v", l.Name, err)
	}
	// A PNG too big to paint is refused from the layout's size, before
	// any drawing; like a drawing of too many nodes, that asks for other
	// words on the command line (SVG, or less of the tree).
	if format == drawFormat(graphviz.PNG) {
		if err := graphviz.CheckPNG(laid); err != nil {
			return usageErr("%s: %v (--policy-only, --depth N)", l.Name, err)
		}
	}
	var pic bytes.Buffer
	if format == formatDOT {
		pic.Write(laid.DOT)
	} else {
		r, err := graphviz.NewRenderer(c.Context)
		if err != nil {
			return modelErr("%v", err)
		}
		defer r.Close()
		if err := r.RenderPicture(c.Context, laid, graphviz.Format(format), &pic); err != nil {
			return modelErr("%s: %v", l.Name, err)
		}
	}
	if out == "-" {
		_, err := c.App.Writer.Write(pic.Bytes())
		return err
	}
	if err := atomicfile.Write(out, pic.Bytes(), 0o644); err != nil {
		return modelErr("%s", shown(err.Error()))
	}
	fmt.Fprintf(c.App.ErrWriter, "wrote %s\n", shown(out))
	return nil
}

// extFormat is the format an extension of OUT names, if draw knows it.
func extFormat(ext string) (drawFormat, bool) {
	switch strings.ToLower(ext) {
	case ".svg":
		return drawFormat(graphviz.SVG), true
	case ".png":
		return drawFormat(graphviz.PNG), true
	case ".dot", ".gv":
		return formatDOT, true
	}
	return "", false
}

// drawTarget works out where the picture goes and in which format.
func drawTarget(c *cli.Context, name string) (out string, format drawFormat, err error) {
	out = c.String("output")
	if f := c.String("format"); f != "" {
		switch strings.ToLower(f) {
		case "svg", "png", "dot":
			format = drawFormat(strings.ToLower(f))
		default:
			return "", "", usageErr("--format %q: choose svg, png or dot", f)
		}
	}
	if out != "" && out != "-" {
		if st, err := os.Stat(out); err == nil && st.IsDir() {
			return "", "", modelErr("-o %s is a directory; give the name of the picture to write", shown(out))
		}
		ext := filepath.Ext(out)
		byExt, known := extFormat(ext)
		switch {
		case ext == "":
			// No extension: the format flag, else SVG.
		case !known && format == "":
			return "", "", usageErr("-o %s: draw writes SVG (.svg), PNG (.png) or Graphviz DOT (.dot, .gv), not %s; use one of those extensions, or give --format", shown(out), shown(ext))
		case known && format == "":
			format = byExt
		case known && byExt != format:
			return "", "", usageErr("-o %s is %s by its extension, but --format says %s; make them agree", shown(out), strings.ToUpper(string(byExt)), strings.ToUpper(string(format)))
		}
	}
	if format == "" {
		format = drawFormat(graphviz.SVG)
	}
	if out == "" {
		if name == "-" {
			return "-", format, nil
		}
		base := strings.TrimPrefix(filepath.Base(name), "example:")
		if strings.HasPrefix(name, "example:") {
			base = strings.TrimPrefix(name, "example:")
		}
		base = strings.TrimSuffix(base, filepath.Ext(base))
		if base == "" || base == "." || base == string(filepath.Separator) {
			base = "tree"
		}
		out = base + "." + string(format)
	}
	return out, format, nil
}

// isTerminal reports whether w is a terminal (a character device).
func isTerminal(w any) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

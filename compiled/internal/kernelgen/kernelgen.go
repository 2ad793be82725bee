// Package kernelgen writes the rollback kernel of package compiled for
// each number type it runs on, from one template (kernel.go.tmpl).
//
// The kernel is one algorithm. Written once as a Go generic function, its
// arithmetic went through a dictionary that Go does not inline, which made
// the float64 rollback of simulation about three times slower than the
// same loop written for float64. Generating one copy per type keeps a
// single source and lets every operation inline.
package kernelgen

import (
	"bytes"
	_ "embed"
	"fmt"
	"go/format"
	"text/template"
)

//go:embed kernel.go.tmpl
var source string

// instance is one number type the kernel runs on: its name in the
// function's name, the Go type, and the code of each operation (acc is
// the running sum; ok and, when Checked, good are in scope).
type instance struct {
	Name, Doc, T string
	Ops          bool // the function takes o bigOps (tolerant comparison)
	Rho          bool // frames of their own carry a weight rho
	Checked      bool // additions may overflow
	Owned        bool // acc is a pointer: the first addition makes it the node's own, later ones add in place
	Add          func(x string) string
	AddScaled    func(x, r string) string
	Less, Equal  func(a, b string) string
}

var instances = []instance{
	{
		Name: "Wide", Doc: "128-bit integers (exact.Wide), the usual case", T: "exact.Wide", Checked: true,
		Add: func(x string) string {
			return fmt.Sprintf("if acc, good = acc.Add(%s); !good {\nok = false\n}", x)
		},
		Less:  func(a, b string) string { return fmt.Sprintf("%s.Less(%s)", a, b) },
		Equal: func(a, b string) string { return fmt.Sprintf("%s == %s", a, b) },
	},
	{
		Name: "Big", Doc: "big integers, for figures that outgrow 128 bits\n// (o compares them, tolerantly in a model with rounded figures)", T: "*big.Int", Ops: true, Rho: true, Owned: true,
		// acc starts as e[i], which other rollbacks share: the first
		// addition makes a new integer, the later ones add into it (one
		// allocation a node with children instead of one an addition).
		Add: func(x string) string {
			return fmt.Sprintf("if own {\nacc.Add(acc, %s)\n} else {\nacc, own = new(big.Int).Add(acc, %s), true\n}", x, x)
		},
		AddScaled: func(x, r string) string { return fmt.Sprintf("acc, own = o.addScaled(acc, %s, %s), true", x, r) },
		Less:      func(a, b string) string { return fmt.Sprintf("o.less(%s, %s)", a, b) },
		Equal:     func(a, b string) string { return fmt.Sprintf("o.equal(%s, %s)", a, b) },
	},
	{
		Name: "Float", Doc: "float64, for simulation and the float64 twin\n// of an exact rollback", T: "float64", Rho: true,
		Add:       func(x string) string { return fmt.Sprintf("acc += %s", x) },
		AddScaled: func(x, r string) string { return fmt.Sprintf("acc += %s * %s", x, r) },
		Less:      func(a, b string) string { return fmt.Sprintf("%s < %s", a, b) },
		Equal:     func(a, b string) string { return fmt.Sprintf("%s == %s", a, b) },
	},
}

// Source returns the generated kernel, gofmt-formatted.
func Source() ([]byte, error) {
	t, err := template.New("kernel").Parse(source)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := t.Execute(&b, instances); err != nil {
		return nil, err
	}
	out, err := format.Source(b.Bytes())
	if err != nil {
		return nil, fmt.Errorf("kernelgen: the generated kernel does not parse: %v\n%s", err, b.Bytes())
	}
	return out, nil
}

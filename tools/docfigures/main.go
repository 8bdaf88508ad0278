// Command docfigures writes the README's figures of the built-in invented
// demo through the same code as the workbench's exports (app/core and
// app/figure): docs/knockout.png, the last epoch with the knock-out of its
// main lanthanide (Nd), and docs/comparison.png, two candidate mixes of the
// first epoch (B has A's strontium moved to xenon, which has no demo lines).
//
//	go run ./tools/docfigures [-out docs/knockout.png] [-comparison docs/comparison.png]
package main

import (
	"context"
	"flag"
	"fmt"
	"os"

	"broadline/app/core"
	"broadline/app/figure"

	"gonum.org/v1/plot/vg"
)

func main() {
	out := flag.String("out", "docs/knockout.png", "output figure (PNG, SVG or PDF by extension)")
	cmpOut := flag.String("comparison", "docs/comparison.png", "output comparison figure")
	flag.Parse()
	err := run(*out)
	if err == nil {
		err = comparison(*cmpOut)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "docfigures:", err)
		os.Exit(1)
	}
}

func run(out string) error {
	b, err := core.Demo()
	if err != nil {
		return err
	}
	ctx := context.Background()
	m := b.Data.StartModel(len(b.Data.Epochs) - 1)
	const nd = 60
	ov, err := b.Compute(ctx, m, 0)
	if err != nil {
		return err
	}
	knock, err := b.Compute(ctx, m, nd)
	if err != nil {
		return err
	}
	fig, err := figure.Model(b, m, ov, knock, nd, core.UnitOf(""))
	if err != nil {
		return err
	}
	if err := fig.Export(out, 9*vg.Inch, 5*vg.Inch); err != nil {
		return err
	}
	fmt.Println("wrote", out)
	return nil
}

// comparison writes the two-candidate figure of the first demo epoch.
func comparison(out string) error {
	b, err := core.Demo()
	if err != nil {
		return err
	}
	a := core.Candidate{Label: "A", Model: b.Data.StartModel(0)}
	syms, xs := a.MassFractions.Fractions()
	var sr, xe float64
	for i, s := range syms {
		switch s {
		case "Sr":
			sr = xs[i]
		case "Xe":
			xe = xs[i]
		}
	}
	c, err := a.MassFractions.Without("Sr")
	if err == nil {
		c, err = c.WithFraction("Xe", xe+sr)
	}
	if err != nil {
		return err
	}
	bm := a.Model
	bm.MassFractions = c
	cmp, err := b.Compare(context.Background(), []core.Candidate{a, {Label: "B", Model: bm}}, 0, nil)
	if err != nil {
		return err
	}
	fig, err := figure.Comparison(b, cmp, core.UnitOf(""))
	if err != nil {
		return err
	}
	if err := fig.Export(out, 10*vg.Inch, 6*vg.Inch); err != nil {
		return err
	}
	fmt.Println("wrote", out)
	return nil
}

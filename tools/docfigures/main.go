// Command docfigures writes docs/knockout.png, the README's figure of the
// built-in invented demo's last epoch with the knock-out of its main
// lanthanide (Nd), through the same code as the workbench's
// Figure ▸ Export the shown figure (app/core and app/figure).
//
//	go run ./tools/docfigures [-out docs/knockout.png]
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
	flag.Parse()
	if err := run(*out); err != nil {
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

// Command broadline is the desktop workbench for identifying broad absorption
// features in spectra of kilonovae and other fast, heavy-element-rich
// transients. Without arguments it opens the workbench on the built-in demo;
// with a sub-command it runs the same computations headless (package cli).
// Built with -tags nogui it has no workbench and needs no cgo or X11.
package main

import (
	"fmt"
	"os"

	"broadline/app/cli"
	_ "broadline/app/internal/locale" // before the GUI toolkit reads the locale
)

func main() {
	if len(os.Args) < 2 {
		if err := runWorkbench(); err != nil {
			fmt.Fprintln(os.Stderr, "broadline:", err)
			os.Exit(1)
		}
		return
	}
	os.Exit(cli.Main(os.Args[1:], os.Stdout, os.Stderr))
}

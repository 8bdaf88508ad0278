// Command broadline is the desktop workbench for identifying broad absorption
// features in spectra of kilonovae and other fast, heavy-element-rich
// transients. Without arguments it opens the workbench on the built-in demo,
// and "broadline open SESSION.json" on a saved session; with a sub-command
// it runs the same computations headless (package cli). Built with -tags
// nogui it has no workbench and needs no cgo or X11.
package main

import (
	"fmt"
	"os"

	"broadline/app/cli"
	_ "broadline/app/internal/locale" // before the GUI toolkit reads the locale
)

func main() {
	switch {
	case len(os.Args) < 2:
		workbench("")
		return
	case os.Args[1] == "open":
		if len(os.Args) != 3 {
			fmt.Fprintln(os.Stderr, "broadline open: want one saved session file: broadline open SESSION.json")
			os.Exit(2)
		}
		workbench(os.Args[2])
		return
	}
	os.Exit(cli.Main(os.Args[1:], os.Stdout, os.Stderr))
}

// workbench runs the workbench on the session at path ("" for the demo) and
// exits with status 1 and the reason when it cannot open.
func workbench(path string) {
	if err := runWorkbench(path); err != nil {
		fmt.Fprintln(os.Stderr, "broadline:", err)
		os.Exit(1)
	}
}

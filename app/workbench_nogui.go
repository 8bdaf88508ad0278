//go:build nogui

package main

import "errors"

// runWorkbench explains that this build has no workbench.
func runWorkbench(string) error {
	return errors.New("this build has no workbench (built with -tags nogui); run 'broadline help' for the headless commands")
}

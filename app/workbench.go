//go:build !nogui

package main

import "broadline/app/gui"

// runWorkbench opens the desktop workbench on the session saved at path,
// or on the built-in demo when path is empty.
func runWorkbench(path string) error { return gui.RunSession(path) }

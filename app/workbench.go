//go:build !nogui

package main

import "broadline/app/gui"

// runWorkbench opens the desktop workbench on the built-in demo.
func runWorkbench() error { return gui.Run() }

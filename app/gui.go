package main

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"
)

// runWorkbench opens the desktop workbench and blocks until it is closed.
func runWorkbench() error {
	a := app.NewWithID("org.broadline.workbench")
	w := a.NewWindow("broadline")
	w.SetContent(workbenchFrame())
	w.Resize(fyne.NewSize(1280, 800))
	w.ShowAndRun()
	return nil
}

// workbenchFrame lays out the workbench: the spectrum view in the middle, the
// model controls on the left, the feature table below. Later issues fill the
// panels; the layout is fixed here.
func workbenchFrame() fyne.CanvasObject {
	model := widget.NewCard("Ejecta model", "", widget.NewLabel("velocity · temperature · age · composition"))
	plot := widget.NewCard("Spectrum", "", widget.NewLabel("observed and synthetic spectra appear here"))
	table := widget.NewCard("Features", "", widget.NewLabel("absorption features and candidate lines"))
	right := container.NewVSplit(plot, table)
	right.Offset = 0.75
	split := container.NewHSplit(model, right)
	split.Offset = 0.25
	return split
}

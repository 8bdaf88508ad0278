package main

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
)

// runWorkbench opens the desktop workbench and blocks until it is closed.
func runWorkbench() error {
	a := app.NewWithID("org.broadline.workbench")
	w := newWorkbenchWindow(a)
	w.Resize(fyne.NewSize(1280, 800))
	w.ShowAndRun()
	return nil
}

// newWorkbenchWindow builds the main window in app a: the layout frame and
// the menus. It is separate from runWorkbench so tests can build it with
// fyne's headless test app.
func newWorkbenchWindow(a fyne.App) fyne.Window {
	w := a.NewWindow("broadline")
	w.SetContent(workbenchFrame())
	help := fyne.NewMenu("Help",
		fyne.NewMenuItem("About the model…", func() { showModelHelp(w) }),
	)
	w.SetMainMenu(fyne.NewMainMenu(help))
	return w
}

// workbenchFrame lays out the workbench: the spectrum view in the middle, the
// model controls on the left, the feature table below.
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

// showModelHelp opens the dialog that states the model's approximations.
func showModelHelp(w fyne.Window) {
	text := widget.NewRichTextFromMarkdown(modelCautions)
	text.Wrapping = fyne.TextWrapWord
	scroll := container.NewVScroll(text)
	scroll.SetMinSize(fyne.NewSize(620, 420))
	dialog.ShowCustom("About the model", "Close", scroll, w)
}

package main

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
)

// TestWorkbenchWindow builds the workbench in fyne's headless test app and
// checks its title, its three panels and the help menu.
func TestWorkbenchWindow(t *testing.T) {
	a := test.NewTempApp(t)
	w := newWorkbenchWindow(a)
	defer w.Close()
	if w.Title() != "broadline" {
		t.Errorf("title %q, want broadline", w.Title())
	}
	var cards []string
	var walk func(o fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		if c, ok := o.(*widget.Card); ok {
			cards = append(cards, c.Title)
		}
		if c, ok := o.(interface{ Objects() []fyne.CanvasObject }); ok {
			for _, ch := range c.Objects() {
				walk(ch)
			}
		}
		if r := test.WidgetRenderer(asWidget(o)); r != nil {
			for _, ch := range r.Objects() {
				walk(ch)
			}
		}
	}
	walk(w.Content())
	got := strings.Join(cards, ",")
	for _, want := range []string{"Ejecta model", "Spectrum", "Features"} {
		if !strings.Contains(got, want) {
			t.Errorf("panels %q lack %q", got, want)
		}
	}
	menu := w.MainMenu()
	if menu == nil || len(menu.Items) == 0 || menu.Items[0].Label != "Help" {
		t.Fatalf("main menu lacks Help")
	}
}

// TestModelCautions checks that the help text names every approximation the
// project promises to state (rule: LTE, Sobolev, sharp photosphere,
// incomplete atomic data, identification is a hypothesis).
func TestModelCautions(t *testing.T) {
	for _, want := range []string{"LTE", "Sobolev", "sharp photosphere", "Incomplete atomic data", "hypothesis", "radiative-transfer"} {
		if !strings.Contains(modelCautions, want) {
			t.Errorf("help text lacks %q", want)
		}
	}
}

func asWidget(o fyne.CanvasObject) fyne.Widget {
	if w, ok := o.(fyne.Widget); ok {
		return w
	}
	return nil
}

package gui

import (
	"strings"
	"testing"
	"unicode"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/test"

	"broadline/app/core"
)

// helpRows returns the text of every rendered row of the help page laid
// out in a window of the given size.
func helpRows(t *testing.T, w, h float32) []string {
	t.Helper()
	a := test.NewTempApp(t)
	win := a.NewWindow("help")
	t.Cleanup(win.Close)
	win.Resize(fyne.NewSize(w, h))
	// The page as the menu shows it: in a dialog over the window.
	d := dialog.NewCustom("About the model", "Close", modelHelp(), win)
	d.Show()
	content := win.Canvas().Overlays().Top()
	if content == nil {
		t.Fatal("the dialog is not shown")
	}
	var rows []string
	var walk func(o fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		switch x := o.(type) {
		case *canvas.Text:
			if s := strings.TrimSpace(x.Text); s != "" {
				rows = append(rows, s)
			}
		case *fyne.Container:
			for _, c := range x.Objects {
				walk(c)
			}
		case fyne.Widget:
			for _, c := range test.WidgetRenderer(x).Objects() {
				walk(c)
			}
		}
	}
	walk(content)
	return rows
}

// TestModelHelpReadable lays Help ▸ About the model out at 1280×800 (and
// in a narrow 520-pixel window): the text is all there, no row holds a
// single letter, and no word is broken across rows — every word of every
// row (punctuation aside) is a word of the source text.
func TestModelHelpReadable(t *testing.T) {
	words := map[string]bool{}
	// The page's words and the dialog's title and button.
	for _, f := range strings.Fields(plainHelp(core.ModelCautions) + " About the model Close") {
		words[bare(f)] = true
	}
	for _, size := range [][2]float32{{1280, 800}, {520, 700}} {
		rows := helpRows(t, size[0], size[1])
		joined := strings.Join(rows, " ")
		if len(rows) < 10 || len(rows) > 200 || !strings.Contains(joined, "hypothesis") || !strings.Contains(joined, "Sobolev") {
			t.Fatalf("%v: %d rows, the first %q", size, len(rows), rows[:min(len(rows), 12)])
		}
		for _, r := range rows {
			rs := []rune(r)
			if len(rs) == 1 && unicode.IsLetter(rs[0]) {
				t.Errorf("%v: a row with the single letter %q", size, r)
			}
			for _, w := range strings.Fields(r) {
				if w = bare(w); w != "" && !words[w] {
					t.Errorf("%v: row %q holds %q, not a word of the text (broken mid-word?)", size, r, w)
					break
				}
			}
		}
	}
}

// bare is a word without the punctuation around it (and a list bullet is
// no word at all).
func bare(w string) string {
	return strings.TrimFunc(w, func(r rune) bool { return unicode.IsPunct(r) || r == '•' || unicode.IsSymbol(r) })
}

package figure

import (
	"fmt"

	stdfnt "golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/gobolditalic"
	"golang.org/x/image/font/gofont/goitalic"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
)

// Typeface is the typeface of every figure: the Go fonts
// (golang.org/x/image/font/gofont), which have the Greek letters, the
// superscript digits and signs (⁰–⁹, ⁻), the minus sign, ×, µ and Å that
// the figures' labels use. gonum/plot's default (Liberation Serif) lacks
// ⁻, ⁰ and ⁹, so an axis label such as "10⁻¹⁷" would show empty boxes.
const Typeface = "Go"

// init adds the Go fonts to gonum/plot's font cache and makes them the
// default of every plot made after (plot.New reads plot.DefaultFont).
func init() {
	var coll font.Collection
	for _, f := range []struct {
		ttf    []byte
		style  stdfnt.Style
		weight stdfnt.Weight
	}{
		{goregular.TTF, stdfnt.StyleNormal, stdfnt.WeightNormal},
		{gobold.TTF, stdfnt.StyleNormal, stdfnt.WeightBold},
		{goitalic.TTF, stdfnt.StyleItalic, stdfnt.WeightNormal},
		{gobolditalic.TTF, stdfnt.StyleItalic, stdfnt.WeightBold},
	} {
		face, err := opentype.Parse(f.ttf)
		if err != nil {
			panic(fmt.Sprintf("figure: the embedded Go font: %v", err))
		}
		coll = append(coll, font.Face{Font: font.Font{Typeface: Typeface, Style: f.style, Weight: f.weight}, Face: face})
	}
	font.DefaultCache.Add(coll)
	plot.DefaultFont = font.Font{Typeface: Typeface}
	plotter.DefaultFont = plot.DefaultFont
}

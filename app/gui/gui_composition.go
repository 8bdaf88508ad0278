package gui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
)

// The composition rows: one row per element of the mix with an on/off
// switch, a log-scale slider (10⁻⁶ … 1), an exact entry and the normalised
// fraction; changing one element scales the others so the fractions sum
// to 1 (core.Composition.WithFraction), switching one off takes it out and
// remembers its fraction for switching it back on. A selector starts from
// one of the named (invented) mixes. The text entry above stays in step.

// The range of a row's slider in log₁₀ X.
const rowLogMin, rowLogMax = -6.0, 0.0

// compRow is one element's row.
type compRow struct {
	sym    string
	on     *widget.Check
	slider *widget.Slider
	entry  *widget.Entry
	share  *widget.Label
}

// compRows holds the rows and what switched-off elements had.
type compRows struct {
	box  *fyne.Container
	rows []*compRow
	off  map[string]float64 // fractions of switched-off elements
	mix  *widget.Select
}

// newCompRows builds the (empty) rows panel; syncRows fills it.
func (wb *workbench) newCompRows() fyne.CanvasObject {
	wb.comp.box = container.NewVBox()
	wb.comp.off = map[string]float64{}
	var names []string
	for _, m := range core.NamedMixes() {
		names = append(names, m.Name)
	}
	wb.comp.mix = widget.NewSelect(names, func(name string) {
		if wb.syncing {
			return
		}
		for _, m := range core.NamedMixes() {
			if m.Name == name {
				wb.setComposition(m.Composition, "starting from the mix "+m.Name+": "+m.Note)
			}
		}
	})
	wb.comp.mix.PlaceHolder = "start from a named mix (invented)…"
	return container.NewVBox(wb.comp.mix, wb.comp.box)
}

// syncRows rebuilds the rows from the session's composition.
func (wb *workbench) syncRows() {
	if wb.comp.box == nil {
		return
	}
	syms, xs := wb.sess.MassFractions.Fractions()
	on := map[string]float64{}
	for i, s := range syms {
		on[s] = xs[i]
		delete(wb.comp.off, s)
	}
	all := append([]string(nil), syms...)
	for s := range wb.comp.off {
		all = append(all, s)
	}
	wb.comp.rows = wb.comp.rows[:0]
	wb.comp.box.RemoveAll()
	for _, s := range all {
		x, isOn := on[s]
		if !isOn {
			x = wb.comp.off[s]
		}
		r := wb.newRow(s, x, isOn)
		wb.comp.rows = append(wb.comp.rows, r)
		wb.comp.box.Add(container.NewBorder(nil, nil, container.NewHBox(r.on, widget.NewLabel(s)),
			container.NewHBox(container.NewGridWrap(fyne.NewSize(110, 36), r.entry), r.share), r.slider))
	}
	wb.comp.box.Refresh()
}

// newRow makes element sym's row at fraction x.
func (wb *workbench) newRow(sym string, x float64, on bool) *compRow {
	r := &compRow{sym: sym}
	r.slider = widget.NewSlider(rowLogMin, rowLogMax)
	r.slider.Step = 0.01
	r.slider.Value = math.Max(rowLogMin, math.Min(rowLogMax, math.Log10(x)))
	r.entry = widget.NewEntry()
	r.entry.SetText(strconv.FormatFloat(x, 'g', 4, 64))
	r.share = widget.NewLabel(fmt.Sprintf("%.2g", x))
	r.on = widget.NewCheck("", nil)
	r.on.Checked = on
	if !on {
		r.slider.Disable()
		r.entry.Disable()
		r.share.SetText("off")
	}
	r.slider.OnChanged = func(v float64) { r.entry.SetText(strconv.FormatFloat(math.Pow(10, v), 'g', 4, 64)) }
	r.slider.OnChangeEnded = func(v float64) { wb.setFraction(sym, math.Pow(10, v)) }
	r.entry.OnSubmitted = func(t string) {
		x, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil || !(x > 0 && x < 1) {
			wb.status.SetText(fmt.Sprintf("%s: %q is not a mass fraction between 0 and 1: not applied", sym, t))
			return
		}
		wb.setFraction(sym, x)
	}
	r.on.OnChanged = func(checked bool) {
		if wb.syncing {
			return
		}
		if checked {
			wb.setFraction(sym, wb.comp.off[sym])
			return
		}
		c, err := wb.sess.MassFractions.Without(sym)
		if err != nil {
			wb.status.SetText(err.Error())
			wb.syncControls()
			return
		}
		wb.comp.off[sym] = x
		wb.setComposition(c, sym+" switched off; the others renormalised")
	}
	return r
}

// setFraction puts element sym at mass fraction x, the others scaled to
// make up the rest.
func (wb *workbench) setFraction(sym string, x float64) {
	if wb.syncing {
		return
	}
	c, err := wb.sess.MassFractions.WithFraction(sym, x)
	if err != nil {
		wb.status.SetText(err.Error() + ": not applied")
		wb.syncControls()
		return
	}
	wb.setComposition(c, fmt.Sprintf("%s at %.3g; the others renormalised", sym, x))
}

// setComposition makes c the session's mix, shows it and recomputes.
func (wb *workbench) setComposition(c core.Composition, why string) {
	wb.sess.MassFractions = c
	wb.note = why
	wb.syncControls()
	wb.recompute()
}

package gui

import (
	"fmt"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
	"broadline/linelists"
)

// The Open line lists… form: line lists in our format, or a table in a
// layout of its own read through a column map with a preview of its first
// rows; they replace the dataset's lists (or join them), and Save
// dataset… keeps them in the dataset file (imported_line_files).

// linesForm holds the widgets of the Open line lists… form.
type linesForm struct {
	files, levels, columns, species *widget.Entry
	header, keep                    *widget.Check
	medium                          *widget.Select
}

func newLinesForm() *linesForm {
	e := func(hint string) *widget.Entry {
		w := widget.NewEntry()
		w.SetPlaceHolder(hint)
		return w
	}
	f := &linesForm{
		files: e("line-list files, comma-separated (.gz too)"), levels: e("levels files (optional)"),
		columns: e("for a table of your own: wavelength=1:nm,species=2,log_gf=3,lower_energy=4:cm-1,lower_j=5"),
		species: e("species of every line, e.g. Nd II (when there is no species column)"),
		header:  widget.NewCheck("the first row names the columns", nil),
		keep:    widget.NewCheck("keep the dataset's own line lists too", nil),
		medium:  widget.NewSelect([]string{"as the file says (else vacuum)", "air", "vacuum"}, nil),
	}
	f.medium.SetSelectedIndex(0)
	return f
}

// lists reads the form: without a column map the files are in our
// format; with one, each is a table read through it.
func (f *linesForm) lists() (core.LineLists, error) {
	var l core.LineLists
	for _, p := range strings.Split(f.files.Text, ",") {
		if p = strings.TrimSpace(p); p != "" {
			l.Files = append(l.Files, p)
		}
	}
	for _, p := range strings.Split(f.levels.Text, ",") {
		if p = strings.TrimSpace(p); p != "" {
			l.Levels = append(l.Levels, p)
		}
	}
	if len(l.Files) == 0 {
		return l, fmt.Errorf("files: name at least one line list")
	}
	l.Keep = f.keep.Checked
	if cols := strings.TrimSpace(f.columns.Text); cols != "" {
		medium := ""
		if i := f.medium.SelectedIndex(); i > 0 {
			medium = f.medium.Selected
		}
		for _, p := range l.Files {
			imp := core.ImportedLineFile{File: p, Columns: cols, HeaderRow: f.header.Checked,
				Species: strings.TrimSpace(f.species.Text), Medium: medium}
			if _, err := imp.Import(); err != nil {
				return l, err
			}
			l.Imported = append(l.Imported, imp)
		}
		l.Files = nil
	}
	return l, nil
}

// previewText is the first rows of the form's first file and how they
// read, or the reader's message.
func (f *linesForm) previewText() string {
	l, err := f.lists()
	if err != nil {
		return core.UserMessage(err)
	}
	imp := core.ImportedLineFile{}
	if len(l.Imported) > 0 {
		imp = l.Imported[0]
	} else {
		imp.File = l.Files[0]
	}
	raw, lines, err := core.PreviewLineTable(imp, 8)
	var b strings.Builder
	b.WriteString("First rows of " + imp.File + ":\n" + raw + "\n")
	if err != nil {
		b.WriteString("Not read: " + core.UserMessage(err))
		return b.String()
	}
	b.WriteString("Read as (vacuum wavelength, species, log gf, lower level):\n")
	for _, ln := range lines {
		fmt.Fprintf(&b, "  %.3f Å  %s  %+.3f  %.4f eV\n", ln.Wavelength, ln.Species, ln.LogGF, ln.LowerEV)
	}
	return b.String()
}

// openLinesDialog asks for line lists (and how to read a table) and loads
// them.
func (wb *workbench) openLinesDialog() {
	f := newLinesForm()
	preview := widget.NewLabel("")
	preview.TextStyle = fyne.TextStyle{Monospace: true}
	preview.Wrapping = fyne.TextWrapBreak
	previewBtn := widget.NewButton("Preview the first rows", func() { preview.SetText(f.previewText()) })
	scroll := container.NewVScroll(preview)
	scroll.SetMinSize(fyne.NewSize(760, 200))
	items := []*widget.FormItem{
		widget.NewFormItem("Line lists", wb.browse(f.files, false, true)), widget.NewFormItem("Levels files", wb.browse(f.levels, false, true)),
		widget.NewFormItem("Column map", f.columns), widget.NewFormItem("", f.header),
		widget.NewFormItem("Species", f.species), widget.NewFormItem("Wavelengths in", f.medium),
		widget.NewFormItem("", f.keep), widget.NewFormItem("", previewBtn), widget.NewFormItem("", scroll),
	}
	d := dialog.NewForm("Open line lists", "Open", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		l, err := f.lists()
		if err != nil {
			wb.showError(err)
			return
		}
		wb.startOpenLines(l)
	}, wb.win)
	d.Resize(fyne.NewSize(960, 640))
	d.Show()
}

// startOpenLines loads line lists l off the UI goroutine with the loader's
// progress and Cancel; the window then shows the dataset with them, the
// session as it was.
func (wb *workbench) startOpenLines(l core.LineLists) {
	ctx, gen := wb.begin(true, "reading the line lists…")
	s := wb.sess.Clone()
	go func() {
		nb, err := wb.bench.WithLineLists(ctx, l, func(p linelists.Progress) {
			frac := float64(p.Index)
			if p.Total > 0 {
				frac += float64(p.Done) / float64(p.Total)
			}
			wb.progressFunc(gen)(int(1000*frac), 1000*max(p.Files, 1))
		})
		note := ""
		if err == nil {
			s.Dataset = nb.Name
			note = fmt.Sprintf("line lists: %d lines; Session ▸ Save dataset… keeps them in a dataset file", nb.Store.Len())
			for _, w := range nb.LoadWarnings {
				note += "\n• " + w
			}
		}
		fyne.Do(func() { wb.finishReplace(gen, nb, s, note, err) })
	}()
}

// refreshRecent fills Session ▸ Open recent from the recent-files list in
// the state directory (empty without one).
func (wb *workbench) refreshRecent() {
	if wb.recentItem == nil {
		return
	}
	var items []*fyne.MenuItem
	if dir := wb.daily.stateDir; dir != "" {
		rs, err := core.LoadRecent(dir)
		if err != nil {
			wb.status.SetText(core.UserMessage(err))
		}
		for _, r := range rs {
			r := r
			items = append(items, fyne.NewMenuItem(r.Kind+": "+r.Path, func() {
				if r.Kind == "session" {
					wb.startOpenSession(r.Path)
				} else {
					wb.startOpenDataset(r.Path)
				}
			}))
		}
	}
	if len(items) == 0 {
		none := fyne.NewMenuItem("(none yet)", nil)
		none.Disabled = true
		items = append(items, none)
	}
	wb.recentItem.ChildMenu = fyne.NewMenu("", items...)
	if mm := wb.win.MainMenu(); mm != nil {
		mm.Refresh()
	}
}

// noteRecent puts path (a "session" or "dataset" file just opened or
// saved) at the top of the recent files.
func (wb *workbench) noteRecent(path, kind string) {
	if wb.daily.stateDir == "" {
		return
	}
	if _, err := core.AddRecent(wb.daily.stateDir, path, kind); err != nil {
		wb.status.SetText(core.UserMessage(err))
		return
	}
	wb.refreshRecent()
}

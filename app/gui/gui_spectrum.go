package gui

import (
	"errors"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
)

// The Add a spectrum… form: how to read a spectrum file (the dataset
// format's per-epoch read options) and prepare it (dereddening, telluric
// bands, rest frame), its days since explosion; the spectrum becomes a new
// epoch of the shown dataset (core.Bench.WithEpoch), and Save dataset…
// writes the result as a dataset file.

// spectrumForm holds the widgets of the Add a spectrum… form.
type spectrumForm struct {
	file, days, hdu, band, row        *widget.Entry
	waveCol, fluxCol, uncCol, maskCol *widget.Entry
	waveUnit, fluxUnit                *widget.Entry
	ebv, rv, redshift                 *widget.Entry
	resolving, distance               *widget.Entry
	medium, mask, law                 *widget.Select
	mergeRows, telluric               *widget.Check
}

// The choices of the form's selectors.
var (
	mediumChoices = []string{"as the file says (else vacuum)", "air", "vacuum"}
	maskChoices   = []string{"non-zero = bad (default)", "1 = good", "ignore the mask"}
	lawChoices    = []string{"ccm89", "f99"}
)

func (wb *workbench) newSpectrumForm() *spectrumForm {
	e := func(hint string) *widget.Entry {
		w := widget.NewEntry()
		w.SetPlaceHolder(hint)
		return w
	}
	f := &spectrumForm{
		file: e("path of a FITS or text spectrum (.gz, .bz2 too)"), days: e("days since explosion (required)"),
		hdu: e("FITS extension (default: the first with a spectrum)"), band: e("image row band, from 1"), row: e("table row, from 1"),
		waveCol: e("wavelength column"), fluxCol: e("flux column"), uncCol: e("uncertainty column"), maskCol: e("mask column"),
		waveUnit: e("e.g. Angstrom, nm, um (if the file does not say)"), fluxUnit: e("e.g. 1e-17 erg/s/cm2/Angstrom, mJy"),
		ebv: e("Milky Way E(B−V), mag (0: none)"), rv: e("R_V (default 3.1)"), redshift: e("z (0: already rest frame)"),
		medium: widget.NewSelect(mediumChoices, nil), mask: widget.NewSelect(maskChoices, nil), law: widget.NewSelect(lawChoices, nil),
		mergeRows: widget.NewCheck("merge table rows (segments)", nil), telluric: widget.NewCheck("flag the telluric bands (ground-based spectra)", nil),
	}
	f.medium.SetSelectedIndex(0)
	f.mask.SetSelectedIndex(0)
	f.law.SetSelectedIndex(0)
	f.resolving, f.distance = widget.NewEntry(), widget.NewEntry()
	f.resolving.SetText(strconv.FormatFloat(wb.bench.Data.ResolvingPower, 'g', -1, 64))
	f.distance.SetText(strconv.FormatFloat(wb.bench.Data.DistanceMpc, 'g', -1, 64))
	return f
}

// instrument reads the resolving power and distance (Mpc) fields.
func (f *spectrumForm) instrument() (R, dist float64, err error) {
	R, err1 := strconv.ParseFloat(strings.TrimSpace(f.resolving.Text), 64)
	dist, err2 := strconv.ParseFloat(strings.TrimSpace(f.distance.Text), 64)
	if err1 != nil || !(R > 0) {
		return 0, 0, fmt.Errorf("resolving power %q: want λ/Δλ of the spectra, a number > 0", f.resolving.Text)
	}
	if err2 != nil || !(dist > 0) {
		return 0, 0, fmt.Errorf("distance %q: want the distance in Mpc, a number > 0", f.distance.Text)
	}
	return R, dist, nil
}

// epoch reads the form into a dataset epoch, naming the field at fault.
func (f *spectrumForm) epoch() (core.Epoch, error) {
	num := func(name string, w *widget.Entry) (float64, error) {
		t := strings.TrimSpace(w.Text)
		if t == "" {
			return 0, nil
		}
		x, err := strconv.ParseFloat(t, 64)
		if err != nil {
			return 0, fmt.Errorf("%s %q: not a number", name, t)
		}
		return x, nil
	}
	whole := func(name string, w *widget.Entry) (int, error) {
		t := strings.TrimSpace(w.Text)
		if t == "" {
			return 0, nil
		}
		n, err := strconv.Atoi(t)
		if err != nil || n < 0 {
			return 0, fmt.Errorf("%s %q: want a whole number ≥ 0", name, t)
		}
		return n, nil
	}
	var e core.Epoch
	e.File = strings.TrimSpace(f.file.Text)
	if e.File == "" {
		return e, errors.New("file: name the spectrum to add")
	}
	var errs []error
	var err error
	e.Days, err = num("days", f.days)
	errs = append(errs, err)
	if err == nil && !(e.Days > 0) {
		errs = append(errs, errors.New("days: give the time since explosion in days (the model needs it; an MJD is not taken for it)"))
	}
	r := &core.EpochRead{WaveColumn: strings.TrimSpace(f.waveCol.Text), FluxColumn: strings.TrimSpace(f.fluxCol.Text),
		UncColumn: strings.TrimSpace(f.uncCol.Text), MaskColumn: strings.TrimSpace(f.maskCol.Text),
		WaveUnit: strings.TrimSpace(f.waveUnit.Text), FluxUnit: strings.TrimSpace(f.fluxUnit.Text), MergeRows: f.mergeRows.Checked}
	if strings.TrimSpace(f.hdu.Text) != "" {
		n, err := whole("HDU", f.hdu)
		errs = append(errs, err)
		r.HDU = &n
	}
	r.Band, err = whole("band", f.band)
	errs = append(errs, err)
	r.Row, err = whole("row", f.row)
	errs = append(errs, err)
	switch f.medium.SelectedIndex() {
	case 1:
		r.Medium = "air"
	case 2:
		r.Medium = "vacuum"
	}
	switch f.mask.SelectedIndex() {
	case 1:
		r.MaskGood = true
	case 2:
		r.IgnoreMask = true
	}
	if *r != (core.EpochRead{}) {
		e.Read = r
	}
	p := &core.Preparation{MaskTelluric: f.telluric.Checked}
	p.EBV, err = num("E(B−V)", f.ebv)
	errs = append(errs, err)
	p.RV, err = num("R_V", f.rv)
	errs = append(errs, err)
	p.Redshift, err = num("redshift", f.redshift)
	errs = append(errs, err)
	if p.EBV > 0 {
		p.Law = f.law.Selected
	}
	if *p != (core.Preparation{}) {
		e.Prepare = p
	}
	if err := errors.Join(errs...); err != nil {
		return e, err
	}
	if err := e.Read.Check(); err != nil {
		return e, err
	}
	return e, e.Prepare.Check()
}

// addSpectrumDialog asks for a spectrum and how to read and prepare it.
func (wb *workbench) addSpectrumDialog() { wb.addSpectrumDialogFor("") }

// addSpectrumDialogFor is addSpectrumDialog with the file filled in.
func (wb *workbench) addSpectrumDialogFor(file string) {
	f := wb.newSpectrumForm()
	f.file.SetText(file)
	note := widget.NewLabel("The spectrum becomes a new epoch of this dataset, with its line lists and ejecta; the resolving\n" +
		"power and distance apply to every epoch of the dataset.\n" +
		"Leave a field empty to take it from the file. Session ▸ Save dataset… keeps the result as a dataset file.")
	items := []*widget.FormItem{
		widget.NewFormItem("File", wb.browse(f.file, false, false)), widget.NewFormItem("Days since explosion", f.days),
		widget.NewFormItem("FITS HDU", f.hdu), widget.NewFormItem("Band / row", container.NewGridWithColumns(3, f.band, f.row, f.mergeRows)),
		widget.NewFormItem("Columns", container.NewGridWithColumns(4, f.waveCol, f.fluxCol, f.uncCol, f.maskCol)),
		widget.NewFormItem("Units", container.NewGridWithColumns(2, f.waveUnit, f.fluxUnit)),
		widget.NewFormItem("Wavelengths in", f.medium), widget.NewFormItem("Mask", f.mask),
		widget.NewFormItem("Dereddening", container.NewGridWithColumns(3, f.ebv, f.rv, f.law)),
		widget.NewFormItem("Telluric bands", f.telluric), widget.NewFormItem("Redshift", f.redshift),
		widget.NewFormItem("Resolving power, distance (Mpc)", container.NewGridWithColumns(2, f.resolving, f.distance)),
		widget.NewFormItem("", note),
	}
	d := dialog.NewForm("Add a spectrum", "Add", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		e, err := f.epoch()
		if err == nil {
			var R, dist float64
			if R, dist, err = f.instrument(); err == nil {
				wb.startAddEpochAt(e, R, dist)
				return
			}
		}
		wb.showError(err)
	}, wb.win)
	d.Resize(fyne.NewSize(1000, 640))
	d.Show()
}

// startAddEpoch reads and prepares epoch e's spectrum off the UI goroutine;
// the window then shows the dataset with it, on the new epoch, the current
// composition kept. A file that cannot be read leaves everything as it was
// and says why.
func (wb *workbench) startAddEpoch(e core.Epoch) {
	wb.startAddEpochAt(e, wb.bench.Data.ResolvingPower, wb.bench.Data.DistanceMpc)
}

// startAddEpochAt is startAddEpoch with the dataset's resolving power and
// distance (for every epoch) set to R and dist.
func (wb *workbench) startAddEpochAt(e core.Epoch, R, dist float64) {
	_, gen := wb.begin(true, "reading "+e.File+"…") // a read is quick: nothing to cancel
	s := *wb.sess                                   // the goroutine works on copies
	s.Candidates = append([]core.Candidate(nil), s.Candidates...)
	old := len(wb.bench.LoadWarnings)
	go func() {
		nb, err := wb.bench.WithEpoch(e)
		if err == nil && (R != nb.Data.ResolvingPower || dist != nb.Data.DistanceMpc) {
			nb, err = nb.WithInstrument(R, dist)
		}
		note := ""
		if err == nil {
			s.Dataset = nb.Name
			_, err = s.SwitchEpoch(nb.Data, len(nb.Data.Epochs)-1)
			note = fmt.Sprintf("added %s as epoch %d (%g d); Session ▸ Save dataset… keeps it", e.File, len(nb.Data.Epochs), e.Days)
			for _, w := range nb.LoadWarnings[old:] {
				note += "\n• " + w
			}
		}
		fyne.Do(func() { wb.finishReplace(gen, nb, &s, note, err) })
	}()
}

// saveDatasetDialog asks where to write the shown dataset as a file.
func (wb *workbench) saveDatasetDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("dataset.json"))
	dialog.ShowForm("Save dataset", "Save", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("Dataset file", wb.browse(path, true, false)),
			widget.NewFormItem("", widget.NewLabel("The dataset's files are named by absolute paths (the demo's are written beside it).")),
		},
		func(ok bool) {
			if !ok {
				return
			}
			wb.confirmOverwrite(path.Text, func() {
				if err := wb.bench.SaveDataset(path.Text); err != nil {
					wb.showError(err)
					return
				}
				wb.sess.Dataset = wb.bench.Name
				wb.status.SetText("dataset saved to " + wb.bench.Name)
				wb.noteRecent(wb.bench.Name, "dataset")
			})
		}, wb.win)
}

// dropped opens what was dropped onto the window: a session file (JSON
// with a "dataset" key) with its dataset, a dataset file (JSON with
// "epochs"), or anything else as a spectrum to add, in the Add a spectrum…
// form with the file filled in. One file at a time; a file that cannot be
// opened says why and changes nothing.
func (wb *workbench) dropped(_ fyne.Position, uris []fyne.URI) {
	if len(uris) == 0 {
		return
	}
	if len(uris) > 1 {
		wb.status.SetText(fmt.Sprintf("%d files dropped: drop one at a time", len(uris)))
		return
	}
	path := uris[0].Path()
	switch core.SniffJSON(path) {
	case core.SessionFile:
		wb.startOpenSession(path)
	case core.DatasetFile:
		wb.startOpenDataset(path)
	default:
		wb.addSpectrumDialogFor(path)
	}
}

// startOpenSession opens the session saved at path with its dataset off
// the UI goroutine and shows it in this window.
func (wb *workbench) startOpenSession(path string) {
	wb.stop()
	ctx, gen := wb.begin(true, "opening the session "+path+"…")
	go func() {
		b, s, err := core.OpenSession(ctx, path, nil)
		fyne.Do(func() {
			if err == nil && wb.daily.stateDir != "" {
				if _, rerr := core.AddRecent(wb.daily.stateDir, path, "session"); rerr != nil {
					fyne.LogError("recent files", rerr)
				}
			}
			wb.finishReplace(gen, b, s, "", err)
		})
	}()
}

// browse returns entry e with a Browse… button beside it that chooses a
// file in the toolkit's file dialog and puts its path in e (with save, a
// folder for the file named in e); with add, a chosen path is added to a
// comma-separated list instead of replacing it.
func (wb *workbench) browse(e *widget.Entry, save, add bool) fyne.CanvasObject {
	set := func(p string) {
		if add && strings.TrimSpace(e.Text) != "" {
			p = e.Text + ", " + p
		}
		e.SetText(p)
	}
	btn := widget.NewButton("Browse…", func() {
		if save {
			// A folder, keeping the file name typed: the toolkit's save
			// dialog would create (or truncate) the file before the form
			// is confirmed, which must never happen to an existing file.
			d := dialog.NewFolderOpen(func(u fyne.ListableURI, err error) {
				if err == nil && u != nil {
					e.SetText(filepath.Join(u.Path(), filepath.Base(strings.TrimSpace(e.Text))))
				}
			}, wb.win)
			d.Resize(fyne.NewSize(900, 600))
			d.Show()
			return
		}
		d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
			if err == nil && r != nil {
				r.Close()
				set(r.URI().Path())
			}
		}, wb.win)
		d.Resize(fyne.NewSize(900, 600))
		d.Show()
	})
	return container.NewBorder(nil, nil, nil, btn, e)
}

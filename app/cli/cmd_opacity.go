package cli

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"runtime"
	"strconv"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
)

func init() {
	c := &command{
		name: "opacity",
		args: "--lines FILE… --mass-fractions LIST --temperature K --density G_CM3 --days D " +
			"--from-um A --to-um B --bin-um W [--levels FILE…] [--overrides FILE] [--census TAU]",
		summary: "binned expansion opacity with a column per element (CSV wavelength_um,kappa_cm2_g,<element>…)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runOpacity(c, args, stdout, stderr) }
	register(c)
}

// maxOpacityBins bounds the grid the opacity command writes.
const maxOpacityBins = 10_000_000

func runOpacity(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	pf := addPlasmaFlags(fs, "line-list `FILE` (required; repeatable, or comma-separated)")
	daysF := floatFlag(fs, "days", "time since explosion `D` in days (required, > 0)")
	fromF := floatFlag(fs, "from-um", "start `UM` of the first bin, µm, vacuum (required)")
	toF := floatFlag(fs, "to-um", "end `UM` of the range, µm, vacuum (required); the last bin may reach past it")
	binF := floatFlag(fs, "bin-um", "bin width `UM` in µm (required); a line at λ belongs to the bin [edge_k, edge_k+1)")
	census := fs.Float64("census", 0, "also report on stderr, per species, how many lines have a Sobolev optical depth above `TAU` (> 0)")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("unexpected argument %q (give several files as --lines A --lines B, or --lines A,B)", pos[0])
	}

	// Every value is checked before any file is read.
	if len(pf.lines) == 0 {
		return usagef("--lines: at least one line-list file is needed")
	}
	comp, err := pf.check()
	if err != nil {
		return err
	}
	for _, f := range []struct {
		name, what string
		v          *requiredFloat
	}{{"days", "time since explosion in days", daysF}, {"from-um", "wavelength in µm", fromF},
		{"to-um", "wavelength in µm", toF}, {"bin-um", "bin width in µm", binF}} {
		if err := f.v.positive(f.name, f.what); err != nil {
			return err
		}
	}
	days, from, to, bin := daysF.value(), fromF.value(), toF.value(), binF.value()
	if *census < 0 || math.IsNaN(*census) || math.IsInf(*census, 0) {
		return usagef("--census %g: want a finite optical depth > 0", *census)
	}
	if !(to > from) {
		return usagef("--from-um %g --to-um %g: empty range (want from < to)", from, to)
	}
	if n := math.Ceil((to - from) / bin); n > maxOpacityBins {
		return usagef("--bin-um %g: %g bins in %g–%g µm (at most %d)", bin, n, from, to, maxOpacityBins)
	}
	grid, err := opacity.LinearGrid(from*1e4, to*1e4, bin*1e4)
	if err != nil {
		return usagef("--bin-um %g: %v", bin, err)
	}
	lo, hi := grid.Edges[0], grid.Edges[grid.Bins()]

	// Only lines inside the grid contribute; the loader counts the others.
	st, rep, err := pf.load(linelists.Filter{MinWavelength: lo, MaxWavelength: math.Nextafter(hi, 0)})
	if err != nil {
		return err
	}
	p, err := opacity.SolveAtoms(comp, pf.density.value(), pf.temp.value(), opacity.StoreAtoms(st))
	if err != nil {
		return err
	}
	workers := runtime.GOMAXPROCS(0)
	x, err := opacity.ExpansionOpacity(context.Background(), st, p, days*physics.Day, grid, workers)
	if err != nil {
		return err
	}

	var buf bytes.Buffer
	buf.WriteString("wavelength_um,kappa_cm2_g")
	for _, z := range x.Elements {
		el, _ := linelists.ElementByZ(z)
		buf.WriteByte(',')
		buf.WriteString(el.Symbol)
	}
	buf.WriteByte('\n')
	for k := range x.Kappa {
		buf.WriteString(strconv.FormatFloat(grid.Center(k)*1e-4, 'g', 10, 64))
		buf.WriteByte(',')
		buf.WriteString(strconv.FormatFloat(x.Kappa[k], 'g', 8, 64))
		for r := range x.Elements {
			buf.WriteByte(',')
			buf.WriteString(strconv.FormatFloat(x.ByElement[r][k], 'g', 8, 64))
		}
		buf.WriteByte('\n')
	}
	if _, err := stdout.Write(buf.Bytes()); err != nil {
		return err
	}
	grey, _ := x.Grey(lo, hi)
	fmt.Fprintf(stderr, "opacity: %d lines in %d bins of %g µm from %g µm (%d outside the bins skipped, %d of elements or stages not modelled); "+
		"n_e = %.4g cm⁻³; grey κ = %.4g and Planck-mean κ = %.4g cm² g⁻¹ over %g–%g µm at %g K\n",
		x.Lines, grid.Bins(), bin, from, rep.Skipped.Wavelength, x.Unmodelled, p.ElectronDensity,
		grey, x.PlanckMean(p.Temperature), lo*1e-4, hi*1e-4, p.Temperature)
	if *census > 0 {
		tau := make([]float64, st.Len())
		lev := opacity.PlasmaLevelDensities(nil, st, p)
		if err := opacity.Sobolev(context.Background(), tau, st, lev, p.Temperature, days*physics.Day, workers); err != nil {
			return err
		}
		writeCensus(stderr, opacity.CountAbove(st, tau, *census))
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(stderr, "opacity: warning:", w)
	}
	return nil
}

// writeCensus prints one line: per species, the lines above the threshold
// out of all its lines in the range.
func writeCensus(w io.Writer, c opacity.Census) {
	var b bytes.Buffer
	fmt.Fprintf(&b, "opacity: lines with Sobolev τ > %g: %d in all", c.Threshold, c.AboveAll)
	for i, sp := range c.Species {
		fmt.Fprintf(&b, "; %s %d of %d", sp, c.Above[i], c.Total[i])
	}
	b.WriteByte('\n')
	w.Write(b.Bytes())
}

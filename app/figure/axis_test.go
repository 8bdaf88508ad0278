package figure

import (
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot"

	"broadline/app/core"
)

// TestYAxisFitsEverythingDrawn: a model drawn three times above the
// observed flux, and a knock-out five times above, are inside the y axis
// (the axis used to stop 15 % above the data, clipping such a model); the
// tick labels are plain numbers in units of the power of ten that the
// axis label names.
func TestYAxisFitsEverythingDrawn(t *testing.T) {
	b := demoBench(t)
	obs := b.Observed[0]
	high := &core.Overlay{Wavelength: obs.Wavelength, Flux: make([]float64, obs.Len())}
	for i := range high.Flux {
		high.Flux[i] = 3 * obs.Flux[i]
	}
	p, err := Spectrum(obs, high, "high model", core.UnitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	top := slices.Max(high.Flux)
	if p.Y.Max < top {
		t.Errorf("y axis ends at %g, below the model's %g", p.Y.Max, top)
	}
	if p.Y.Max > 1.2*top {
		t.Errorf("y axis ends at %g, far above everything drawn (%g)", p.Y.Max, top)
	}
	knock := make([]float64, obs.Len())
	for i := range knock {
		knock[i] = 5 * obs.Flux[i]
	}
	if err := AddSpectrumCurve(p, obs.Wavelength, knock, core.UnitOf(""), KnockOutStyle, "knock-out"); err != nil {
		t.Fatal(err)
	}
	if top := slices.Max(knock); p.Y.Max < top || p.Y.Max > 1.2*top {
		t.Errorf("after a knock-out up to %g the y axis ends at %g", top, p.Y.Max)
	}
	// The demo's flux is of order 10⁻¹⁷ erg/s/cm²/Å (peak 5.6e-17 here).
	exp := CommonExponent(p.Y.Max)
	if want := "flux (10" + Superscript(exp) + " erg/s/cm²/Å)"; p.Y.Label.Text != want {
		t.Errorf("y label %q, want %q", p.Y.Label.Text, want)
	}
	var labels []string
	for _, tk := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
			if strings.ContainsAny(tk.Label, "e") {
				t.Errorf("tick label %q has an exponent", tk.Label)
			}
		}
	}
	if len(labels) < 3 {
		t.Errorf("tick labels %q", labels)
	}
}

// TestScaledTicksAndSuperscript: hand-checked values.
func TestScaledTicksAndSuperscript(t *testing.T) {
	for n, want := range map[int]string{-17: "⁻¹⁷", 0: "⁰", 23: "²³", -9: "⁻⁹", 1: "¹"} {
		if got := Superscript(n); got != want {
			t.Errorf("Superscript(%d) = %q, want %q", n, got, want)
		}
	}
	for top, want := range map[float64]int{6e-17: -17, 1.2e-16: -16, 1e-17: -17, 1.5: 0, 0.05: 0, 2.5e4: 4, 0: 0} {
		if got := CommonExponent(top); got != want {
			t.Errorf("CommonExponent(%g) = %d, want %d", top, got, want)
		}
	}
	var got []string
	for _, tk := range (ScaledTicks{Exp: -17}).Ticks(0, 6.9e-17) {
		if tk.Label != "" {
			got = append(got, tk.Label)
		}
	}
	// The same labels as gonum's default ticker gives for 0..6.9 itself.
	var want []string
	for _, tk := range (plot.DefaultTicks{}).Ticks(0, 6.9) {
		if tk.Label != "" {
			want = append(want, tk.Label)
		}
	}
	if strings.Join(got, " ") != strings.Join(want, " ") || len(got) < 2 {
		t.Errorf("ticks of 0..6.9e-17 in 10⁻¹⁷: %q, want %q", got, want)
	}
}

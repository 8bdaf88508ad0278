package core

import (
	"context"
	"math"
	"strings"
	"testing"

	"broadline/spectra"
)

// TestIdentifyDemo attributes the features of the demo's first epoch at the
// recorded (true) parameters. The invented data were made with Sr at 3 % and
// an invented Sr II list that has lines at 1.03–1.09 µm; at v_ph = 0.24 c
// they act near 0.78–0.83 µm, so the model must name Sr, through Sr II
// lines, in the feature at 0.78 µm. For every feature the element shares
// are sorted and add up to 1, and the listed lines act inside the window.
func TestIdentifyDemo(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	all, err := spectra.FindFeatures(b.Observed[0], spectra.FeatureOptions{ResolvingPower: 150})
	if err != nil {
		t.Fatal(err)
	}
	var feats []spectra.Feature
	for _, f := range all {
		if f.Significance >= 5 {
			feats = append(feats, f)
		}
	}
	calls := 0
	attr, err := b.Identify(context.Background(), s.Model, feats, func(done, total int) { calls = done })
	if err != nil {
		t.Fatal(err)
	}
	if len(attr) != len(feats) || calls != len(feats) {
		t.Fatalf("%d attributions, %d progress calls for %d features", len(attr), calls, len(feats))
	}
	found := false
	for i, a := range attr {
		f := feats[i]
		t.Logf("%.4f µm: %s; %s", f.Wavelength/1e4, ElementsText(a), LinesText(a))
		sum := 0.0
		for k, e := range a.Elements {
			sum += e.Share
			if k > 0 && e.Share > a.Elements[k-1].Share {
				t.Errorf("feature %d: shares not sorted", i)
			}
		}
		if math.Abs(sum-1) > 1e-9 {
			t.Errorf("feature %d: shares add up to %g", i, sum)
		}
		for _, l := range a.Lines {
			if l.Acting < a.From || l.Acting > a.To {
				t.Errorf("feature %d: line %v acts at %.1f Å, outside %.1f–%.1f", i, l.Species, l.Acting, a.From, a.To)
			}
		}
		if math.Abs(f.Wavelength-7842) < 100 {
			found = strings.Contains(ElementsText(a), "Sr ") && strings.Contains(LinesText(a), "Sr II 10")
		}
	}
	if !found {
		t.Error("the 0.78-µm feature is not attributed to Sr through its Sr II lines")
	}
}

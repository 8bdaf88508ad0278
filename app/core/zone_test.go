package core

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"
)

// TestDemoZones checks the demo's two zones as the workbench gets them:
// every epoch starts with the recorded inner zone; the first two
// photospheres lie above it (only the outer mix forms lines), the last
// one inside it.
func TestDemoZones(t *testing.T) {
	b := demoBench(t)
	d := b.Data
	if d.InnerMassFractions.IsZero() || !(d.ZoneBoundary > 0) {
		t.Fatalf("demo dataset without an inner zone: %+v", d)
	}
	for i := range d.Epochs {
		m := d.StartModel(i)
		if !m.HasZone() || m.InnerMassFractions != d.InnerMassFractions || m.ZoneBoundary != d.ZoneBoundary {
			t.Errorf("epoch %d starts without the zone: %+v", i+1, m)
		}
		inside := strings.Contains(m.ZoneText(), "inside")
		if want := i == len(d.Epochs)-1; inside != want {
			t.Errorf("epoch %d: %q", i+1, m.ZoneText())
		}
	}
	if !strings.Contains(d.StartModel(0).Caption("A"), "inside") || strings.Contains(d.StartModel(0).WithoutZone().Caption("A"), "inside") {
		t.Errorf("captions %q / %q", d.StartModel(0).Caption("A"), d.StartModel(0).WithoutZone().Caption("A"))
	}
}

// TestZoneThroughBench checks the zone through Compute on the demo: an
// inner zone wholly below the photosphere gives the uniform model's flux
// exactly; on the last epoch the zone changes the model, and knocking out
// Nd there changes the model flux by more than 20 % somewhere in
// 1.0–2.4 µm (TestDemoNearInfraredKnockOut in internal/demogen pins the
// full criterion).
func TestZoneThroughBench(t *testing.T) {
	if testing.Short() {
		t.Skip("synthesises the demo")
	}
	b := demoBench(t)
	ctx := context.Background()
	first := b.Data.StartModel(0) // v_ph 0.24 c above the 0.16 c boundary
	withZone, err := b.Compute(ctx, first, 0)
	if err != nil {
		t.Fatal(err)
	}
	uniform, err := b.Compute(ctx, first.WithoutZone(), 0)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(withZone.Flux, uniform.Flux) {
		t.Error("an inner zone below the photosphere changed the flux")
	}
	last := b.Data.StartModel(len(b.Data.Epochs) - 1)
	zoned, err := b.Compute(ctx, last, 0)
	if err != nil {
		t.Fatal(err)
	}
	flat, err := b.Compute(ctx, last.WithoutZone(), 0)
	if err != nil {
		t.Fatal(err)
	}
	noNd, err := b.Compute(ctx, last, 60)
	if err != nil {
		t.Fatal(err)
	}
	maxZone, maxNd := 0.0, 0.0
	for i, l := range zoned.Wavelength {
		if l >= 10000 && l <= 24000 {
			maxZone = math.Max(maxZone, math.Abs(flat.Flux[i]/zoned.Flux[i]-1))
			maxNd = math.Max(maxNd, math.Abs(noNd.Flux[i]/zoned.Flux[i]-1))
		}
	}
	if maxZone < 0.2 || maxNd < 0.2 {
		t.Errorf("last epoch, 1.0–2.4 µm: the zone changes the flux by at most %.3g, the Nd knock-out by %.3g; want > 0.2 each", maxZone, maxNd)
	}
	if zoned.Reduced() >= flat.Reduced() {
		t.Errorf("last epoch: χ²/N %.3g with the recorded zone, %.3g without; the truth should fit better", zoned.Reduced(), flat.Reduced())
	}
}

// TestZoneSession checks that a session keeps the zone through save and
// read, that a uniform model writes no zone keys (so files stay as they
// were), that a session saved before zones existed still loads (as a
// uniform model), and that a half-given or misplaced zone is refused.
func TestZoneSession(t *testing.T) {
	b := demoBench(t)
	d := b.Data
	s := NewSession(b)
	s.InnerMassFractions = mustComp(t, "Nd=0.5,Sr=0.5")
	s.ZoneBoundary = 0.2
	var buf bytes.Buffer
	js, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	buf.Write(js)
	got, err := ReadSession(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if got.Model != s.Model || got.Validate(d) != nil {
		t.Errorf("round trip %+v, want %+v (%v)", got.Model, s.Model, got.Validate(d))
	}
	u := NewSession(b)
	u.Model = u.WithoutZone()
	js, _ = json.Marshal(u)
	if bytes.Contains(js, []byte("inner_mass_fractions")) || bytes.Contains(js, []byte("zone_boundary")) {
		t.Errorf("uniform session writes zone keys: %s", js)
	}
	// A session file as the program wrote it before zones existed.
	old := `{"version":1,"dataset":"demo","epoch":0,"photosphere_velocity_c":0.24,"temperature_k":5000,` +
		`"mass_fractions":"Sr=0.5,Ca=0.5","preview":false,"candidates":[{"label":"A","epoch":1,` +
		`"photosphere_velocity_c":0.17,"temperature_k":3700,"mass_fractions":"Sr=1","preview":true}]}`
	os, err := ReadSession(strings.NewReader(old))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Validate(d); err != nil || os.HasZone() || os.Candidates[0].HasZone() {
		t.Errorf("old session: %v, zone %v", err, os.HasZone())
	}
	for name, mod := range map[string]func(*Model){
		"boundary alone":       func(m *Model) { m.InnerMassFractions = Composition{} },
		"composition alone":    func(m *Model) { m.ZoneBoundary = 0 },
		"boundary outside":     func(m *Model) { m.ZoneBoundary = d.OuterVelocity },
		"boundary inside v_in": func(m *Model) { m.ZoneBoundary = d.InnerVelocity },
		"boundary NaN":         func(m *Model) { m.ZoneBoundary = math.NaN() },
	} {
		m := s.Model
		mod(&m)
		if err := m.Validate(d); err == nil || !strings.Contains(err.Error(), "zone") && !strings.Contains(err.Error(), "inner") {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// TestWithCompositions checks the workbench's entries: a blank inner mix
// gives uniform ejecta, a full one a zone read back from its texts, and a
// bad entry an error naming it with the model unchanged.
func TestWithCompositions(t *testing.T) {
	b := demoBench(t)
	d := b.Data
	m := d.StartModel(2)
	u, err := m.WithCompositions(d, "Sr=1", "  ", "0.2c")
	if err != nil || u.HasZone() || u.MassFractions != mustComp(t, "Sr=1") || u.BoundaryText() != "" {
		t.Errorf("blank inner zone: %+v, %v", u, err)
	}
	z, err := m.WithCompositions(d, "Sr=1", "Nd=1,Sr=1", "60000km/s")
	if err != nil || !z.HasZone() || math.Abs(z.ZoneBoundary-0.2001384) > 1e-6 {
		t.Fatalf("zone: %+v, %v", z, err)
	}
	// The texts the entries show read back to the same model.
	again, err := z.WithCompositions(d, z.MassFractions.String(), z.InnerMassFractions.String(), z.BoundaryText())
	if err != nil || again != z {
		t.Errorf("read back %+v (%v), want %+v", again, err, z)
	}
	for _, c := range []struct{ main, inner, boundary, want string }{
		{"Sr=x", "", "", "mass fractions"},
		{"Sr=1", "Nd=x", "0.2c", "inner zone mass fractions"},
		{"Sr=1", "Nd=1", "0.2", "zone boundary"},
		{"Sr=1", "Nd=1", "0.9c", "outer velocity"},
	} {
		got, err := m.WithCompositions(d, c.main, c.inner, c.boundary)
		if err == nil || !strings.Contains(err.Error(), c.want) || got != m {
			t.Errorf("%+v: %v (model changed: %v)", c, err, got != m)
		}
	}
}

// TestLineless checks the label of elements without lines on the demo:
// the demo's electron donors are named, its elements with lines are not.
func TestLineless(t *testing.T) {
	b := demoBench(t)
	got := b.Lineless(b.Data.StartModel(2))
	want := []string{"Se", "Br", "Kr", "Rb", "Mo", "Ru", "Pd", "Te", "Xe"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("lineless %v, want %v", got, want)
	}
	if s := LinelessText(got); !strings.Contains(s, "only supply electrons") || !strings.Contains(s, "Se, Br") {
		t.Errorf("label %q", s)
	}
	if LinelessText(nil) != "" {
		t.Error("label without lineless elements")
	}
}

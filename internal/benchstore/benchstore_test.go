package benchstore

import "testing"

// TestNew: the store has the lines asked for (none dropped as duplicates),
// in the 16 species, sorted, within 2500–50000 Å, and the same n gives
// the same store.
func TestNew(t *testing.T) {
	a, b := New(20000), New(20000)
	if a.Len() != 20000 || len(a.SpeciesTable) != len(Species) {
		t.Fatalf("%d lines in %d species", a.Len(), len(a.SpeciesTable))
	}
	if err := a.Check(); err != nil {
		t.Fatal(err)
	}
	if w0, w1 := a.Wavelength[0], a.Wavelength[a.Len()-1]; w0 < 2500 || w1 > 50000 {
		t.Errorf("range %g–%g Å", w0, w1)
	}
	for i := range a.Wavelength {
		if a.Wavelength[i] != b.Wavelength[i] || a.LogGF[i] != b.LogGF[i] {
			t.Fatalf("line %d differs between two calls", i)
		}
	}
}

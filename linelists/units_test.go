package linelists

import (
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestAirVacuum checks the IAU/Morton (2000) conversion against the pairs in
// ../shared/REFERENCES.md.
func TestAirVacuum(t *testing.T) {
	for _, tc := range []struct {
		air, vac, tol float64
		source        string
	}{
		{4861.363, 4862.721, 0.002, "Hβ, Morton 2000 [src]"},
		{12818.08, 12821.59, 0.005, "Paβ [src], given to 0.01 Å"},
		{6562.801, 6564.614, 0.002, "Hα [calc]"},
		{8542.09, 8544.44, 0.01, "Ca II, REFERENCES.md real strong lines"},
		{10327.31, 10330.14, 0.01, "Sr II, REFERENCES.md real strong lines"},
	} {
		if got := airToVacuum(tc.air); !scalar.EqualWithinAbs(got, tc.vac, tc.tol) {
			t.Errorf("airToVacuum(%v) = %.4f, want %.4f (%s)", tc.air, got, tc.vac, tc.source)
		}
		if got := vacuumToAir(tc.vac); !scalar.EqualWithinAbs(got, tc.air, tc.tol) {
			t.Errorf("vacuumToAir(%v) = %.4f, want %.4f (%s)", tc.vac, got, tc.air, tc.source)
		}
		// The two are inverse to far better than the table's rounding.
		if got := vacuumToAir(airToVacuum(tc.air)); !scalar.EqualWithinAbs(got, tc.air, 1e-8) {
			t.Errorf("round trip %v → %v", tc.air, got)
		}
	}
	if got := airToVacuum(1500); got != 1500 {
		t.Errorf("below 2000 Å the standard does not apply: got %v", got)
	}
}

// TestUnitConstants checks the derived constants against CODATA 2018 values
// (k = 8.617333262e-5 eV/K, hc = 1.239841984e-4 eV cm, NIST CODATA 2018).
func TestUnitConstants(t *testing.T) {
	if !scalar.EqualWithinRel(boltzmannEV, 8.617333262e-5, 1e-9) {
		t.Errorf("k = %v eV/K", boltzmannEV)
	}
	if !scalar.EqualWithinRel(invCmToEV, 1.239841984e-4, 1e-9) {
		t.Errorf("hc = %v eV cm", invCmToEV)
	}
}

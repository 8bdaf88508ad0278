package physics

import (
	"encoding/json"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestAirVacuumSpecutils checks Morton (2000) against specutils 1.9.1
// (refraction_index method "Morton2000"; air_to_vac scheme "iteration"),
// values written by testdata/spectra/gen_reference.py.
func TestAirVacuumSpecutils(t *testing.T) {
	raw, err := os.ReadFile("../testdata/spectra/reference_values.json")
	if err != nil {
		t.Fatal(err)
	}
	var r struct {
		VacToAir struct {
			Vacuum []float64 `json:"vacuum_A"`
			Air    []float64 `json:"air_A"`
		} `json:"vac_to_air"`
		AirToVac struct {
			Air    []float64 `json:"air_A"`
			Vacuum []float64 `json:"vacuum_A"`
		} `json:"air_to_vac"`
	}
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatal(err)
	}
	if len(r.VacToAir.Vacuum) == 0 || len(r.VacToAir.Vacuum) != len(r.VacToAir.Air) ||
		len(r.AirToVac.Air) == 0 || len(r.AirToVac.Air) != len(r.AirToVac.Vacuum) {
		t.Fatalf("reference file holds %d/%d vacuum→air and %d/%d air→vacuum values",
			len(r.VacToAir.Vacuum), len(r.VacToAir.Air), len(r.AirToVac.Air), len(r.AirToVac.Vacuum))
	}
	for i, v := range r.VacToAir.Vacuum {
		if got := VacuumToAir(v); !scalar.EqualWithinAbs(got, r.VacToAir.Air[i], 1e-8) {
			t.Errorf("VacuumToAir(%v) = %.10f, specutils %.10f", v, got, r.VacToAir.Air[i])
		}
	}
	for i, a := range r.AirToVac.Air {
		if got := AirToVacuum(a); !scalar.EqualWithinAbs(got, r.AirToVac.Vacuum[i], 1e-8) {
			t.Errorf("AirToVacuum(%v) = %.10f, specutils %.10f", a, got, r.AirToVac.Vacuum[i])
		}
	}
}

// TestAirVacuumPairs checks both directions on the pairs in
// shared/REFERENCES.md, to the precision they are quoted with.
func TestAirVacuumPairs(t *testing.T) {
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
		if got := AirToVacuum(tc.air); !scalar.EqualWithinAbs(got, tc.vac, tc.tol) {
			t.Errorf("AirToVacuum(%v) = %.4f, want %.4f (%s)", tc.air, got, tc.vac, tc.source)
		}
		if got := VacuumToAir(tc.vac); !scalar.EqualWithinAbs(got, tc.air, tc.tol) {
			t.Errorf("VacuumToAir(%v) = %.4f, want %.4f (%s)", tc.vac, got, tc.air, tc.source)
		}
	}
}

// TestAirVacuumInverse: the two directions are inverse to far better than
// any table's rounding, AirToVacuumAll is AirToVacuum per element, and
// below 2000 Å (IAU convention) nothing is converted.
func TestAirVacuumInverse(t *testing.T) {
	ws := []float64{2000, 2001, 4861.363, 5000, 8542.09, 25000, 1e5}
	for _, w := range ws {
		if got := VacuumToAir(AirToVacuum(w)); !scalar.EqualWithinRel(got, w, 1e-14) {
			t.Errorf("round trip %v → %v", w, got)
		}
	}
	all := append([]float64{1500}, ws...)
	AirToVacuumAll(all)
	if all[0] != 1500 {
		t.Errorf("AirToVacuumAll converted 1500 Å to %v", all[0])
	}
	for i, w := range ws {
		if all[i+1] != AirToVacuum(w) {
			t.Errorf("AirToVacuumAll: %v → %v, AirToVacuum gives %v", w, all[i+1], AirToVacuum(w))
		}
	}
	for _, w := range []float64{1500, 1999.999} {
		if AirToVacuum(w) != w || VacuumToAir(w) != w {
			t.Errorf("%v Å converted: %v, %v (wavelengths below 2000 Å stay as they are)", w, AirToVacuum(w), VacuumToAir(w))
		}
	}
	// Standard dry air (15 °C, 101325 Pa) at 5000 Å: n − 1 ≈ 2.79e-4, from
	// memory to three digits.
	if n := RefractiveIndexAir(5000); !scalar.EqualWithinAbs(n-1, 2.79e-4, 0.01e-4) {
		t.Errorf("n(5000 Å) − 1 = %v", n-1)
	}
}

package physics

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestConstantsAgainstAstropy compares every cgs constant with the values that
// Debian's python3-astropy 5.2.1 (CODATA 2018, IAU 2015) printed through
// testdata/constants/gen_constants.py.
func TestConstantsAgainstAstropy(t *testing.T) {
	raw, err := os.ReadFile("../testdata/constants/astropy_constants.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref map[string]any
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if ref["codata"] != "astropy.constants.codata2018" {
		t.Fatalf("reference file made with %v, want CODATA 2018", ref["codata"])
	}
	for _, tc := range []struct {
		key string
		got float64
		tol float64 // relative
	}{
		{"speed_of_light_cm_s", SpeedOfLight, 1e-15},
		{"planck_erg_s", Planck, 1e-15},
		{"boltzmann_erg_K", Boltzmann, 1e-15},
		{"atomic_mass_g", AtomicMass, 1e-15},
		{"electron_volt_erg", ElectronVolt, 1e-15},
		{"elementary_charge_esu", ElementaryCharge, 1e-15},
		{"electron_mass_g", ElectronMass, 1e-15},
		{"stefan_boltzmann_cgs", StefanBoltzmann, 1e-14},
		{"solar_mass_g", SolarMass, 1e-15},
		{"parsec_cm", Parsec, 1e-15},
		{"megaparsec_cm", Megaparsec, 1e-15},
		{"day_s", Day, 1e-15},
		{"angstrom_cm", Angstrom, 1e-15},
		{"micron_cm", Micron, 1e-15},
		{"nanometre_cm", Nanometre, 1e-15},
		{"jansky_cgs", Jansky, 1e-15},
	} {
		want, ok := ref[tc.key].(float64)
		if !ok {
			t.Errorf("%s: missing from reference file", tc.key)
			continue
		}
		if !scalar.EqualWithinRel(tc.got, want, tc.tol) {
			t.Errorf("%s = %.16g, astropy gives %.16g", tc.key, tc.got, want)
		}
	}
}

// TestDerivedConstants checks the derived combinations against the values in
// shared/REFERENCES.md, computed there from CODATA 2018 [calc].
func TestDerivedConstants(t *testing.T) {
	if !scalar.EqualWithinRel(ClassicalLineCrossSection, 0.0265401, 2e-6) {
		t.Errorf("πe²/(mₑc) = %g, want 0.0265401 cm² s⁻¹", ClassicalLineCrossSection)
	}
	// Wien's b = hc/(k x) with x = 4.965114231744276 (root of x = 5(1-e^-x)),
	// CODATA 2018 b = 0.2897771955 cm K.
	if b := HCOverK * Angstrom / 4.965114231744276; !scalar.EqualWithinRel(b, 0.2897771955, 1e-9) {
		t.Errorf("Wien b from HCOverK = %.10g cm K, want 0.2897771955", b)
	}
	if math.Abs(SpeedOfLightKmS-299792.458) > 1e-9 {
		t.Errorf("c = %v km/s", SpeedOfLightKmS)
	}
}

// TestEnergyConstants checks the eV-based combinations against CODATA 2018
// (NIST): k = 8.617333262e-5 eV K⁻¹ and hc = 1.239841984e-4 eV cm.
func TestEnergyConstants(t *testing.T) {
	if !scalar.EqualWithinRel(BoltzmannEV, 8.617333262e-5, 1e-9) {
		t.Errorf("k = %v eV/K, CODATA 2018 8.617333262e-5", BoltzmannEV)
	}
	if !scalar.EqualWithinRel(InvCmToEV, 1.239841984e-4, 1e-9) {
		t.Errorf("hc = %v eV cm, CODATA 2018 1.239841984e-4", InvCmToEV)
	}
	// The same k from the cgs constants, to rounding.
	if !scalar.EqualWithinRel(BoltzmannEV, Boltzmann/ElectronVolt, 1e-15) {
		t.Errorf("k/e = %v, Boltzmann/ElectronVolt = %v", BoltzmannEV, Boltzmann/ElectronVolt)
	}
}

package cli

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/opacity"
	"broadline/physics"
)

// opacityTestList is an invented line list in our format: real Ca II and Sr II
// wavelengths (vacuum, REFERENCES.md) with rounded values for the rest.
const opacityTestList = `# invented test list for the plasma and opacity commands
# medium: vacuum
wavelength_A species log_gf lower_energy_eV lower_g
8500.36 Ca_II -1.318 1.692 4
8544.44 Ca_II -0.360 1.700 6
8664.52 Ca_II -0.622 1.692 4
10039.40 Sr_II -1.31 1.805 4
10330.14 Sr_II -0.35 1.839 6
10917.86 Sr_II -0.64 1.805 4
12000.00 Nd_II -1.0 0.5 10
12100.00 Fe_II -1.0 0.5 10
`

type plasmaCmdOut struct {
	ElectronDensity    float64 `json:"electron_density_cm3"`
	Iterations         int     `json:"iterations"`
	PartitionFunctions string  `json:"partition_functions"`
	Elements           []struct {
		Element       string
		NumberDensity float64 `json:"number_density_cm3"`
	}
	Species []struct {
		Species           string
		NumberDensity     float64 `json:"number_density_cm3"`
		PartitionFunction float64 `json:"partition_function"`
		PartitionSource   string  `json:"partition_source"`
	}
}

func TestPlasmaCommand(t *testing.T) {
	s, out, errs := runCmd("plasma", "--temperature", "5000", "--density", "1e-13", "--mass-fractions", "Ca=0.4,Sr=0.3,Nd=0.3")
	if s != 0 {
		t.Fatalf("status %d, stderr %q", s, errs)
	}
	var got plasmaCmdOut
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, out)
	}
	// The command is a thin layer over opacity.Solve with ground weights.
	comp, _ := opacity.ParseComposition("Ca=0.4,Sr=0.3,Nd=0.3")
	p, err := opacity.Solve(comp, 1e-13, 5000, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbsOrRel(got.ElectronDensity, p.ElectronDensity, 0, 1e-12) || got.Iterations < 1 {
		t.Errorf("electron_density_cm3 = %v (%d iterations), Solve gives %v", got.ElectronDensity, got.Iterations, p.ElectronDensity)
	}
	if !strings.Contains(got.PartitionFunctions, "ground") {
		t.Errorf("partition_functions %q does not say they are ground weights", got.PartitionFunctions)
	}
	if len(got.Species) != 15 || got.Species[1].Species != "Ca II" || got.Species[14].Species != "Nd V" {
		t.Fatalf("species %+v, want Ca I … Nd V", got.Species)
	}
	// Ca II's ground level is ²S½ (g = 2, NIST), the weight used here.
	if got.Species[1].PartitionFunction != 2 {
		t.Errorf("U(Ca II) = %v, want the ground weight 2", got.Species[1].PartitionFunction)
	}
	for i, e := range got.Elements {
		sum := 0.0
		for _, sp := range got.Species[5*i : 5*i+5] {
			sum += sp.NumberDensity
		}
		if !scalar.EqualWithinAbsOrRel(sum, e.NumberDensity, 0, 1e-12) {
			t.Errorf("%s: stages sum to %v, element density %v", e.Element, sum, e.NumberDensity)
		}
	}

	// With a line list the partition functions sum the levels it names:
	// Ca II has the ground level (g = 2, added from the element table) and
	// the lower levels 1.692 eV (g = 4) and 1.700 eV (g = 6), so
	// U = 2 + 4 e^{−1.692/kT} + 6 e^{−1.700/kT} (definition of U).
	lines := writeTemp(t, "casr.txt", opacityTestList)
	s, out, errs = runCmd("plasma", "--temperature", "5000", "--density", "1e-13", "--mass-fractions", "Ca=0.4,Sr=0.3,Nd=0.3", "--lines", lines)
	if s != 0 {
		t.Fatalf("with --lines: status %d, stderr %q", s, errs)
	}
	got = plasmaCmdOut{}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	kT := physics.Boltzmann * 5000 / physics.ElectronVolt
	want := 2 + 4*math.Exp(-1.692/kT) + 6*math.Exp(-1.700/kT)
	if u := got.Species[1].PartitionFunction; !scalar.EqualWithinAbsOrRel(u, want, 0, 1e-9) {
		t.Errorf("U(Ca II) from the list = %v, level sum %v", u, want)
	}
	if strings.Contains(got.PartitionFunctions, "ground-level statistical weights of the element table only") ||
		!strings.Contains(got.Species[1].PartitionSource, "line list") {
		t.Errorf("sources %q / %q do not say the levels come from the line list", got.PartitionFunctions, got.Species[1].PartitionSource)
	}
}

// TestPlasmaCommandErrors: bad values give one line naming the flag, exit
// status 2 and nothing on stdout.
func TestPlasmaCommandErrors(t *testing.T) {
	ok := []string{"--temperature", "5000", "--density", "1e-13", "--mass-fractions", "Ca=1"}
	with := func(flag, val string) []string {
		a := []string{"plasma"}
		for i := 0; i < len(ok); i += 2 {
			if ok[i] != flag {
				a = append(a, ok[i], ok[i+1])
			}
		}
		if val != "" {
			a = append(a, flag, val)
		}
		return a
	}
	for _, tc := range []struct {
		args []string
		flag string
	}{
		{with("--temperature", "0"), "--temperature"},
		{with("--temperature", "-300"), "--temperature"},
		{with("--temperature", ""), "--temperature"},
		{with("--temperature", "NaN"), "--temperature"},
		{with("--density", "0"), "--density"},
		{with("--density", "-1e-13"), "--density"},
		{with("--mass-fractions", "Xx=1"), "--mass-fractions"},
		{with("--mass-fractions", "Ca=0,Sr=0"), "--mass-fractions"},
		{with("--mass-fractions", ""), "--mass-fractions"},
		{append(with("", ""), "stray"), "stray"},
	} {
		s, out, errs := runCmd(tc.args...)
		if s != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, tc.flag) {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want 2, nothing, one line naming %s", tc.args, s, out, errs, tc.flag)
		}
	}
}

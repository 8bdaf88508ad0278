package linelists

import "fmt"

// Element is one chemical element with the data the plasma needs.
type Element struct {
	Z      int
	Symbol string
	Name   string
	// Weight is the standard atomic weight in u (IUPAC); for elements
	// without stable isotopes, the mass number of the longest-lived isotope.
	Weight float64
	// Ionization[j] is the energy in eV to go from stage j+1 to stage j+2
	// (Ionization[0] is I→II). Zero means unknown.
	Ionization [4]float64
	// GroundG[j] is the statistical weight of the ground level of stage j+1
	// (stages I–V), from the NIST ground terms. Zero means unknown.
	GroundG [5]float32
}

// elements is indexed by Z; elements[0] is unused.
//
// Sources, field by field:
//   - Weight: IUPAC standard atomic weights (abridged/conventional values,
//     2021 table), typed from memory; for elements without stable isotopes
//     the mass number of the longest-lived isotope (Tc 98, Pm 145, Po–Ac,
//     Np–Fm). Checked in element_test.go against python3-periodictable.
//   - Ionization: NIST Atomic Spectra Database ionisation energies in eV.
//     The values for H, He, O, Ca, Fe, Sr, Y, Zr, Te, Cs, Ba, La, Ce, Nd, Sm
//     and Eu are the sourced values of REFERENCES.md (NIST ASD [src]); every
//     other value is typed from memory of the NIST tables and may be off in
//     the last digits (for the heavy elements' third and fourth stages NIST
//     itself gives semi-empirical estimates of ±0.5 eV or worse).
//   - GroundG: 2J+1 of the NIST ground level of stages I–V, derived from the
//     ground terms typed from memory (stage V and the actinides least
//     certain). Zero means unknown (Z > 92). Stages that are a bare nucleus
//     get 1.
var elements = [101]Element{
	1:   {1, "H", "Hydrogen", 1.008, [4]float64{13.598434599702, 0, 0, 0}, [5]float32{2, 1, 1, 1, 1}},
	2:   {2, "He", "Helium", 4.002602, [4]float64{24.587389011, 54.4177655282, 0, 0}, [5]float32{1, 2, 1, 1, 1}},
	3:   {3, "Li", "Lithium", 6.94, [4]float64{5.391714996, 75.6400970, 122.45435913, 0}, [5]float32{2, 1, 2, 1, 1}},
	4:   {4, "Be", "Beryllium", 9.0121831, [4]float64{9.322699, 18.21115, 153.896205, 217.71858}, [5]float32{1, 2, 1, 2, 1}},
	5:   {5, "B", "Boron", 10.81, [4]float64{8.298019, 25.15483, 37.93059, 259.3715}, [5]float32{2, 1, 2, 1, 2}},
	6:   {6, "C", "Carbon", 12.011, [4]float64{11.260288, 24.383154, 47.88778, 64.49352}, [5]float32{1, 2, 1, 2, 1}},
	7:   {7, "N", "Nitrogen", 14.007, [4]float64{14.53413, 29.60125, 47.4453, 77.4735}, [5]float32{4, 1, 2, 1, 2}},
	8:   {8, "O", "Oxygen", 15.999, [4]float64{13.618055, 35.12112, 54.93554, 77.41350}, [5]float32{5, 4, 1, 2, 1}},
	9:   {9, "F", "Fluorine", 18.998403163, [4]float64{17.42282, 34.97081, 62.70798, 87.175}, [5]float32{4, 5, 4, 1, 2}},
	10:  {10, "Ne", "Neon", 20.1797, [4]float64{21.564540, 40.96297, 63.4233, 97.1900}, [5]float32{1, 4, 5, 4, 1}},
	11:  {11, "Na", "Sodium", 22.98976928, [4]float64{5.1390769, 47.28636, 71.6200, 98.936}, [5]float32{2, 1, 4, 5, 4}},
	12:  {12, "Mg", "Magnesium", 24.305, [4]float64{7.646236, 15.035271, 80.1436, 109.2654}, [5]float32{1, 2, 1, 4, 5}},
	13:  {13, "Al", "Aluminium", 26.9815384, [4]float64{5.985769, 18.82855, 28.447642, 119.9924}, [5]float32{2, 1, 2, 1, 4}},
	14:  {14, "Si", "Silicon", 28.085, [4]float64{8.15168, 16.34585, 33.49300, 45.14179}, [5]float32{1, 2, 1, 2, 1}},
	15:  {15, "P", "Phosphorus", 30.973761998, [4]float64{10.486686, 19.76949, 30.20264, 51.44387}, [5]float32{4, 1, 2, 1, 2}},
	16:  {16, "S", "Sulfur", 32.06, [4]float64{10.36001, 23.33788, 34.86, 47.222}, [5]float32{5, 4, 1, 2, 1}},
	17:  {17, "Cl", "Chlorine", 35.45, [4]float64{12.967633, 23.81364, 39.80, 53.24}, [5]float32{4, 5, 4, 1, 2}},
	18:  {18, "Ar", "Argon", 39.95, [4]float64{15.7596119, 27.62967, 40.735, 59.58}, [5]float32{1, 4, 5, 4, 1}},
	19:  {19, "K", "Potassium", 39.0983, [4]float64{4.34066373, 31.62500, 45.8031, 60.917}, [5]float32{2, 1, 4, 5, 4}},
	20:  {20, "Ca", "Calcium", 40.078, [4]float64{6.1131549210, 11.871719, 50.91316, 67.2732}, [5]float32{1, 2, 1, 4, 5}},
	21:  {21, "Sc", "Scandium", 44.955907, [4]float64{6.56149, 12.79977, 24.756839, 73.4894}, [5]float32{4, 3, 4, 1, 4}},
	22:  {22, "Ti", "Titanium", 47.867, [4]float64{6.828120, 13.5755, 27.49171, 43.26717}, [5]float32{5, 4, 5, 4, 1}},
	23:  {23, "V", "Vanadium", 50.9415, [4]float64{6.746187, 14.634, 29.3111, 46.709}, [5]float32{4, 1, 4, 5, 4}},
	24:  {24, "Cr", "Chromium", 51.9961, [4]float64{6.76651, 16.486305, 30.959, 49.16}, [5]float32{7, 6, 1, 4, 5}},
	25:  {25, "Mn", "Manganese", 54.938043, [4]float64{7.4340379, 15.63999, 33.668, 51.21}, [5]float32{6, 7, 6, 1, 4}},
	26:  {26, "Fe", "Iron", 55.845, [4]float64{7.9024681, 16.19921, 30.651, 54.91}, [5]float32{9, 10, 9, 6, 1}},
	27:  {27, "Co", "Cobalt", 58.933194, [4]float64{7.88101, 17.0844, 33.50, 51.27}, [5]float32{10, 9, 10, 9, 6}},
	28:  {28, "Ni", "Nickel", 58.6934, [4]float64{7.639878, 18.168838, 35.187, 54.92}, [5]float32{9, 6, 9, 10, 9}},
	29:  {29, "Cu", "Copper", 63.546, [4]float64{7.726380, 20.29239, 36.841, 57.38}, [5]float32{2, 1, 6, 9, 10}},
	30:  {30, "Zn", "Zinc", 65.38, [4]float64{9.394197, 17.96439, 39.7233, 59.573}, [5]float32{1, 2, 1, 6, 9}},
	31:  {31, "Ga", "Gallium", 69.723, [4]float64{5.9993018, 20.51514, 30.72576, 63.241}, [5]float32{2, 1, 2, 1, 6}},
	32:  {32, "Ge", "Germanium", 72.630, [4]float64{7.899435, 15.934610, 34.0576, 45.7155}, [5]float32{1, 2, 1, 2, 1}},
	33:  {33, "As", "Arsenic", 74.921595, [4]float64{9.7886, 18.5892, 28.349, 50.15}, [5]float32{4, 1, 2, 1, 2}},
	34:  {34, "Se", "Selenium", 78.971, [4]float64{9.752392, 21.19, 30.8204, 42.9450}, [5]float32{5, 4, 1, 2, 1}},
	35:  {35, "Br", "Bromine", 79.904, [4]float64{11.81381, 21.591, 34.871, 47.782}, [5]float32{4, 5, 4, 1, 2}},
	36:  {36, "Kr", "Krypton", 83.798, [4]float64{13.9996055, 24.35984, 35.838, 50.85}, [5]float32{1, 4, 5, 4, 1}},
	37:  {37, "Rb", "Rubidium", 85.4678, [4]float64{4.1771281, 27.28954, 39.247, 52.20}, [5]float32{2, 1, 4, 5, 4}},
	38:  {38, "Sr", "Strontium", 87.62, [4]float64{5.69486745, 11.0302765, 42.88353, 56.280}, [5]float32{1, 2, 1, 4, 5}},
	39:  {39, "Y", "Yttrium", 88.90584, [4]float64{6.21726, 12.2236, 20.52441, 60.6072}, [5]float32{4, 1, 4, 1, 4}},
	40:  {40, "Zr", "Zirconium", 91.224, [4]float64{6.634126, 13.13, 23.170, 34.41836}, [5]float32{5, 4, 5, 4, 1}},
	41:  {41, "Nb", "Niobium", 92.90637, [4]float64{6.75885, 14.32, 25.04, 37.611}, [5]float32{2, 1, 4, 5, 4}},
	42:  {42, "Mo", "Molybdenum", 95.95, [4]float64{7.09243, 16.16, 27.13, 40.33}, [5]float32{7, 6, 1, 4, 5}},
	43:  {43, "Tc", "Technetium", 98, [4]float64{7.11938, 15.26, 29.55, 41.0}, [5]float32{6, 7, 6, 1, 4}},
	44:  {44, "Ru", "Ruthenium", 101.07, [4]float64{7.36050, 16.76, 28.47, 45.0}, [5]float32{11, 10, 9, 6, 1}},
	45:  {45, "Rh", "Rhodium", 102.90549, [4]float64{7.45890, 18.08, 31.06, 42.0}, [5]float32{10, 9, 10, 9, 6}},
	46:  {46, "Pd", "Palladium", 106.42, [4]float64{8.336839, 19.43, 32.93, 46.0}, [5]float32{1, 6, 9, 10, 9}},
	47:  {47, "Ag", "Silver", 107.8682, [4]float64{7.576234, 21.48, 34.83, 49.0}, [5]float32{2, 1, 6, 9, 10}},
	48:  {48, "Cd", "Cadmium", 112.414, [4]float64{8.99382, 16.908313, 37.468, 51.0}, [5]float32{1, 2, 1, 6, 9}},
	49:  {49, "In", "Indium", 114.818, [4]float64{5.7863558, 18.87041, 28.04415, 55.45}, [5]float32{2, 1, 2, 1, 6}},
	50:  {50, "Sn", "Tin", 118.710, [4]float64{7.343918, 14.63307, 30.5060, 40.7350}, [5]float32{1, 2, 1, 2, 1}},
	51:  {51, "Sb", "Antimony", 121.760, [4]float64{8.608389, 16.626, 25.3235, 43.804}, [5]float32{4, 1, 2, 1, 2}},
	52:  {52, "Te", "Tellurium", 127.60, [4]float64{9.009808, 18.6, 27.84, 37.4155}, [5]float32{5, 4, 1, 2, 1}},
	53:  {53, "I", "Iodine", 126.90447, [4]float64{10.451260, 19.1313, 29.570, 40.357}, [5]float32{4, 5, 4, 1, 2}},
	54:  {54, "Xe", "Xenon", 131.293, [4]float64{12.1298437, 20.975, 31.05, 42.20}, [5]float32{1, 4, 5, 4, 1}},
	55:  {55, "Cs", "Caesium", 132.90545196, [4]float64{3.893905727, 23.15745, 33.195, 43.0}, [5]float32{2, 1, 4, 5, 4}},
	56:  {56, "Ba", "Barium", 137.327, [4]float64{5.2116646, 10.003826, 35.8438, 47.0}, [5]float32{1, 2, 1, 4, 5}},
	57:  {57, "La", "Lanthanum", 138.90547, [4]float64{5.5769, 11.18496, 19.1773, 49.95}, [5]float32{4, 5, 4, 1, 4}},
	58:  {58, "Ce", "Cerium", 140.116, [4]float64{5.5386, 10.956, 20.1974, 36.906}, [5]float32{9, 8, 9, 6, 1}},
	59:  {59, "Pr", "Praseodymium", 140.90766, [4]float64{5.4702, 10.631, 21.6237, 38.981}, [5]float32{10, 9, 10, 9, 6}},
	60:  {60, "Nd", "Neodymium", 144.242, [4]float64{5.52475, 10.783, 22.09, 40.60}, [5]float32{9, 8, 9, 10, 9}},
	61:  {61, "Pm", "Promethium", 145, [4]float64{5.58187, 10.938, 22.44, 41.17}, [5]float32{6, 5, 6, 9, 10}},
	62:  {62, "Sm", "Samarium", 150.36, [4]float64{5.643722, 11.078, 23.55, 41.64}, [5]float32{1, 2, 1, 6, 9}},
	63:  {63, "Eu", "Europium", 151.964, [4]float64{5.670385, 11.240, 24.84, 42.94}, [5]float32{8, 9, 8, 1, 6}},
	64:  {64, "Gd", "Gadolinium", 157.25, [4]float64{6.14980, 12.076, 20.54, 44.44}, [5]float32{5, 6, 5, 8, 1}},
	65:  {65, "Tb", "Terbium", 158.925354, [4]float64{5.8638, 11.513, 21.82, 39.33}, [5]float32{16, 17, 16, 13, 8}},
	66:  {66, "Dy", "Dysprosium", 162.500, [4]float64{5.93905, 11.647, 22.89, 41.23}, [5]float32{17, 18, 17, 16, 13}},
	67:  {67, "Ho", "Holmium", 164.930329, [4]float64{6.0215, 11.781, 22.79, 42.52}, [5]float32{16, 17, 16, 17, 16}},
	68:  {68, "Er", "Erbium", 167.259, [4]float64{6.1077, 11.916, 22.70, 42.42}, [5]float32{13, 14, 13, 16, 17}},
	69:  {69, "Tm", "Thulium", 168.934219, [4]float64{6.18431, 12.065, 23.66, 42.41}, [5]float32{8, 9, 8, 13, 16}},
	70:  {70, "Yb", "Ytterbium", 173.045, [4]float64{6.25416, 12.179185, 25.053, 43.61}, [5]float32{1, 2, 1, 8, 13}},
	71:  {71, "Lu", "Lutetium", 174.9668, [4]float64{5.425871, 14.13, 20.9594, 45.249}, [5]float32{4, 1, 2, 1, 8}},
	72:  {72, "Hf", "Hafnium", 178.486, [4]float64{6.825069, 14.61, 22.55, 33.37}, [5]float32{5, 4, 5, 4, 1}},
	73:  {73, "Ta", "Tantalum", 180.94788, [4]float64{7.549571, 16.2, 23.1, 35.0}, [5]float32{4, 3, 4, 5, 4}},
	74:  {74, "W", "Tungsten", 183.84, [4]float64{7.86403, 16.37, 26.0, 38.2}, [5]float32{1, 2, 1, 4, 5}},
	75:  {75, "Re", "Rhenium", 186.207, [4]float64{7.83352, 16.6, 27.0, 39.1}, [5]float32{6, 7, 6, 1, 4}},
	76:  {76, "Os", "Osmium", 190.23, [4]float64{8.43823, 17.0, 25.0, 41.0}, [5]float32{9, 10, 9, 6, 1}},
	77:  {77, "Ir", "Iridium", 192.217, [4]float64{8.96702, 17.0, 28.0, 40.0}, [5]float32{10, 11, 10, 9, 6}},
	78:  {78, "Pt", "Platinum", 195.084, [4]float64{8.95883, 18.56, 29.0, 43.0}, [5]float32{7, 6, 9, 10, 9}},
	79:  {79, "Au", "Gold", 196.966570, [4]float64{9.225554, 20.203, 30.0, 45.0}, [5]float32{2, 1, 6, 9, 10}},
	80:  {80, "Hg", "Mercury", 200.592, [4]float64{10.437504, 18.75688, 34.49, 48.55}, [5]float32{1, 2, 1, 6, 9}},
	81:  {81, "Tl", "Thallium", 204.38, [4]float64{6.1082873, 20.4283, 29.852, 50.8}, [5]float32{2, 1, 2, 1, 6}},
	82:  {82, "Pb", "Lead", 207.2, [4]float64{7.4166799, 15.0322402, 31.9373, 42.33256}, [5]float32{1, 2, 1, 2, 1}},
	83:  {83, "Bi", "Bismuth", 208.98040, [4]float64{7.285516, 16.703, 25.56, 45.37}, [5]float32{4, 1, 2, 1, 2}},
	84:  {84, "Po", "Polonium", 209, [4]float64{8.418070, 19.3, 27.3, 38.0}, [5]float32{5, 4, 1, 2, 1}},
	85:  {85, "At", "Astatine", 210, [4]float64{9.31751, 17.88, 26.58, 39.65}, [5]float32{4, 5, 4, 1, 2}},
	86:  {86, "Rn", "Radon", 222, [4]float64{10.74850, 21.4, 29.4, 36.9}, [5]float32{1, 4, 5, 4, 1}},
	87:  {87, "Fr", "Francium", 223, [4]float64{4.0727410, 22.4, 33.5, 39.1}, [5]float32{2, 1, 4, 5, 4}},
	88:  {88, "Ra", "Radium", 226, [4]float64{5.2784239, 10.14718, 31.0, 41.0}, [5]float32{1, 2, 1, 4, 5}},
	89:  {89, "Ac", "Actinium", 227, [4]float64{5.380226, 11.75, 17.431, 44.8}, [5]float32{4, 1, 4, 1, 4}},
	90:  {90, "Th", "Thorium", 232.0377, [4]float64{6.3067, 12.1, 18.32, 28.648}, [5]float32{5, 4, 9, 6, 1}},
	91:  {91, "Pa", "Protactinium", 231.03588, [4]float64{5.89, 11.9, 18.6, 30.9}, [5]float32{12, 9, 10, 9, 6}},
	92:  {92, "U", "Uranium", 238.02891, [4]float64{6.19405, 11.6, 19.8, 36.7}, [5]float32{13, 10, 9, 10, 9}},
	93:  {93, "Np", "Neptunium", 237, [4]float64{6.26554, 11.5, 19.7, 33.8}, [5]float32{0, 0, 0, 0, 0}},
	94:  {94, "Pu", "Plutonium", 244, [4]float64{6.02576, 11.5, 21.1, 35.0}, [5]float32{0, 0, 0, 0, 0}},
	95:  {95, "Am", "Americium", 243, [4]float64{5.97381, 11.7, 21.7, 36.8}, [5]float32{0, 0, 0, 0, 0}},
	96:  {96, "Cm", "Curium", 247, [4]float64{5.99141, 12.4, 20.1, 37.7}, [5]float32{0, 0, 0, 0, 0}},
	97:  {97, "Bk", "Berkelium", 247, [4]float64{6.19785, 11.9, 21.6, 36.0}, [5]float32{0, 0, 0, 0, 0}},
	98:  {98, "Cf", "Californium", 251, [4]float64{6.28166, 12.0, 22.4, 37.7}, [5]float32{0, 0, 0, 0, 0}},
	99:  {99, "Es", "Einsteinium", 252, [4]float64{6.36758, 12.2, 22.7, 38.8}, [5]float32{0, 0, 0, 0, 0}},
	100: {100, "Fm", "Fermium", 257, [4]float64{6.50, 12.4, 23.2, 39.3}, [5]float32{0, 0, 0, 0, 0}},
}

// ElementByZ returns the element with atomic number z (1–100).
func ElementByZ(z int) (*Element, error) {
	if z < 1 || z >= len(elements) {
		return nil, fmt.Errorf("linelists: no element with Z = %d (want 1–%d)", z, len(elements)-1)
	}
	return &elements[z], nil
}

// ElementBySymbol returns the element with the given symbol, matched without
// regard to case ("nd", "ND" and "Nd" all give neodymium).
func ElementBySymbol(sym string) (*Element, error) {
	for z := 1; z < len(elements); z++ {
		if equalFold(elements[z].Symbol, sym) {
			return &elements[z], nil
		}
	}
	return nil, fmt.Errorf("linelists: unknown element symbol %q (want a symbol such as Sr or Nd)", sym)
}

func equalFold(a, b string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := 0; i < len(a); i++ {
		x, y := a[i], b[i]
		if 'A' <= x && x <= 'Z' {
			x += 'a' - 'A'
		}
		if 'A' <= y && y <= 'Z' {
			y += 'a' - 'A'
		}
		if x != y {
			return false
		}
	}
	return true
}

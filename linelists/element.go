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
var elements = [101]Element{
	1:   {Z: 1, Symbol: "H", Name: "Hydrogen"},
	2:   {Z: 2, Symbol: "He", Name: "Helium"},
	3:   {Z: 3, Symbol: "Li", Name: "Lithium"},
	4:   {Z: 4, Symbol: "Be", Name: "Beryllium"},
	5:   {Z: 5, Symbol: "B", Name: "Boron"},
	6:   {Z: 6, Symbol: "C", Name: "Carbon"},
	7:   {Z: 7, Symbol: "N", Name: "Nitrogen"},
	8:   {Z: 8, Symbol: "O", Name: "Oxygen"},
	9:   {Z: 9, Symbol: "F", Name: "Fluorine"},
	10:  {Z: 10, Symbol: "Ne", Name: "Neon"},
	11:  {Z: 11, Symbol: "Na", Name: "Sodium"},
	12:  {Z: 12, Symbol: "Mg", Name: "Magnesium"},
	13:  {Z: 13, Symbol: "Al", Name: "Aluminium"},
	14:  {Z: 14, Symbol: "Si", Name: "Silicon"},
	15:  {Z: 15, Symbol: "P", Name: "Phosphorus"},
	16:  {Z: 16, Symbol: "S", Name: "Sulfur"},
	17:  {Z: 17, Symbol: "Cl", Name: "Chlorine"},
	18:  {Z: 18, Symbol: "Ar", Name: "Argon"},
	19:  {Z: 19, Symbol: "K", Name: "Potassium"},
	20:  {Z: 20, Symbol: "Ca", Name: "Calcium"},
	21:  {Z: 21, Symbol: "Sc", Name: "Scandium"},
	22:  {Z: 22, Symbol: "Ti", Name: "Titanium"},
	23:  {Z: 23, Symbol: "V", Name: "Vanadium"},
	24:  {Z: 24, Symbol: "Cr", Name: "Chromium"},
	25:  {Z: 25, Symbol: "Mn", Name: "Manganese"},
	26:  {Z: 26, Symbol: "Fe", Name: "Iron"},
	27:  {Z: 27, Symbol: "Co", Name: "Cobalt"},
	28:  {Z: 28, Symbol: "Ni", Name: "Nickel"},
	29:  {Z: 29, Symbol: "Cu", Name: "Copper"},
	30:  {Z: 30, Symbol: "Zn", Name: "Zinc"},
	31:  {Z: 31, Symbol: "Ga", Name: "Gallium"},
	32:  {Z: 32, Symbol: "Ge", Name: "Germanium"},
	33:  {Z: 33, Symbol: "As", Name: "Arsenic"},
	34:  {Z: 34, Symbol: "Se", Name: "Selenium"},
	35:  {Z: 35, Symbol: "Br", Name: "Bromine"},
	36:  {Z: 36, Symbol: "Kr", Name: "Krypton"},
	37:  {Z: 37, Symbol: "Rb", Name: "Rubidium"},
	38:  {Z: 38, Symbol: "Sr", Name: "Strontium"},
	39:  {Z: 39, Symbol: "Y", Name: "Yttrium"},
	40:  {Z: 40, Symbol: "Zr", Name: "Zirconium"},
	41:  {Z: 41, Symbol: "Nb", Name: "Niobium"},
	42:  {Z: 42, Symbol: "Mo", Name: "Molybdenum"},
	43:  {Z: 43, Symbol: "Tc", Name: "Technetium"},
	44:  {Z: 44, Symbol: "Ru", Name: "Ruthenium"},
	45:  {Z: 45, Symbol: "Rh", Name: "Rhodium"},
	46:  {Z: 46, Symbol: "Pd", Name: "Palladium"},
	47:  {Z: 47, Symbol: "Ag", Name: "Silver"},
	48:  {Z: 48, Symbol: "Cd", Name: "Cadmium"},
	49:  {Z: 49, Symbol: "In", Name: "Indium"},
	50:  {Z: 50, Symbol: "Sn", Name: "Tin"},
	51:  {Z: 51, Symbol: "Sb", Name: "Antimony"},
	52:  {Z: 52, Symbol: "Te", Name: "Tellurium"},
	53:  {Z: 53, Symbol: "I", Name: "Iodine"},
	54:  {Z: 54, Symbol: "Xe", Name: "Xenon"},
	55:  {Z: 55, Symbol: "Cs", Name: "Caesium"},
	56:  {Z: 56, Symbol: "Ba", Name: "Barium"},
	57:  {Z: 57, Symbol: "La", Name: "Lanthanum"},
	58:  {Z: 58, Symbol: "Ce", Name: "Cerium"},
	59:  {Z: 59, Symbol: "Pr", Name: "Praseodymium"},
	60:  {Z: 60, Symbol: "Nd", Name: "Neodymium"},
	61:  {Z: 61, Symbol: "Pm", Name: "Promethium"},
	62:  {Z: 62, Symbol: "Sm", Name: "Samarium"},
	63:  {Z: 63, Symbol: "Eu", Name: "Europium"},
	64:  {Z: 64, Symbol: "Gd", Name: "Gadolinium"},
	65:  {Z: 65, Symbol: "Tb", Name: "Terbium"},
	66:  {Z: 66, Symbol: "Dy", Name: "Dysprosium"},
	67:  {Z: 67, Symbol: "Ho", Name: "Holmium"},
	68:  {Z: 68, Symbol: "Er", Name: "Erbium"},
	69:  {Z: 69, Symbol: "Tm", Name: "Thulium"},
	70:  {Z: 70, Symbol: "Yb", Name: "Ytterbium"},
	71:  {Z: 71, Symbol: "Lu", Name: "Lutetium"},
	72:  {Z: 72, Symbol: "Hf", Name: "Hafnium"},
	73:  {Z: 73, Symbol: "Ta", Name: "Tantalum"},
	74:  {Z: 74, Symbol: "W", Name: "Tungsten"},
	75:  {Z: 75, Symbol: "Re", Name: "Rhenium"},
	76:  {Z: 76, Symbol: "Os", Name: "Osmium"},
	77:  {Z: 77, Symbol: "Ir", Name: "Iridium"},
	78:  {Z: 78, Symbol: "Pt", Name: "Platinum"},
	79:  {Z: 79, Symbol: "Au", Name: "Gold"},
	80:  {Z: 80, Symbol: "Hg", Name: "Mercury"},
	81:  {Z: 81, Symbol: "Tl", Name: "Thallium"},
	82:  {Z: 82, Symbol: "Pb", Name: "Lead"},
	83:  {Z: 83, Symbol: "Bi", Name: "Bismuth"},
	84:  {Z: 84, Symbol: "Po", Name: "Polonium"},
	85:  {Z: 85, Symbol: "At", Name: "Astatine"},
	86:  {Z: 86, Symbol: "Rn", Name: "Radon"},
	87:  {Z: 87, Symbol: "Fr", Name: "Francium"},
	88:  {Z: 88, Symbol: "Ra", Name: "Radium"},
	89:  {Z: 89, Symbol: "Ac", Name: "Actinium"},
	90:  {Z: 90, Symbol: "Th", Name: "Thorium"},
	91:  {Z: 91, Symbol: "Pa", Name: "Protactinium"},
	92:  {Z: 92, Symbol: "U", Name: "Uranium"},
	93:  {Z: 93, Symbol: "Np", Name: "Neptunium"},
	94:  {Z: 94, Symbol: "Pu", Name: "Plutonium"},
	95:  {Z: 95, Symbol: "Am", Name: "Americium"},
	96:  {Z: 96, Symbol: "Cm", Name: "Curium"},
	97:  {Z: 97, Symbol: "Bk", Name: "Berkelium"},
	98:  {Z: 98, Symbol: "Cf", Name: "Californium"},
	99:  {Z: 99, Symbol: "Es", Name: "Einsteinium"},
	100: {Z: 100, Symbol: "Fm", Name: "Fermium"},
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

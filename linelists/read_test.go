package linelists

import (
	"bytes"
	"compress/gzip"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

const sample = `# A test list in our format.
# medium: air
# source: typed for this test
# creator: nobody
log_gf  lower_energy_cm-1 species   wavelength_A lower_j upper_energy_eV upper_g
-0.360  13650.19          Ca_II     8542.09      1.5     1.69            4
-1.318  13650.19          "Ca II"   8498.02      1.5     1.69            4
# a comment between rows is fine
-0.622  13710.88          Ca+       8662.14      2.5     1.69            4

-0.35   14836.24          SrII      10327.31     2.5     -               -
`

func TestReadOurFormat(t *testing.T) {
	s, rep, err := Read(strings.NewReader(sample), ReadOptions{Name: "sample.txt"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 4 {
		t.Fatalf("%d lines, want 4", s.Len())
	}
	fr := rep.Files[0]
	if fr.Medium != physics.Air || fr.Rows != 4 || fr.Added != 4 {
		t.Errorf("report %+v", fr)
	}
	if len(fr.Meta) != 3 || fr.Meta[1] != (KeyValue{"source", "typed for this test"}) {
		t.Errorf("meta %v", fr.Meta)
	}
	// Sorted by wavelength, converted from air to vacuum: the vacuum values
	// of REFERENCES.md ("Real strong lines"), to 0.01 Å.
	want := []float64{8500.36, 8544.44, 8664.52, 10330.14}
	for i, w := range want {
		if !scalar.EqualWithinAbs(s.Wavelength[i], w, 0.01) {
			t.Errorf("line %d: %.3f Å, want %.2f", i, s.Wavelength[i], w)
		}
	}
	if s.SpeciesTable[0] != MustSpecies("Ca II") || s.SpeciesTable[1] != MustSpecies("Sr II") {
		t.Errorf("species %v", s.SpeciesTable)
	}
	// The 8500 and 8544 lines share their lower level: one level entry.
	if s.Lower[0] != s.Lower[1] {
		t.Error("lines from the same lower level got different level indices")
	}
	lv := s.Lower[0]
	if e := s.Levels.Energy[lv]; !scalar.EqualWithinRel(e, 13650.19*1.239841984e-4, 1e-9) {
		t.Errorf("lower level energy %v eV", e) // hc from CODATA 2018
	}
	if g := s.Levels.G[lv]; g != 4 {
		t.Errorf("lower g %v, want 2J+1 = 4", g)
	}
	// Levels: Ca II ground (added), 13650.19 (g4), 13710.88 (g6), upper
	// 1.69 eV (g4); Sr II ground (added), 14836.24 (g6).
	if n := len(s.Levels.Energy); n != 6 || rep.GroundAdded != 2 {
		t.Errorf("%d levels, %d ground levels added; want 6 and 2", n, rep.GroundAdded)
	}
	if math.Abs(float64(s.LogGF[1])+0.36) > 1e-6 {
		t.Errorf("log gf %v", s.LogGF[1])
	}
}

func TestReadCommaAndGF(t *testing.T) {
	in := "wavelength_nm, species, gf, lower_energy_eV, lower_g\n" +
		"500.0, Nd II, 0.1, 0.5, 8\n" +
		"400.0, \"Nd II\", 1, 0, 8\n"
	s, _, err := Read(strings.NewReader(in), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 2 || s.Wavelength[0] != 4000 || s.Wavelength[1] != 5000 {
		t.Errorf("wavelengths %v", s.Wavelength)
	}
	if !scalar.EqualWithinAbs(float64(s.LogGF[1]), -1, 1e-6) || s.LogGF[0] != 0 {
		t.Errorf("log gf %v", s.LogGF)
	}
}

func TestReadBOMAndCRLF(t *testing.T) {
	in := "\xef\xbb\xbf# medium: air\r\n" + strings.ReplaceAll(sample[strings.Index(sample, "log_gf"):], "\n", "\r\n")
	s, _, err := Read(strings.NewReader(in), ReadOptions{})
	if err != nil || s.Len() != 4 {
		t.Fatalf("%v", err)
	}
	if !scalar.EqualWithinAbs(s.Wavelength[0], 8500.36, 0.01) {
		t.Errorf("medium line after a BOM not read: %v", s.Wavelength[0])
	}
}

func TestReadGzip(t *testing.T) {
	var buf bytes.Buffer
	zw := gzip.NewWriter(&buf)
	zw.Write([]byte(sample))
	zw.Close()
	s, _, err := Read(&buf, ReadOptions{Name: "sample.txt.gz"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 4 {
		t.Errorf("%d lines from gzip, want 4", s.Len())
	}
	// A truncated gzip stream is an error, not a short list.
	var full bytes.Buffer
	zw = gzip.NewWriter(&full)
	zw.Write([]byte(sample))
	zw.Close()
	cut := full.Bytes()[:full.Len()-10]
	if _, _, err := Read(bytes.NewReader(cut), ReadOptions{Name: "cut.gz"}); err == nil {
		t.Error("truncated gzip read without error")
	}
}

// TestReadRangeEdges checks that values just inside the physical ranges
// of ranges.go are read.
func TestReadRangeEdges(t *testing.T) {
	in := "wavelength_A species log_gf lower_energy_eV lower_j upper_energy_eV upper_g\n" +
		"10 Nd_II -15 0 0 - -\n" +
		"1e7 Nd_II 3 11.5 49.5 21 100\n" +
		"5000 Nd_V -1 99 0.5 - -\n"
	s, _, err := Read(strings.NewReader(in), ReadOptions{Name: "edges"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 3 {
		t.Fatalf("%d lines, want 3", s.Len())
	}
	checkStore(t, s)
}

func TestReadErrors(t *testing.T) {
	hdr := "wavelength_A species log_gf lower_energy_eV\n"
	for _, tc := range []struct {
		name, in   string
		line, col  int
		sentinel   error
		msgHas     string
		importOpts *Import
	}{
		{"no header", "# only comments\n", 1, 0, ErrHeader, "no header row", nil},
		{"unknown column", "wavelength_A species log_gf lower_energy_eV ref\n", 1, 5, ErrHeader, `unknown column "ref"`, nil},
		{"no unit", "wavelength species log_gf lower_energy_eV\n", 1, 1, ErrHeader, "no unit suffix", nil},
		{"bad unit", "wavelength_km species log_gf lower_energy_eV\n", 1, 1, ErrHeader, "unknown unit", nil},
		{"repeated", "wavelength_A species log_gf lower_energy_eV species\n", 1, 5, ErrHeader, "repeats", nil},
		{"missing", "wavelength_A species\n", 1, 0, ErrHeader, "missing column(s) log_gf|gf, lower_energy", nil},
		{"negative wavelength", hdr + "-5 Nd_II -1 0\n", 2, 1, ErrRange, "want a finite number > 0", nil},
		{"zero wavelength", hdr + "0 Nd_II -1 0\n", 2, 1, ErrRange, "> 0", nil},
		{"nan wavelength", hdr + "NaN Nd_II -1 0\n", 2, 1, ErrRange, "finite", nil},
		{"inf wavelength", hdr + "1e999 Nd_II -1 0\n", 2, 1, ErrRange, "finite", nil},
		{"text wavelength", hdr + "abc Nd_II -1 0\n", 2, 1, ErrSyntax, `"abc" is not a number`, nil},
		{"bad species", hdr + "5000 Xy_II -1 0\n", 2, 2, ErrSpecies, "unknown element", nil},
		{"nan loggf", hdr + "5000 Nd_II nan 0\n", 2, 3, ErrRange, "finite", nil},
		{"negative energy", hdr + "5000 Nd_II -1 -0.1\n", 2, 4, ErrRange, "≥ 0", nil},
		// Physical ranges (ranges.go).
		{"issue 11 repro: log gf 1e308", "wavelength_A species log_gf lower_energy_eV lower_g\n5000.0 Nd_II 1e308 0.0 8\n", 2, 3, ErrRange, "want -15 to +3", nil},
		{"log gf 400", hdr + "5000 Nd_II 400 0\n", 2, 3, ErrRange, "log gf", nil},
		{"log gf -16", hdr + "5000 Nd_II -16 0\n", 2, 3, ErrRange, "log gf", nil},
		{"gf 1e5", "wavelength_A species gf lower_energy_eV\n5000 Nd_II 1e5 0\n", 2, 3, ErrRange, "log gf -15 to +3", nil},
		{"wavelength 5 A", hdr + "5 Nd_II -1 0\n", 2, 1, ErrRange, "want 10 Å to 1e+07 Å", nil},
		{"wavelength 2 mm", "wavelength_um species log_gf lower_energy_eV\n2000 Nd_II -1 0\n", 2, 1, ErrRange, "1e+07 Å", nil},
		// Nd II ionises at 10.783 eV (NIST ASD, element.go); 12 eV is above
		// the limit plus the 1 eV margin, 11.5 eV within it.
		{"lower energy above the limit", hdr + "5000 Nd_II -1 12\n", 2, 4, ErrRange, "ionisation energy of Nd II", nil},
		{"lower energy in cm-1 above the limit", "wavelength_A species log_gf lower_energy_cm-1\n5000 Nd_II -1 1e6\n", 2, 4, ErrRange, "not bound", nil},
		{"upper energy far above", "wavelength_A species log_gf lower_energy_eV upper_energy_eV upper_g\n5000 Nd_II -1 0 500 2\n", 2, 5, ErrRange, "upper level energy", nil},
		{"g 101", "wavelength_A species log_gf lower_energy_eV lower_g\n5000 Nd_II -1 0 101\n", 2, 5, ErrRange, "from 1 to 100", nil},
		{"J 50", "wavelength_A species log_gf lower_energy_eV lower_j\n5000 Nd_II -1 0 50\n", 2, 5, ErrRange, "0 to 49.5", nil},
		{"import: log gf 1e308", "5000 1e308 0\n", 1, 2, ErrRange, "log gf", &Import{Columns: []ColumnSpec{{Field: FieldWavelength, Unit: UnitAngstrom, Index: 0}, {Field: FieldLogGF, Index: 1}, {Field: FieldLowerEnergy, Unit: UnitEV, Index: 2}}, Species: MustSpecies("Nd II")}},
		{"import: energy in the wrong unit", "5000 -1 20000\n", 1, 3, ErrRange, "ionisation energy of Nd II", &Import{Columns: []ColumnSpec{{Field: FieldWavelength, Unit: UnitAngstrom, Index: 0}, {Field: FieldLogGF, Index: 1}, {Field: FieldLowerEnergy, Unit: UnitEV, Index: 2}}, Species: MustSpecies("Nd II")}},
		{"field count", hdr + "5000 Nd_II -1\n", 2, 0, ErrFieldCount, "3 fields, the header names 4", nil},
		{"gf zero", "wavelength_A species gf lower_energy_eV\n5000 Nd_II 0 0\n", 2, 3, ErrRange, "gf", nil},
		{"gf negative", "wavelength_A species gf lower_energy_eV\n5000 Nd_II -2 0\n", 2, 3, ErrRange, "gf", nil},
		{"half J", "wavelength_A species log_gf lower_energy_eV lower_j\n5000 Nd_II -1 0 1.3\n", 2, 5, ErrRange, "half-whole", nil},
		{"medium", "# medium: water\n" + hdr, 1, 0, ErrHeader, "want vacuum or air", nil},
		{"quote", hdr + "5000 \"Nd II -1 0\n", 2, 0, ErrSyntax, "unclosed quote", nil},
		{"long line", hdr + strings.Repeat("9", maxLineLength+10) + "\n", 2, 0, ErrTooLong, "longer than", nil},
		{"both gf", "wavelength_A species gf log_gf lower_energy_eV\n", 1, 0, ErrHeader, "both log_gf and gf", nil},
		{"import short row", "5000 -1\n", 1, 0, ErrFieldCount, "needs at least 3", &Import{Columns: []ColumnSpec{{Field: FieldWavelength, Unit: UnitAngstrom, Index: 0}, {Field: FieldLogGF, Index: 1}, {Field: FieldLowerEnergy, Unit: UnitEV, Index: 2}}, Species: MustSpecies("Nd II")}},
		{"import name without header", "5000 -1 0\n", 0, 0, ErrHeader, "no header row", &Import{Columns: []ColumnSpec{{Field: FieldWavelength, Unit: UnitAngstrom, Name: "lam"}, {Field: FieldLogGF, Index: 1}, {Field: FieldLowerEnergy, Unit: UnitEV, Index: 2}}, Species: MustSpecies("Nd II")}},
		{"import no species", "5000 -1 0\n", 0, 0, ErrHeader, "missing column(s) species", &Import{Columns: []ColumnSpec{{Field: FieldWavelength, Unit: UnitAngstrom, Index: 0}, {Field: FieldLogGF, Index: 1}, {Field: FieldLowerEnergy, Unit: UnitEV, Index: 2}}}},
	} {
		b := NewBuilder()
		_, err := b.Read(strings.NewReader(tc.in), ReadOptions{Name: "f.txt", Import: tc.importOpts})
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%s: %T is not a *ParseError: %v", tc.name, err, err)
			continue
		}
		if pe.File != "f.txt" || pe.Line != tc.line || pe.Column != tc.col {
			t.Errorf("%s: at %s:%d column %d, want line %d column %d (%v)", tc.name, pe.File, pe.Line, pe.Column, tc.line, tc.col, err)
		}
		if !errors.Is(err, tc.sentinel) {
			t.Errorf("%s: %v does not wrap %v", tc.name, err, tc.sentinel)
		}
		if !strings.Contains(err.Error(), tc.msgHas) {
			t.Errorf("%s: %q lacks %q", tc.name, err, tc.msgHas)
		}
		if b.Len() != 0 || len(b.lvE) != 0 || len(b.species) != 0 {
			t.Errorf("%s: a failed read left data in the builder", tc.name)
		}
	}
}

// TestReadRollback checks that a file failing half way adds nothing, while
// what an earlier file added stays.
func TestReadRollback(t *testing.T) {
	b := NewBuilder()
	if _, err := b.Read(strings.NewReader(sample), ReadOptions{}); err != nil {
		t.Fatal(err)
	}
	n, nl, ns := b.Len(), len(b.lvE), len(b.species)
	bad := "wavelength_A species log_gf lower_energy_eV lower_g\n5000 Nd_II -1 0.3 8\n6000 Eu_II -1 0.2 9\n7000 Nd_II x 0 8\n"
	if _, err := b.Read(strings.NewReader(bad), ReadOptions{}); err == nil {
		t.Fatal("no error")
	}
	if b.Len() != n || len(b.lvE) != nl || len(b.species) != ns || len(b.lvIdx) != nl || len(b.spIdx) != ns {
		t.Errorf("after a failed read: %d lines %d levels %d species, want %d %d %d", b.Len(), len(b.lvE), len(b.species), n, nl, ns)
	}
	// The builder still works and the rolled-back species are new again.
	if _, err := b.Read(strings.NewReader(bad[:strings.LastIndex(bad[:len(bad)-1], "\n")+1]), ReadOptions{}); err != nil {
		t.Fatal(err)
	}
	s, _ := b.Build()
	if s.Len() != 6 || len(s.SpeciesTable) != 4 {
		t.Errorf("%d lines %d species, want 6 and 4", s.Len(), len(s.SpeciesTable))
	}
}

func TestReadImport(t *testing.T) {
	in := "# some other program's table\n" +
		"ref  lam_nm   loggf   elow_cm  Jlow\n" +
		"X1   850.036  -1.318  13650.19 1.5\n" +
		"X2   854.444  -0.360  13650.19 1.5\n"
	cols, err := ParseColumnMap("wavelength=lam_nm:nm, log_gf=3, lower_energy=elow_cm:cm-1, lower_j=Jlow")
	if err != nil {
		t.Fatal(err)
	}
	imp := &Import{Columns: cols, Species: MustSpecies("Ca II"), HeaderRow: true, Medium: physics.Vacuum}
	s, rep, err := Read(strings.NewReader(in), ReadOptions{Import: imp})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 2 || !scalar.EqualWithinAbs(s.Wavelength[0], 8500.36, 1e-9) || s.SpeciesTable[0] != MustSpecies("Ca II") {
		t.Errorf("store %v %v", s.Wavelength, s.SpeciesTable)
	}
	if got := rep.Files[0].Ignored; len(got) != 1 || got[0] != "ref" {
		t.Errorf("ignored columns %v, want [ref]", got)
	}
	// Without a header row, by number, CSV, air.
	cols, _ = ParseColumnMap("wavelength=2:A,species=1,log_gf=3,lower_energy=4:eV")
	s, _, err = Read(strings.NewReader("Sr II, 10327.31, -0.35, 1.8\n"), ReadOptions{Import: &Import{Columns: cols, Medium: physics.Air}})
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbs(s.Wavelength[0], 10330.14, 0.01) {
		t.Errorf("air import: %v, want 10330.14 (REFERENCES.md)", s.Wavelength[0])
	}
	for _, bad := range []string{"", "wavelength=1", "wavelength=1:kg", "colour=1", "species=1:nm", "wavelength=0:A", "log_gf=1,log_gf=2", "species"} {
		if _, err := ParseColumnMap(bad); err == nil || !errors.Is(err, ErrHeader) {
			t.Errorf("ParseColumnMap(%q): %v", bad, err)
		}
	}
}

func TestReadMediumConflict(t *testing.T) {
	_, _, err := Read(strings.NewReader(sample), ReadOptions{Medium: physics.Vacuum})
	if err == nil || !strings.Contains(err.Error(), "medium: air") {
		t.Errorf("conflicting media: %v", err)
	}
}

func TestReadFilterCounts(t *testing.T) {
	f := Filter{MinWavelength: 8510, MaxWavelength: 9000, Species: []Species{MustSpecies("Ca II")}, HasMinLogGF: true, MinLogGF: -0.5}
	s, rep, err := Read(strings.NewReader(sample), ReadOptions{Filter: f})
	if err != nil {
		t.Fatal(err)
	}
	sk := rep.Files[0].Skipped
	// 8500 and 10330 are outside the range; 8664 (log gf −0.622) is weak.
	if s.Len() != 1 || sk.Wavelength != 2 || sk.Strength != 1 || sk.Species != 0 {
		t.Errorf("%d lines kept, skipped %+v", s.Len(), sk)
	}
	if s.Len()+sk.Total() != rep.Files[0].Rows {
		t.Error("kept + skipped ≠ rows read")
	}
}

func TestBuilderDuplicatesAndMerge(t *testing.T) {
	a, _, err := Read(strings.NewReader(sample), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	extra := "wavelength_A species log_gf lower_energy_eV lower_g\n5000 Nd_II -1 0.3 8\n"
	b, _, err := Read(strings.NewReader(extra), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m, rep := Merge(a, b, a)
	if m.Len() != 5 || rep.Duplicates != 4 {
		t.Errorf("merge: %d lines, %d duplicates; want 5 and 4", m.Len(), rep.Duplicates)
	}
	for i := 1; i < m.Len(); i++ {
		if m.Wavelength[i] < m.Wavelength[i-1] {
			t.Fatal("merged store not sorted")
		}
	}
	// Each line keeps its species and lower level through the merge.
	for i := 0; i < m.Len(); i++ {
		sp := m.SpeciesTable[m.Species[i]]
		if int(m.Levels.Species[m.Lower[i]]) != int(m.Species[i]) {
			t.Errorf("line %d: lower level belongs to another species", i)
		}
		if sp == MustSpecies("Nd II") && (m.Levels.Energy[m.Lower[i]] != 0.3 || m.Levels.G[m.Lower[i]] != 8) {
			t.Errorf("Nd II line lost its lower level")
		}
	}
	bl := NewBuilder()
	bl.KeepDuplicates = true
	bl.AddStore(a)
	bl.AddStore(a)
	k, rep := bl.Build()
	if k.Len() != 8 || rep.Duplicates != 4 {
		t.Errorf("KeepDuplicates: %d lines %d duplicates", k.Len(), rep.Duplicates)
	}
	// Partition functions read the grouped table through levelStart; they
	// must equal the scanning path.
	if m.levelStart == nil {
		t.Fatal("Build left the level table ungrouped")
	}
	scan := *m
	scan.levelStart = nil
	for _, sp := range m.SpeciesTable {
		u1, c1 := m.PartitionFunction(sp, 6000)
		u2, c2 := scan.PartitionFunction(sp, 6000)
		if u1 != u2 || c1 != c2 {
			t.Errorf("%v: grouped %v %v, scanned %v %v", sp, u1, c1, u2, c2)
		}
	}
}

func TestStoreFilter(t *testing.T) {
	s, _, _ := Read(strings.NewReader(sample), ReadOptions{})
	f, sk := s.Filter(Filter{MinWavelength: 8510, MaxWavelength: 9000})
	if f.Len() != 2 || sk.Wavelength != 2 {
		t.Errorf("range: %d lines, %+v", f.Len(), sk)
	}
	f, sk = s.Filter(Filter{Species: []Species{MustSpecies("Sr II")}})
	if f.Len() != 1 || sk.Species != 3 || f.SpeciesTable[f.Species[0]] != MustSpecies("Sr II") {
		t.Errorf("species: %d lines, %+v", f.Len(), sk)
	}
	f, sk = s.Filter(Filter{HasMinLogGF: true, MinLogGF: -0.4})
	if f.Len() != 2 || sk.Strength != 2 {
		t.Errorf("strength: %d lines, %+v", f.Len(), sk)
	}
	if s.Len() != 4 {
		t.Error("Filter changed its receiver")
	}
}

func TestWriteSummary(t *testing.T) {
	s, rep, _ := Read(strings.NewReader(sample), ReadOptions{Name: "sample.txt"})
	var b bytes.Buffer
	if err := WriteSummary(&b, s, rep); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"file sample.txt: 4 rows, 4 lines added", "wavelengths in air", "source: typed for this test",
		"4 lines, 2 species, 6 levels", "duplicates found: 0", "Ca II", "Sr II", "lower bound"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	sum := s.Summary()
	if sum.Species[0].Lines != 3 || sum.Species[0].Levels != 4 || sum.Species[1].Lines != 1 {
		t.Errorf("summary %+v", sum.Species)
	}
}

// TestReadFixedSpecies reads our format without a species column, the
// species given for the whole file.
func TestReadFixedSpecies(t *testing.T) {
	in := "wavelength_um log_gf lower_energy_eV\n1.0330140 -0.35 1.8\n"
	s, _, err := Read(strings.NewReader(in), ReadOptions{Species: MustSpecies("Sr II")})
	if err != nil {
		t.Fatal(err)
	}
	if s.SpeciesTable[s.Species[0]] != MustSpecies("Sr II") || !scalar.EqualWithinAbs(s.Wavelength[0], 10330.14, 1e-9) {
		t.Errorf("%v %v", s.SpeciesTable, s.Wavelength)
	}
	if _, _, err := Read(strings.NewReader(sample), ReadOptions{Species: MustSpecies("Sr II")}); err == nil || !errors.Is(err, ErrHeader) {
		t.Errorf("species column plus a fixed species: %v", err)
	}
	if _, _, err := Read(strings.NewReader(in), ReadOptions{}); err == nil || !strings.Contains(err.Error(), "missing column(s) species") {
		t.Errorf("no species at all: %v", err)
	}
}

// TestDedupBounded: 60 000 distinct lines at one wavelength must not make
// duplicate detection quadratic, and exact repeats among them are still
// found.
func TestDedupBounded(t *testing.T) {
	b := NewBuilder()
	for i := 0; i < 60000; i++ {
		b.Add(Line{Wavelength: 5000, LogGF: -1, Species: Species{Z: 60, Charge: 1}, LowerEnergy: float64(i) * 1e-3, LowerG: 8})
	}
	b.Add(Line{Wavelength: 5000, LogGF: -1, Species: Species{Z: 60, Charge: 1}, LowerEnergy: 7e-3, LowerG: 8})
	s, rep := b.Build()
	if s.Len() != 60000 || rep.Duplicates != 1 {
		t.Errorf("%d lines, %d duplicates; want 60000 and 1", s.Len(), rep.Duplicates)
	}
}

// TestReadWorkers checks that parsing with several goroutines gives the
// same store and the same (first) error as parsing serially, on input of
// several chunks.
func TestReadWorkers(t *testing.T) {
	data := benchText(60_000) // ≈ 2.4 MB: three chunks
	serial, rs, err := Read(bytes.NewReader(data), ReadOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []int{2, 3, 8} {
		par, rp, err := Read(bytes.NewReader(data), ReadOptions{Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		sameStore(t, serial, par)
		if rs.Files[0].Rows != rp.Files[0].Rows || rp.Files[0].Rows != 60_000 {
			t.Errorf("rows %d vs %d", rs.Files[0].Rows, rp.Files[0].Rows)
		}
	}
	// Two bad rows far apart: both modes report the first, with its line.
	lines := strings.SplitAfter(string(data), "\n")
	lines[30002] = "5000 Nd_II oops 0 8\n"
	lines[55000] = "5000 Nd_II -1 -7 8\n"
	bad := strings.Join(lines, "")
	for _, w := range []int{1, 2, 4} {
		_, _, err := Read(strings.NewReader(bad), ReadOptions{Name: "big", Workers: w})
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != 30003 || pe.Column != 3 || pe.File != "big" {
			t.Errorf("workers=%d: %v, want big:30003 column 3", w, err)
		}
	}
	// A filter counts the same either way.
	f := Filter{MinWavelength: 5000, MaxWavelength: 9000, HasMinLogGF: true, MinLogGF: -3}
	_, r1, _ := Read(bytes.NewReader(data), ReadOptions{Filter: f, Workers: 1})
	_, r2, _ := Read(bytes.NewReader(data), ReadOptions{Filter: f, Workers: 2})
	if r1.Files[0].Skipped != r2.Files[0].Skipped || r1.Files[0].Added != r2.Files[0].Added || r1.Files[0].Skipped.Total() == 0 {
		t.Errorf("filter counts differ: %+v vs %+v", r1.Files[0], r2.Files[0])
	}
}

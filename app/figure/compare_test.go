package figure

import (
	"broadline/app/core"
	"bytes"
	"context"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// noSr is the demo composition with its strontium moved to xenon (which
// has no demo lines): a wrong candidate.
const noSr = "Ca=0.002,Y=0.002,Zr=0.008,Ce=4e-5,Nd=7e-5,Sm=2.5e-5,Eu=1.5e-5,Se=0.25,Br=0.04,Kr=0.25,Rb=0.05,Mo=0.05,Ru=0.06,Pd=0.05,Te=0.13,Xe=0.10785"

// TestCompareAndExport draws the comparison of the recorded model and a
// wrong one and exports it as PNG, SVG and PDF:
// each file is what its extension says, the SVG names both candidates and
// carries the cautions, and an unknown extension or an unwritable place is
// refused without leaving a file.
func TestCompareAndExport(t *testing.T) {
	b := demoBench(t)
	wrong, err := core.ParseComposition(noSr)
	if err != nil {
		t.Fatal(err)
	}
	// Uniform ejecta (the first epoch's photosphere lies above the demo's
	// inner zone anyway), so that B's caption has no Sr at all.
	start := b.Data.StartModel(0).WithoutZone()
	cands := []core.Candidate{{Label: "A", Model: start}, {Label: "B", Model: start}}
	cands[1].MassFractions = wrong
	cmp, err := b.Compare(context.Background(), cands, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	fig, err := Comparison(b, cmp, core.UnitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	caption := fig.Caption
	if len(caption) != 4 || !strings.Contains(caption[0], "Sr 0.03") || strings.Contains(caption[1], "Sr ") ||
		!strings.Contains(caption[2], "INVENTED") || !strings.Contains(caption[3], "hypothesis") {
		t.Errorf("caption %q", caption)
	}
	dir := t.TempDir()
	w, h := 8*vg.Inch, 5*vg.Inch
	for _, name := range []string{"cmp.png", "cmp.svg", "cmp.pdf"} {
		path := filepath.Join(dir, name)
		if err := fig.Export(path, w, h); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		switch filepath.Ext(name) {
		case ".png":
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil {
				t.Fatalf("PNG: %v", err)
			}
			if sz := img.Bounds().Size(); sz.X < 700 || sz.Y < 400 {
				t.Errorf("PNG %v pixels", sz)
			}
		case ".svg":
			svg := string(data)
			for _, want := range []string{"<svg", "A  (χ²/N", "B  (χ²/N", "hypothesis", "INVENTED"} {
				if !strings.Contains(svg, want) {
					t.Errorf("SVG lacks %q", want)
				}
			}
		case ".pdf":
			if !bytes.HasPrefix(data, []byte("%PDF-")) {
				t.Errorf("PDF starts %q", data[:min(8, len(data))])
			}
		}
	}
	if err := fig.Export(filepath.Join(dir, "cmp.bmp"), w, h); err == nil {
		t.Error("a .bmp export was not refused")
	}
	if err := fig.Export(filepath.Join(dir, "no", "such", "dir.png"), w, h); err == nil {
		t.Error("an export into a missing directory did not fail")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 3 {
		t.Errorf("files left in the export directory: %v", ents)
	}
}

// TestWrapText: with each character one unit wide, lines break at spaces
// before the width is passed, and nothing is lost or reordered.
func TestWrapText(t *testing.T) {
	width := func(s string) vg.Length { return vg.Length(len(s)) }
	got := WrapText("Sr 0.03, Y 0.002, Zr 0.008, averyveryverylongword x", 12, width)
	want := []string{"Sr 0.03, Y", "0.002, Zr", "0.008,", "averyveryverylongword", "x"}
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("got %q, want %q", got, want)
	}
}

package main

import (
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

// TestCompareAndExport keeps the recorded model and a wrong one as
// candidates, compares them (the recorded one fits the invented data
// better, as it made them), and exports the figure as PNG, SVG and PDF:
// each file is what its extension says, the SVG names both candidates and
// carries the cautions, and an unknown extension or an unwritable place is
// refused without leaving a file.
func TestCompareAndExport(t *testing.T) {
	b := demoBench(t)
	s := newSession("demo", b.data)
	s.Candidates = append(s.Candidates, candidateOf(s, nextLabel(s.Candidates)))
	wrong := candidateOf(s, nextLabel(s.Candidates))
	wrong.MassFractions = noSr
	s.Candidates = append(s.Candidates, wrong)
	other := candidateOf(s, "elsewhere")
	other.Epoch = 1
	other.PhotosphereVelocity, other.Temperature = b.data.Scenario.Epochs[1].PhotosphereVelocity, b.data.Scenario.Epochs[1].Temperature
	s.Candidates = append(s.Candidates, other)
	if err := s.Validate(b.data); err != nil {
		t.Fatal(err)
	}
	if s.Candidates[0].Label != "A" || s.Candidates[1].Label != "B" {
		t.Errorf("labels %q, %q, want A, B", s.Candidates[0].Label, s.Candidates[1].Label)
	}
	n := 0
	cmp, err := b.compareCandidates(context.Background(), s, 0, func(done, total int) { n = done })
	if err != nil {
		t.Fatal(err)
	}
	if len(cmp.Models) != 2 || n != 2 {
		t.Fatalf("%d models, progress %d: want the two candidates of epoch 0", len(cmp.Models), n)
	}
	good := cmp.Models[0].Chi2 / float64(cmp.Models[0].N)
	bad := cmp.Models[1].Chi2 / float64(cmp.Models[1].N)
	t.Logf("χ²/N recorded composition %.3f, without Sr %.3f", good, bad)
	if !(good < 1.5 && bad > 2*good) {
		t.Errorf("χ²/N recorded composition %.3f, without Sr %.3f: want ~1 and clearly worse", good, bad)
	}

	p, caption, err := b.comparisonFigure(cmp, unitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	if len(caption) != 4 || !strings.Contains(caption[0], "Sr 0.03") || strings.Contains(caption[1], "Sr ") ||
		!strings.Contains(caption[2], "INVENTED") || !strings.Contains(caption[3], "hypothesis") {
		t.Errorf("caption %q", caption)
	}
	dir := t.TempDir()
	w, h := 8*vg.Inch, 5*vg.Inch
	for _, name := range []string{"cmp.png", "cmp.svg", "cmp.pdf"} {
		path := filepath.Join(dir, name)
		if err := exportFigure(p, caption, path, w, h); err != nil {
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
	if err := exportFigure(p, caption, filepath.Join(dir, "cmp.bmp"), w, h); err == nil {
		t.Error("a .bmp export was not refused")
	}
	if err := exportFigure(p, caption, filepath.Join(dir, "no", "such", "dir.png"), w, h); err == nil {
		t.Error("an export into a missing directory did not fail")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 3 {
		t.Errorf("files left in the export directory: %v", ents)
	}
	if _, err := b.compareCandidates(context.Background(), &Session{Version: 1, Dataset: "demo"}, 0, nil); err == nil {
		t.Error("a comparison without candidates did not fail")
	}
}

// TestCandidatesValidate: a session's candidates are checked like its own
// model, and their labels must be present and distinct.
func TestCandidatesValidate(t *testing.T) {
	d, err := loadDemo()
	if err != nil {
		t.Fatal(err)
	}
	base := newSession("demo", d)
	for name, mutate := range map[string]func(c *Candidate){
		"empty label":     func(c *Candidate) { c.Label = " " },
		"bad composition": func(c *Candidate) { c.MassFractions = "Qq=1" },
		"epoch":           func(c *Candidate) { c.Epoch = 7 },
		"velocity":        func(c *Candidate) { c.PhotosphereVelocity = 0.5 },
		"temperature":     func(c *Candidate) { c.Temperature = 10 },
	} {
		s := *base
		c := candidateOf(base, "A")
		mutate(&c)
		s.Candidates = []Candidate{c}
		if err := s.Validate(d); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	s := *base
	s.Candidates = []Candidate{candidateOf(base, "A"), candidateOf(base, "A")}
	if err := s.Validate(d); err == nil {
		t.Error("two candidates labelled A: accepted")
	}
	s.Candidates = nil
	for range maxCandidates + 1 {
		s.Candidates = append(s.Candidates, candidateOf(base, nextLabel(s.Candidates)))
	}
	if err := s.Validate(d); err == nil {
		t.Errorf("%d candidates: accepted", len(s.Candidates))
	}
}

// TestWrapText: with each character one unit wide, lines break at spaces
// before the width is passed, and nothing is lost or reordered.
func TestWrapText(t *testing.T) {
	width := func(s string) vg.Length { return vg.Length(len(s)) }
	got := wrapText("Sr 0.03, Y 0.002, Zr 0.008, averyveryverylongword x", 12, width)
	want := []string{"Sr 0.03, Y", "0.002, Zr", "0.008,", "averyveryverylongword", "x"}
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("got %q, want %q", got, want)
	}
}

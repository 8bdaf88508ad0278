package core

import (
	"context"
	"testing"
)

// noSr is the demo composition with its strontium moved to xenon (which
// has no demo lines): a wrong candidate.
const noSr = "Ca=0.002,Y=0.002,Zr=0.008,Ce=4e-5,Nd=7e-5,Sm=2.5e-5,Eu=1.5e-5,Se=0.25,Br=0.04,Kr=0.25,Rb=0.05,Mo=0.05,Ru=0.06,Pd=0.05,Te=0.13,Xe=0.10785"

// TestCompareAndExport keeps the recorded model and a wrong one as
// candidates, and compares them: the recorded one fits the invented data
// better, as it made them; a candidate of another epoch is left out, and a
// comparison without candidates fails.
func TestCompare(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	if _, err := s.Keep(); err != nil {
		t.Fatal(err)
	}
	wrong := Candidate{Label: NextLabel(s.Candidates), Model: s.Model}
	wrong.MassFractions = mustComp(t, noSr)
	s.Candidates = append(s.Candidates, wrong)
	s.Candidates = append(s.Candidates, Candidate{Label: "elsewhere", Model: b.Data.StartModel(1)})
	if err := s.Validate(b.Data); err != nil {
		t.Fatal(err)
	}
	if s.Candidates[0].Label != "A" || s.Candidates[1].Label != "B" {
		t.Errorf("labels %q, %q, want A, B", s.Candidates[0].Label, s.Candidates[1].Label)
	}
	n := 0
	cmp, err := b.Compare(context.Background(), s.Candidates, 0, func(done, total int) { n = done })
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

	if _, err := b.Compare(context.Background(), nil, 0, nil); err == nil {
		t.Error("a comparison without candidates did not fail")
	}
}

// TestCandidatesValidate: a session's candidates are checked like its own
// model, and their labels must be present and distinct.
func TestCandidatesValidate(t *testing.T) {
	b := demoBench(t)
	d := b.Data
	base := NewSession(b)
	for name, mutate := range map[string]func(c *Candidate){
		"empty label":    func(c *Candidate) { c.Label = " " },
		"no composition": func(c *Candidate) { c.MassFractions = Composition{} },
		"epoch":          func(c *Candidate) { c.Epoch = 7 },
		"velocity":       func(c *Candidate) { c.PhotosphereVelocity = 0.5 },
		"temperature":    func(c *Candidate) { c.Temperature = 10 },
	} {
		s := *base
		c := Candidate{Label: "A", Model: base.Model}
		mutate(&c)
		s.Candidates = []Candidate{c}
		if err := s.Validate(d); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	s := *base
	s.Candidates = []Candidate{{Label: "A", Model: base.Model}, {Label: "A", Model: base.Model}}
	if err := s.Validate(d); err == nil {
		t.Error("two candidates labelled A: accepted")
	}
	s.Candidates = nil
	for range MaxCandidates + 1 {
		s.Candidates = append(s.Candidates, Candidate{Label: NextLabel(s.Candidates), Model: base.Model})
	}
	if err := s.Validate(d); err == nil {
		t.Errorf("%d candidates: accepted", len(s.Candidates))
	}
}

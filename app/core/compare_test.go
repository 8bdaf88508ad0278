package core

import (
	"context"
	"strings"
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

// TestCandidateRows: each row names the elements whose fractions differ
// between the candidates (in order of Z, with their normalised values),
// not the shared ones; identical mixes say so; a lone candidate shows its
// mix.
func TestCandidateRows(t *testing.T) {
	b := demoBench(t)
	m := b.Data.StartModel(0)
	a := Candidate{Label: "A", Model: m}
	m.MassFractions = mustComp(t, "Ca=0.002,Se=0.25,Br=0.04,Kr=0.25,Rb=0.05,Y=0.002,Zr=0.008,Mo=0.05,Ru=0.06,Pd=0.05,Te=0.13,Xe=0.10785,Ce=4e-05,Nd=7e-05,Sm=2.5e-05,Eu=1.5e-05")
	bb := Candidate{Label: "B", Model: m}
	rows := CandidateRows(b.Data, []Candidate{a, bb})
	if len(rows) != 2 || !strings.HasSuffix(rows[0], "Sr 0.03, Xe 0.0778") || !strings.HasSuffix(rows[1], "Sr 0, Xe 0.108") {
		t.Errorf("rows %q", rows)
	}
	if strings.Contains(rows[0], "Kr") || !strings.HasPrefix(rows[0], "A · 1.5 d · ") {
		t.Errorf("row %q names a shared element or lacks the epoch", rows[0])
	}
	if r := CandidateRows(b.Data, []Candidate{a, {Label: "C", Model: a.Model}}); !strings.HasSuffix(r[1], "same mix as the others") {
		t.Errorf("identical mixes: %q", r)
	}
	if r := CandidateRows(b.Data, []Candidate{a}); !strings.Contains(r[0], "Sr") || !strings.Contains(r[0], "Kr") {
		t.Errorf("lone candidate: %q", r)
	}
}

// TestCompareAtAnotherEpoch: a candidate kept at epoch 1 is compared at
// epoch 3 with its mix at the current model's photosphere, and labelled so.
func TestCompareAtAnotherEpoch(t *testing.T) {
	b := demoBench(t)
	a := Candidate{Label: "A", Model: b.Data.StartModel(0)}
	at := b.Data.StartModel(2)
	at.Preview = true
	cmp, err := b.CompareAt(context.Background(), []Candidate{a}, at, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := cmp.Candidates[0]
	if cmp.Epoch != 2 || c.Epoch != 2 || c.PhotosphereVelocity != at.PhotosphereVelocity || c.MassFractions != a.MassFractions ||
		!strings.Contains(c.Label, "mix at 7.5 d") || len(cmp.Models) != 1 || cmp.Models[0].N == 0 {
		t.Errorf("comparison %+v", c)
	}
}

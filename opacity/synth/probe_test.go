package synth

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/spectra"
)

func TestProbeDemo(t *testing.T) {
	b := linelists.NewBuilder()
	for _, e := range []string{"zr", "nd", "ce"} {
		p := filepath.Join("../../app/demo/lines", "demo_"+e+".txt.gz")
		r, _ := os.Open(p)
		if _, err := b.Read(r, linelists.ReadOptions{Name: p}); err != nil {
			t.Fatal(err)
		}
		r.Close()
	}
	st, _ := b.Build()
	m, _ := NewModel(st, 3600, 25000, 0)
	comp, _ := opacity.ParseComposition("Nd=0.00001,Ce=0.00001,Te=0.999")
	ej := Ejecta{Time: 1.5 * spectra.Day, Mass: 0.04 * spectra.SolarMass, BetaIn: 0.05, BetaPh: 0.26, BetaMax: 0.4, DensityIndex: 3, Temperature: 5400}
	s, err := m.prepare(context.Background(), comp, ej, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	tau := s.tau(m, nil)
	n0 := tau.Node(0)
	big, mx, sum := 0, 0.0, 0.0
	for _, v := range n0 {
		if v > 1 {
			big++
		}
		mx = max(mx, v)
		sum += v
	}
	t.Logf("bins %d, >1: %d, max %g, mean %g", len(n0), big, mx, sum/float64(len(n0)))
	lo, hi := tau.Grid.Nearest(9460), tau.Grid.Nearest(11670)
	cnt, m2, s2 := 0, 0.0, 0.0
	for i := lo; i < hi; i++ {
		if n0[i] > 0.1 {
			cnt++
		}
		m2 = max(m2, n0[i])
		s2 += n0[i]
	}
	t.Logf("9460-11670: %d bins, >0.1: %d, max %g, sum %g", hi-lo, cnt, m2, s2)
	for i := 0; i < len(n0); i += 500000 {
		t.Logf("%8.1f %g", tau.Grid.Wavelength(i), n0[i])
	}
	sf := s.sf[0]
	for i, sp := range st.SpeciesTable {
		t.Logf("%v sf=%g", sp, sf[i])
	}
}

func TestProbeDemo2(t *testing.T) {
	b := linelists.NewBuilder()
	for _, e := range []string{"zr", "nd", "ce"} {
		p := filepath.Join("../../app/demo/lines", "demo_"+e+".txt.gz")
		r, _ := os.Open(p)
		if _, err := b.Read(r, linelists.ReadOptions{Name: p}); err != nil {
			t.Fatal(err)
		}
		r.Close()
	}
	st, _ := b.Build()
	for _, rng := range [][2]float64{{3600, 25000}, {6000, 12000}} {
		m, _ := NewModel(st, rng[0], rng[1], 0)
		comp, _ := opacity.ParseComposition("Nd=0.00001,Ce=0.00001,Te=0.999")
		ej := Ejecta{Time: 1.5 * spectra.Day, Mass: 0.04 * spectra.SolarMass, BetaIn: 0.05, BetaPh: 0.26, BetaMax: 0.4, DensityIndex: 3, Temperature: 5400}
		for _, pv := range []bool{false, true} {
			r, err := m.Spectrum(context.Background(), comp, ej, Settings{Preview: pv})
			if err != nil {
				t.Fatal(err)
			}
			g := m.Grid()
			for _, l := range []float64{7000, 8000, 9000, 10000, 11000} {
				t.Logf("range %v preview %v: %g -> %g", rng, pv, l, r.Normalized[g.Nearest(l)])
			}
		}
	}
}

func TestProbeKappa(t *testing.T) {
	for _, el := range []string{"nd", "zr", "sr", "y", "ce"} {
		b := linelists.NewBuilder()
		p := filepath.Join("../../app/demo/lines", "demo_"+el+".txt.gz")
		r, _ := os.Open(p)
		if _, err := b.Read(r, linelists.ReadOptions{Name: p}); err != nil {
			t.Fatal(err)
		}
		r.Close()
		p = filepath.Join("../../app/demo/lines", "demo_"+el+"_levels.txt.gz")
		r, _ = os.Open(p)
		if _, err := b.ReadLevels(r, linelists.LevelsOptions{Name: p}); err != nil {
			t.Fatal(err)
		}
		r.Close()
		st, _ := b.Build()
		comp, _ := opacity.ParseComposition(el + "=1")
		pl, err := opacity.Solve(comp, 3e-15, 5400, st.PartitionFunction)
		if err != nil {
			t.Fatal(err)
		}
		g, _ := opacity.LinearGrid(4000, 25000, 100)
		x, err := opacity.ExpansionOpacity(context.Background(), st, pl, 1.5*spectra.Day, g, 1)
		if err != nil {
			t.Fatal(err)
		}
		k, _ := x.Grey(5000, 25000)
		t.Logf("%s: Planck mean %g cm2/g, grey 0.5-2.5um %g", el, x.PlanckMean(5000), k)
	}
}

func TestProbeSum(t *testing.T) {
	b := linelists.NewBuilder()
	for _, e := range []string{"nd", "ce"} {
		p := filepath.Join("../../app/demo/lines", "demo_"+e+".txt.gz")
		r, _ := os.Open(p)
		b.Read(r, linelists.ReadOptions{Name: p})
		r.Close()
		p = filepath.Join("../../app/demo/lines", "demo_"+e+"_levels.txt.gz")
		r, _ = os.Open(p)
		b.ReadLevels(r, linelists.LevelsOptions{Name: p})
		r.Close()
	}
	st, _ := b.Build()
	comp, _ := opacity.ParseComposition("Nd=0.00001,Ce=0.00001,Te=0.999")
	pl, _ := opacity.Solve(comp, 2.95e-15, 5400, st.PartitionFunction)
	lev := opacity.PlasmaLevelDensities(nil, st, pl)
	per := make([]float64, st.Len())
	opacity.Sobolev(context.Background(), per, st, lev, 5400, 1.5*spectra.Day, 1)
	sum, n, mx := 0.0, 0, 0.0
	for i, l := range st.Wavelength {
		if l > 9460 && l < 11670 {
			sum += per[i]
			n++
			if per[i] > mx {
				mx = per[i]
				t.Logf("%v %g lgf %g E %g tau %g", st.SpeciesTable[st.Species[i]], l, st.LogGF[i], st.Levels.Energy[st.Lower[i]], per[i])
			}
		}
	}
	t.Logf("lines %d sum %g", n, sum)
	for _, e := range pl.Elements {
		t.Logf("Z=%d N=%g ion=%v U=%v", e.Z, e.NumberDensity, e.Ion, e.Partition)
	}
}

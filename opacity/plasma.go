package opacity

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"broadline/linelists"
	"broadline/physics"
)

// MaxStages is the largest number of ion stages modelled per element:
// stages I–V (charges 0–4), limited by the four ionisation energies that
// linelists.Element holds.
const MaxStages = 5

// PartitionFunc returns the partition function U = Σ g_i exp(−E_i/kT) of
// species sp at temperature T (K), and whether it is complete (false when it
// is a lower bound, e.g. only the ground level or only the levels a line list
// names). It must return a positive, finite U. Solve never calls it for a
// bare nucleus, whose U is 1.
type PartitionFunc func(sp linelists.Species, T float64) (u float64, complete bool)

// GroundPartition is the PartitionFunc of last resort: the statistical
// weight of the ground level (linelists.GroundWeight), reported as
// incomplete. Where the ground weight is unknown it is 1.
func GroundPartition(sp linelists.Species, T float64) (float64, bool) {
	g, _ := linelists.GroundWeight(sp)
	return g, false
}

// ErrNotConverged is the cause of the error Solve returns when the charge
// neutrality solve did not converge; it is not expected, and is there so that
// a failure can never pass silently.
var ErrNotConverged = errors.New("electron density did not converge")

// ErrInput is the cause of errors about physical input out of range (T ≤ 0,
// ρ ≤ 0, t ≤ 0, non-finite values, missing atomic data).
var ErrInput = errors.New("bad input")

// ElementState is the LTE state of one element: its number density and how
// it divides among ion stages. Index j of the arrays is the ion charge
// (stage j+1); entries at j ≥ Stages are zero.
type ElementState struct {
	Z             int
	MassFraction  float64
	NumberDensity float64 // nuclei of this element, cm⁻³
	// Stages is the number of stages modelled: 1 + the number of
	// consecutive known ionisation energies, at most MaxStages and at most
	// Z+1 (the last stage is then the bare nucleus).
	Stages            int
	Ion               [MaxStages]float64 // number density of each stage, cm⁻³
	Partition         [MaxStages]float64 // partition function of each stage
	PartitionComplete [MaxStages]bool
}

// Species returns the species of stage index j (charge j) of this element.
func (e *ElementState) Species(j int) linelists.Species {
	return linelists.Species{Z: uint8(e.Z), Charge: uint8(j)}
}

// Plasma is the LTE state of a composition at one mass density and
// temperature, with the electron density from charge neutrality.
type Plasma struct {
	Temperature     float64 // K
	Density         float64 // mass density, g cm⁻³
	ElectronDensity float64 // cm⁻³; 0 when below the smallest float64
	// LnElectronDensity is ln(n_e / cm⁻³), finite even where n_e
	// underflows (a nearly neutral gas at tens of kelvin).
	LnElectronDensity float64
	// Iterations counts evaluations of the charge balance in the root
	// solve, bracketing included.
	Iterations int
	// Residual is |n_e − Σ charges|/n_e at the solution.
	Residual float64
	// Elements holds one entry per element of the composition, by
	// ascending Z.
	Elements []ElementState
}

// Element returns the state of element z, or nil if it is not in the plasma.
func (p *Plasma) Element(z int) *ElementState {
	i := sort.Search(len(p.Elements), func(i int) bool { return p.Elements[i].Z >= z })
	if i < len(p.Elements) && p.Elements[i].Z == z {
		return &p.Elements[i]
	}
	return nil
}

// Species returns the number density (cm⁻³) and partition function of
// species sp. ok is false when the element is not in the composition or the
// stage is not modelled; n and u are then 0 and 1.
func (p *Plasma) Species(sp linelists.Species) (n, u float64, ok bool) {
	e := p.Element(int(sp.Z))
	if e == nil || int(sp.Charge) >= e.Stages {
		return 0, 1, false
	}
	return e.Ion[sp.Charge], e.Partition[sp.Charge], true
}

// sahaConst is (2π mₑ k / h²)^{3/2} in cm⁻³ K^{−3/2}, derived from
// spectra's constants; 2.414683e15 by REFERENCES.md [calc].
var sahaConst = math.Pow(2*math.Pi*physics.ElectronMass*physics.Boltzmann/(physics.Planck*physics.Planck), 1.5)

// maxSolveIterations bounds the root solve; bisection alone needs about 60
// steps from any bracket the solver builds.
const maxSolveIterations = 300

// elementWork holds what the charge balance needs of one element, fixed for
// one temperature: ln N and the cumulative Saha terms.
type elementWork struct {
	lnN    float64
	stages int
	// cum[j] = Σ_{i<j} ln(2 (U_{i+1}/U_i) S T^{3/2} e^{−χ_i/kT}), so that
	// ln(n_j/n_0) = cum[j] − j ln n_e.
	cum [MaxStages]float64
}

// Solve returns the LTE plasma state of composition c at mass density rho
// (g cm⁻³) and temperature T (K). Partition functions come from part (nil
// means GroundPartition). Stage populations follow the Saha equation,
//
//	n_{j+1} n_e / n_j = 2 (U_{j+1}/U_j) (2π mₑ k T/h²)^{3/2} exp(−χ_j/kT),
//
// evaluated as cumulative sums in log space, and n_e solves charge
// neutrality n_e = Σ_k N_k Σ_j j f_kj(n_e) by a bracketed Brent root solve
// on ln n_e, in which every quantity is a logarithm, so that nearly neutral
// and fully ionised gases converge alike. An element with no known
// ionisation energy stays neutral (Stages = 1).
func Solve(c Composition, rho, T float64, part PartitionFunc) (*Plasma, error) {
	return SolveAtoms(c, rho, T, Atoms{Partition: part})
}

// Atoms supplies the atomic data a plasma state reads.
type Atoms struct {
	// Element returns element z with its atomic weight and ionisation
	// energies; nil means the linelists table (linelists.ElementByZ).
	Element func(z int) (linelists.Element, error)
	// Partition gives the partition functions; nil means GroundPartition.
	Partition PartitionFunc
}

// StoreAtoms returns the atomic data as st knows them: ionisation energies
// with the user's overrides applied (Store.Element) and partition functions
// summed over the store's levels (Store.PartitionFunction, whose fallback is
// the ground weight, overrides included).
func StoreAtoms(st *linelists.Store) Atoms {
	return Atoms{Element: st.Element, Partition: st.PartitionFunction}
}

// SolveAtoms is Solve with the atomic data taken from a.
func SolveAtoms(c Composition, rho, T float64, a Atoms) (*Plasma, error) {
	part := a.Partition
	element := a.Element
	if element == nil {
		element = func(z int) (linelists.Element, error) {
			e, err := linelists.ElementByZ(z)
			if err != nil {
				return linelists.Element{}, err
			}
			return *e, nil
		}
	}
	if !(rho > 0) || math.IsInf(rho, 0) {
		return nil, fmt.Errorf("opacity: %w: density %v g cm⁻³ (want a finite value > 0)", ErrInput, rho)
	}
	if !(T > 0) || math.IsInf(T, 0) {
		return nil, fmt.Errorf("opacity: %w: temperature %v K (want a finite value > 0)", ErrInput, T)
	}
	if len(c.Z) == 0 {
		return nil, fmt.Errorf("opacity: %w: empty composition", ErrComposition)
	}
	if part == nil {
		part = GroundPartition
	}
	p := &Plasma{Temperature: T, Density: rho, Elements: make([]ElementState, len(c.Z))}
	work := make([]elementWork, len(c.Z))
	kT := physics.Boltzmann * T / physics.ElectronVolt // eV
	lnS := math.Log(2*sahaConst) + 1.5*math.Log(T)
	maxElectrons := 0.0
	for k, z := range c.Z {
		el, err := element(z)
		if err != nil {
			return nil, fmt.Errorf("opacity: %w: %w", ErrComposition, err)
		}
		if !(el.Weight > 0) {
			return nil, fmt.Errorf("opacity: %w: no atomic weight for %s", ErrInput, el.Symbol)
		}
		es := &p.Elements[k]
		es.Z = z
		es.MassFraction = c.MassFraction[k]
		es.NumberDensity = rho * c.MassFraction[k] / (el.Weight * physics.AtomicMass)
		nIon := 0
		for nIon < len(el.Ionization) && el.Ionization[nIon] > 0 {
			nIon++
		}
		es.Stages = min(nIon, z) + 1
		for j := 0; j < es.Stages; j++ {
			sp := linelists.Species{Z: uint8(z), Charge: uint8(j)}
			if j >= z {
				es.Partition[j], es.PartitionComplete[j] = 1, true
				continue
			}
			u, complete := part(sp, T)
			if !(u > 0) || math.IsInf(u, 0) {
				return nil, fmt.Errorf("opacity: %w: partition function of %v at %g K is %v (want > 0)", ErrInput, sp, T, u)
			}
			es.Partition[j], es.PartitionComplete[j] = u, complete
		}
		w := &work[k]
		w.lnN = math.Log(es.NumberDensity)
		w.stages = es.Stages
		for j := 1; j < es.Stages; j++ {
			phi := lnS + math.Log(es.Partition[j]/es.Partition[j-1]) - el.Ionization[j-1]/kT
			w.cum[j] = w.cum[j-1] + phi
		}
		maxElectrons += es.NumberDensity * float64(es.Stages-1)
	}
	if !(maxElectrons > 0) {
		return nil, fmt.Errorf("opacity: %w: no element of %v has ionisation energies, so the electron density is undefined", ErrInput, c)
	}

	// h(x) = x − ln Σ charges(x) rises strictly with x = ln n_e. At
	// x_hi = ln(most electrons possible) h ≥ 0, and 1e-9 above it h > 0
	// even after rounding (a fully ionised gas has its root at x_hi);
	// below the root h falls like 2x, so stepping down by doubling
	// distances finds h < 0.
	h := func(x float64) float64 {
		p.Iterations++
		return x - lnCharges(work, x)
	}
	xhi := math.Log(maxElectrons) + 1e-9
	fhi := h(xhi)
	var x float64
	switch {
	case fhi == 0:
		x = xhi
	default:
		step := 1.0
		xlo := xhi - step
		flo := h(xlo)
		for flo > 0 {
			step *= 2
			if step > 1e300 || p.Iterations > maxSolveIterations {
				return nil, fmt.Errorf("opacity: %w: found no lower bracket for ln n_e (T = %g K, ρ = %g)", ErrNotConverged, T, rho)
			}
			xlo = xhi - step
			flo = h(xlo)
		}
		var err error
		x, err = brent(h, xlo, xhi, flo, fhi, &p.Iterations)
		if err != nil {
			return nil, fmt.Errorf("opacity: %w (T = %g K, ρ = %g g cm⁻³)", err, T, rho)
		}
	}
	p.ElectronDensity = math.Exp(x)
	p.LnElectronDensity = x
	p.Residual = math.Abs(-math.Expm1(-(x - lnCharges(work, x))))
	if !(p.Residual < 1e-8) {
		return nil, fmt.Errorf("opacity: %w: relative charge residual %g (T = %g K, ρ = %g g cm⁻³)", ErrNotConverged, p.Residual, T, rho)
	}
	for k := range work {
		var l [MaxStages]float64
		w := &work[k]
		for j := 0; j < w.stages; j++ {
			l[j] = w.cum[j] - float64(j)*x
		}
		lse := logSumExp(l[:w.stages])
		es := &p.Elements[k]
		for j := 0; j < w.stages; j++ {
			es.Ion[j] = es.NumberDensity * math.Exp(l[j]-lse)
		}
	}
	return p, nil
}

// lnCharges returns ln Σ_k N_k j̄_k at ln n_e = x, with the mean charge
// j̄ = Σ_j j e^{L_j} / Σ_j e^{L_j}, L_j = cum_j − j x, all in logs.
func lnCharges(work []elementWork, x float64) float64 {
	var terms [64]float64
	t := terms[:0]
	if len(work) > len(terms) {
		t = make([]float64, 0, len(work))
	}
	for k := range work {
		w := &work[k]
		if w.stages < 2 {
			continue
		}
		var l, lc [MaxStages]float64
		for j := 0; j < w.stages; j++ {
			l[j] = w.cum[j] - float64(j)*x
		}
		for j := 1; j < w.stages; j++ {
			lc[j-1] = l[j] + lnInt[j]
		}
		t = append(t, w.lnN+logSumExp(lc[:w.stages-1])-logSumExp(l[:w.stages]))
	}
	return logSumExp(t)
}

// lnInt[j] = ln j.
var lnInt = [MaxStages]float64{math.Inf(-1), 0, math.Ln2, math.Log(3), math.Log(4)}

// logSumExp returns ln Σ e^{v_i}, without overflow or underflow.
func logSumExp(v []float64) float64 {
	if len(v) == 0 {
		return math.Inf(-1)
	}
	m := v[0]
	for _, x := range v[1:] {
		m = max(m, x)
	}
	if math.IsInf(m, 0) {
		return m
	}
	s := 0.0
	for _, x := range v {
		s += math.Exp(x - m)
	}
	return m + math.Log(s)
}

// brent finds a root of f in [a, b] where f(a) = fa and f(b) = fb have
// opposite signs, by Brent's method (Brent 1973, Algorithms for Minimization
// without Derivatives, ch. 4): inverse quadratic interpolation or secant
// steps, with bisection whenever they would be slow or leave the bracket.
// iter counts the evaluations of f and bounds them.
func brent(f func(float64) float64, a, b, fa, fb float64, iter *int) (float64, error) {
	if fa*fb > 0 {
		return 0, fmt.Errorf("%w: root not bracketed", ErrNotConverged)
	}
	c, fc := a, fa
	d := b - a
	e := d
	for *iter <= maxSolveIterations {
		if fb == 0 {
			return b, nil
		}
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := 2*0x1p-52*math.Abs(b) + 1e-13
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol {
			return b, nil
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			var p, q float64
			s := fb / fa
			if a == c {
				p = 2 * m * s
				q = 1 - s
			} else {
				q0 := fa / fc
				r := fb / fc
				p = s * (2*m*q0*(q0-r) - (b-a)*(r-1))
				q = (q0 - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = m
				e = m
			}
		} else {
			d = m
			e = m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else if m > 0 {
			b += tol
		} else {
			b -= tol
		}
		fb = f(b)
	}
	return b, fmt.Errorf("%w after %d evaluations", ErrNotConverged, *iter)
}

// StorePartition returns the PartitionFunc that sums the levels st knows
// for each species (linelists.Store.PartitionFunction), falling back to the
// ground-level weight for species without levels.
func StorePartition(st *linelists.Store) PartitionFunc { return st.PartitionFunction }

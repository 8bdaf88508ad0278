package synth

import (
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
	"broadline/spectra"
)

// DefaultStep is the default spacing of the line-bin and spectrum grid in
// ln λ: 1/4500, i.e. 67 km/s, a third of the resolution element of a
// resolving power of 1500 and two thirds of one at 3000.
const DefaultStep = 1.0 / 4500

// StepFor returns a grid step in ln λ for spectra of resolving power R:
// a third of the resolution element, 1/(3R) (three samples per resolution
// element, common practice), but never finer than DefaultStep, and
// DefaultStep for R ≤ 0 (unsmoothed spectra). A coarser grid is much
// cheaper — the formal integral's cost grows roughly as the inverse square
// of the step — so fits against low-resolution spectra use it.
func StepFor(R float64) float64 {
	if !(R > 0) || math.IsInf(R, 0) {
		return DefaultStep
	}
	return math.Max(DefaultStep, 1/(3*R))
}

// Model turns a composition and ejecta parameters into spectra for one line
// store and one observed wavelength range. It caches what does not depend on
// the composition or the velocities (each line's bin and g f λ; the binned
// line strengths per species at each temperature used; partition
// functions), so that a change of composition, velocity or mass costs a few
// plasma solves and the formal integral, not a pass over every line. A Model
// is safe for concurrent use.
type Model struct {
	store    *linelists.Store
	from, to float64 // observed range, Å
	step     float64
	nObs     int // observed points: global indices [0, nObs)

	gidx []int32   // each line's global bin index, round(ln(λ/from)/step)
	gfl  []float64 // each line's g f λ[Å]

	mu        sync.Mutex
	strengths map[strengthKey]*strengthTable
	partition map[partKey]partValue
}

type strengthKey struct {
	T      float64
	lo, hi int // global index range
}

// strengthTable holds S[sp*n + b] = Σ g f λ e^{−E/kT} over the lines of
// species sp in bin b, for global indices [lo, lo+n).
type strengthTable struct {
	lo, n int
	S     []float64
}

type partKey struct {
	sp linelists.Species
	T  float64
}

type partValue struct {
	u        float64
	complete bool
}

// The strength cache is cleared when it would hold more than
// maxCachedTemperatures tables or maxCacheBytes bytes.
const (
	maxCachedTemperatures = 64
	maxCacheBytes         = 512 << 20
)

// NewModel prepares a model for line store st and observed vacuum
// wavelengths [from, to] Å on a logarithmic grid of spacing step in ln λ
// (≤ 0 means DefaultStep). The store must not change while the model is used.
func NewModel(st *linelists.Store, from, to, step float64) (*Model, error) {
	if st == nil {
		return nil, fmt.Errorf("synth: no line store")
	}
	if step <= 0 {
		step = DefaultStep
	}
	g, err := NewGrid(from, to, step)
	if err != nil {
		return nil, err
	}
	n := st.Len()
	if len(st.LogGF) != n || len(st.Species) != n || len(st.Lower) != n {
		panic("synth: inconsistent line store")
	}
	m := &Model{
		store: st, from: from, to: g.Wavelength(g.N - 1), step: step, nObs: g.N,
		gidx:      make([]int32, n),
		gfl:       make([]float64, n),
		strengths: map[strengthKey]*strengthTable{},
		partition: map[partKey]partValue{},
	}
	lnFrom := math.Log(from)
	for i, l := range st.Wavelength {
		x := math.Floor((math.Log(l)-lnFrom)/step + 0.5)
		x = math.Max(math.Min(x, math.MaxInt32/2), math.MinInt32/2)
		m.gidx[i] = int32(x)
		m.gfl[i] = math.Pow(10, float64(st.LogGF[i])) * l
	}
	return m, nil
}

// Grid returns the observed wavelength grid.
func (m *Model) Grid() Grid { return Grid{Start: m.from, Step: m.step, N: m.nObs} }

// Store returns the model's line store.
func (m *Model) Store() *linelists.Store { return m.store }

// partitionFunc returns a memoising partition function over the store.
func (m *Model) partitionFunc() opacity.PartitionFunc {
	return func(sp linelists.Species, T float64) (float64, bool) {
		k := partKey{sp, T}
		m.mu.Lock()
		v, ok := m.partition[k]
		m.mu.Unlock()
		if ok {
			return v.u, v.complete
		}
		u, c := m.store.PartitionFunction(sp, T)
		m.mu.Lock()
		if len(m.partition) > 1<<16 {
			clear(m.partition)
		}
		m.partition[k] = partValue{u, c}
		m.mu.Unlock()
		return u, c
	}
}

// strengthTableFor returns the binned line strengths at temperature T over
// global indices [lo, hi), computing them (in parallel, split at bin
// boundaries so that each bin is summed in line order) when not cached.
func (m *Model) strengthTableFor(ctx context.Context, T float64, lo, hi, workers int) (*strengthTable, error) {
	key := strengthKey{T, lo, hi}
	m.mu.Lock()
	tab, ok := m.strengths[key]
	m.mu.Unlock()
	if ok {
		return tab, nil
	}
	st := m.store
	nb := hi - lo
	nsp := len(st.SpeciesTable)
	tab = &strengthTable{lo: lo, n: nb, S: make([]float64, nsp*nb)}
	boltz := opacity.BoltzmannFactors(nil, st, T)
	// Lines are sorted by wavelength, so the lines of [lo, hi) are contiguous.
	first, last := searchIdx(m.gidx, int32(lo)), searchIdx(m.gidx, int32(hi))
	parts := max(1, min(workers, 8))
	bounds := make([]int, parts+1)
	bounds[0], bounds[parts] = first, last
	for p := 1; p < parts; p++ {
		b := first + (last-first)*p/parts
		for b < last && b > first && m.gidx[b] == m.gidx[b-1] {
			b++
		}
		bounds[p] = max(b, bounds[p-1])
	}
	var wg sync.WaitGroup
	for p := range parts {
		f := func() {
			S, gidx, gfl, sp, lower := tab.S, m.gidx, m.gfl, st.Species, st.Lower
			for l := bounds[p]; l < bounds[p+1]; l++ {
				S[int(sp[l])*nb+int(gidx[l])-lo] += gfl[l] * boltz[lower[l]]
			}
		}
		if parts == 1 {
			f()
		} else {
			wg.Go(f)
		}
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("synth: binning lines: %w", err)
	}
	m.mu.Lock()
	bytes := 0
	for _, t := range m.strengths {
		bytes += 8 * len(t.S)
	}
	if len(m.strengths) >= maxCachedTemperatures || bytes+8*len(tab.S) > maxCacheBytes {
		clear(m.strengths)
	}
	m.strengths[key] = tab
	m.mu.Unlock()
	return tab, nil
}

// searchIdx returns the first index with a[i] ≥ v in ascending a.
func searchIdx(a []int32, v int32) int {
	lo, hi := 0, len(a)
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if a[mid] < v {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	return lo
}

// Settings chooses what Spectrum computes. The zero value is the full
// formal integral at the default resolution, serial.
type Settings struct {
	// Nodes is the number of velocity nodes between the photosphere and the
	// outer edge at which the plasma is solved and τ tabulated
	// (default DefaultNodes).
	Nodes int
	// Options are the formal integral's rays, occultation and Doppler policy.
	Options Options
	// Preview selects the "absorption only" approximation (see
	// AbsorptionProfile) instead of the full formal integral.
	Preview bool
	// Without lists elements (Z) whose lines are removed: a knock-out. The
	// plasma (electron density, other elements' ionisation) is left as it is
	// with the element present.
	Without []int
	// Workers is the number of goroutines (≤ 0: serial).
	Workers int
}

// Result is a synthetic spectrum on the model's observed grid.
type Result struct {
	Wavelength []float64 // vacuum Å, logarithmic grid
	Normalized []float64 // F/F_c
	// Flux is π B_λ(T_ph) · F/F_c in erg s⁻¹ cm⁻² Å⁻¹ at the photosphere;
	// see AtDistance.
	Flux []float64
	// Preview is true for the absorption-only approximation.
	Preview bool
	// Ejecta are the parameters the spectrum was computed for.
	Ejecta Ejecta
	// Plasma holds the LTE state at each velocity node, from the
	// photosphere outwards; Velocity the nodes (v/c).
	Plasma   []*opacity.Plasma
	Velocity []float64
	// Warnings are plain sentences about the inputs' limits: elements of
	// the composition without lines in the store, ion stages with lines
	// whose partition function is only a lower bound.
	Warnings []string
}

// AtDistance returns the flux (erg s⁻¹ cm⁻² Å⁻¹) received at distance d (cm):
// Flux · (R_ph/d)².
func (r *Result) AtDistance(d float64) []float64 {
	q := r.Ejecta.PhotosphereRadius() / d
	out := make([]float64, len(r.Flux))
	for i, f := range r.Flux {
		out[i] = f * q * q
	}
	return out
}

// state is the per-call plasma and binned strengths shared by knock-outs.
type state struct {
	env    Envelope
	lo, hi int // global line-bin range
	plasma []*opacity.Plasma
	sf     [][]float64 // N_ion/U per store species, per node
	tables []*strengthTable
	stim   [][]float64 // 1 − e^{−hc/λkT} per bin, per node
	// With a temperature varying across nodes: per node, per element of
	// elemZ, the bins' Σ (N_ion/U) g f λ e^{−E/kT} (tables is then nil).
	elem    [][]float64
	elemZ   []int
	scale   float64 // (π e²/mₑc) · 1e-8 · t
	species []linelists.Species
	// elements are the elements (Z, ascending) of the compositions at the
	// nodes: the composition passed in, or its zones' where they hold.
	elements []int
}

// prepare solves the plasma at each node and fetches the binned strengths.
func (m *Model) prepare(ctx context.Context, comp opacity.Composition, ej Ejecta, set Settings) (*state, error) {
	if err := ej.Validate(); err != nil {
		return nil, err
	}
	nodes := set.Nodes
	if nodes <= 0 {
		nodes = DefaultNodes
	}
	env := Envelope{BetaPh: ej.BetaPh, BetaMax: ej.BetaMax, Nodes: nodes}
	if err := env.Validate(); err != nil {
		return nil, err
	}
	// The line-bin range covers every line that can act on the observed
	// range for outer velocities up to max(v_max, rangeBeta), so that moving
	// v_max below that does not invalidate the cached strengths.
	g := math.Max(ej.BetaMax, rangeBeta)
	lo := int(math.Floor(-math.Log((1+g)/math.Sqrt(1-g*g))/m.step)) - 2
	hi := m.nObs + int(math.Ceil(-math.Log(1-g)/m.step)) + 2
	s := &state{env: env, lo: lo, hi: hi, scale: physics.ClassicalLineCrossSection * physics.Angstrom * ej.Time,
		species: m.store.SpeciesTable}
	part := m.partitionFunc()
	seen := map[int]bool{}
	for k := range nodes {
		beta := env.Node(k)
		T := ej.TemperatureAt(beta)
		c := ej.CompositionAt(beta, comp)
		for _, z := range c.Z {
			if !seen[z] {
				seen[z] = true
				s.elements = append(s.elements, z)
			}
		}
		p, err := opacity.Solve(c, ej.Density(beta), T, part)
		if err != nil {
			return nil, fmt.Errorf("synth: plasma at %.4g c: %w", beta, err)
		}
		s.plasma = append(s.plasma, p)
		s.sf = append(s.sf, opacity.SpeciesFactors(nil, m.store, p))
		if !ej.Diluted {
			tab, err := m.strengthTableFor(ctx, T, lo, hi, set.Workers)
			if err != nil {
				return nil, err
			}
			s.tables = append(s.tables, tab)
		}
		st := make([]float64, hi-lo)
		for b := range st {
			lam := m.from * math.Exp(float64(lo+b)*m.step)
			st[b] = -math.Expm1(-physics.HCOverK / (lam * T))
		}
		s.stim = append(s.stim, st)
	}
	slices.Sort(s.elements)
	if ej.Diluted {
		if err := m.binByElement(ctx, s, ej, set.Workers); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// rangeBeta is the outer velocity (fraction of c) up to which the line-bin
// range does not depend on v_max.
const rangeBeta = 0.5

// binByElement fills s.elem for a temperature that varies from node to node
// (the diluted law): per node and per element of s.elements, the summed
// (N_ion/U) g f λ e^{−E/kT} of its lines in each bin. Each node needs its own
// Boltzmann factors, so these tables depend on the composition and are not
// cached; grouping by element rather than species keeps them small. Nodes are
// computed in parallel, each in line order.
func (m *Model) binByElement(ctx context.Context, s *state, ej Ejecta, workers int) error {
	st := m.store
	zs := s.elements
	elem := make([]int, len(st.SpeciesTable)) // species → index in zs, or −1
	for i, sp := range st.SpeciesTable {
		elem[i] = -1
		for e, z := range zs {
			if int(sp.Z) == z {
				elem[i] = e
			}
		}
	}
	nb := s.hi - s.lo
	first, last := searchIdx(m.gidx, int32(s.lo)), searchIdx(m.gidx, int32(s.hi))
	s.elemZ = zs
	s.elem = make([][]float64, s.env.Nodes)
	forEach(s.env.Nodes, workers, func(k int) {
		if ctx.Err() != nil {
			return
		}
		boltz := opacity.BoltzmannFactors(nil, st, ej.TemperatureAt(s.env.Node(k)))
		sf := s.sf[k]
		S := make([]float64, len(zs)*nb)
		gidx, gfl, sp, lower := m.gidx, m.gfl, st.Species, st.Lower
		for l := first; l < last; l++ {
			e := elem[sp[l]]
			if e < 0 {
				continue
			}
			S[e*nb+int(gidx[l])-s.lo] += sf[sp[l]] * gfl[l] * boltz[lower[l]]
		}
		s.elem[k] = S
	})
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("synth: binning lines: %w", err)
	}
	return nil
}

// tau combines the binned strengths into optical depths, leaving out the
// species for which skip returns true.
func (s *state) tau(m *Model, skip func(linelists.Species) bool) *Tau {
	g := Grid{Start: m.from * math.Exp(float64(s.lo)*m.step), Step: m.step, N: s.hi - s.lo}
	t := &Tau{Grid: g, Env: s.env, Values: make([]float64, g.N*s.env.Nodes)}
	for k := range s.env.Nodes {
		dst := t.Node(k)
		if s.elem != nil {
			nb := g.N
			for e, z := range s.elemZ {
				if skip != nil && skip(linelists.Species{Z: uint8(z)}) {
					continue
				}
				row := s.elem[k][e*nb : (e+1)*nb]
				for b, v := range row {
					dst[b] += s.scale * v
				}
			}
			for b, st := range s.stim[k] {
				dst[b] *= st
			}
			continue
		}
		tab := s.tables[k]
		for sp, f := range s.sf[k] {
			if f == 0 || (skip != nil && skip(s.species[sp])) {
				continue
			}
			c := f * s.scale
			row := tab.S[sp*tab.n : (sp+1)*tab.n]
			for b, v := range row {
				dst[b] += c * v
			}
		}
		for b, st := range s.stim[k] {
			dst[b] *= st
		}
	}
	return t
}

// integrateState runs the formal integral (or the preview) on t and builds
// the result.
func (m *Model) integrateState(ctx context.Context, s *state, t *Tau, ej Ejecta, set Settings) (*Result, error) {
	from, to := -s.lo, -s.lo+m.nObs
	var p []float64
	var err error
	if set.Preview {
		p, err = AbsorptionProfile(ctx, t, from, to, set.Options, set.Workers)
	} else {
		p, err = Profile(ctx, t, from, to, set.Options, set.Workers)
	}
	if err != nil {
		return nil, err
	}
	w := m.Grid().Wavelengths()
	flux := make([]float64, len(p))
	for i, v := range p {
		flux[i] = math.Pi * spectra.PlanckLambdaPerAngstrom(w[i], ej.Temperature) * v
	}
	vel := make([]float64, s.env.Nodes)
	for k := range vel {
		vel[k] = s.env.Node(k)
	}
	return &Result{Wavelength: w, Normalized: p, Flux: flux, Preview: set.Preview, Ejecta: ej,
		Plasma: s.plasma, Velocity: vel, Warnings: m.warnings(s)}, nil
}

// warnings lists the elements of the plasma that have no lines in the store
// and the species with lines whose partition function at the photosphere is
// incomplete (a lower bound).
func (m *Model) warnings(s *state) []string {
	if len(s.plasma) == 0 {
		return nil
	}
	has := map[int]bool{}
	for _, sp := range m.store.SpeciesTable {
		has[int(sp.Z)] = true
	}
	// The elements of every node, in node order (stratified ejecta have
	// different ones in different zones), each once; partition functions are
	// judged at the first node that has the element.
	var elems []opacity.ElementState
	seen := map[int]bool{}
	for _, p := range s.plasma {
		for _, e := range p.Elements {
			if !seen[e.Z] {
				seen[e.Z] = true
				elems = append(elems, e)
			}
		}
	}
	var out []string
	var lower, lineless []string
	for _, e := range elems {
		el, _ := linelists.ElementByZ(e.Z)
		if !has[e.Z] {
			lineless = append(lineless, el.Symbol)
			continue
		}
		for j := 0; j < e.Stages; j++ {
			sp := e.Species(j)
			_, ok := m.store.SpeciesIndex(sp)
			if ok && (!e.PartitionComplete[j] || m.store.LevelSourceOf(sp) != linelists.FileLevels) {
				lower = append(lower, sp.String())
			}
		}
	}
	switch len(lineless) {
	case 0:
	case 1:
		out = append(out, fmt.Sprintf("%s has no lines in the line lists: it only supplies electrons", lineless[0]))
	default:
		out = append(out, fmt.Sprintf("%s have no lines in the line lists: they only supply electrons", strings.Join(lineless, ", ")))
	}
	if len(lower) > 0 {
		out = append(out, fmt.Sprintf("partition functions are lower bounds (only the levels the line lists name, or the ground level) for %s",
			strings.Join(lower, ", ")))
	}
	return out
}

// Spectrum returns the spectrum of ejecta ej with composition comp (or, in
// the velocity ranges of ej.Zones, each zone's composition): the LTE
// plasma is solved at each velocity node (density from the ejecta law,
// temperature uniform or diluted, the composition of the zone the node
// lies in), every line's Sobolev optical depth
//
//	τ = (π e²/mₑc) g f λ t (N_ion/U) e^{−E_l/kT} (1 − e^{−hc/λkT})
//
// is summed into its bin (the stimulated-emission factor taken at the bin
// centre), and the formal integral (or the absorption-only preview) gives the
// emergent spectrum.
func (m *Model) Spectrum(ctx context.Context, comp opacity.Composition, ej Ejecta, set Settings) (*Result, error) {
	s, err := m.prepare(ctx, comp, ej, set)
	if err != nil {
		return nil, err
	}
	var skip func(linelists.Species) bool
	if len(set.Without) > 0 {
		out := map[int]bool{}
		for _, z := range set.Without {
			out[z] = true
		}
		skip = func(sp linelists.Species) bool { return out[int(sp.Z)] }
	}
	return m.integrateState(ctx, s, s.tau(m, skip), ej, set)
}

package synth

import (
	"broadline/opacity/internal/kernels"
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// Doppler selects the relation between a point's velocity and the observed
// wavelength at which a line resonates there.
type Doppler int

const (
	// FirstOrder is λ = λ₀(1 − v_z/c), the relation of the published
	// elementary model (Jeffery & Branch 1990): a resonance plane
	// z = c t (1 − λ/λ₀) for every observed λ. The blue edge of a line is
	// at λ₀(1 − v_max/c). This is the default.
	FirstOrder Doppler = iota
	// Relativistic is λ = λ₀ γ (1 − v_z/c) with γ = (1 − v²/c²)^{−1/2},
	// v = r/t: the blue edge is at λ₀ √((1 − β)/(1 + β)). Intensities are
	// still not transformed (no aberration, no I/ν³ factor), and light-travel
	// time across the ejecta is neglected.
	Relativistic
)

// String names the policy.
func (d Doppler) String() string {
	if d == Relativistic {
		return "relativistic"
	}
	return "first-order"
}

// Options sets the resolution and switches of the formal integral. The zero
// value means the defaults, which keep the normalised flux within 0.5 % of a
// calculation with twice the rays and twice the velocity nodes (see
// TestConvergence).
type Options struct {
	// CoreRays is the number of impact parameters across the photosphere's
	// disc, at the centres of annuli of equal area (default 16).
	CoreRays int
	// EnvelopeRays is the number of impact parameters outside the
	// photosphere, at the centres of annuli of equal width in p (default 32).
	EnvelopeRays int
	// NoOccultation lets light scattered behind the photosphere reach the
	// observer, as if the photosphere were transparent to it (for tests of
	// photon conservation; physically the photosphere occults it).
	NoOccultation bool
	// Doppler is the Doppler policy (default FirstOrder).
	Doppler Doppler

	// pointwise applies every resonance point on its own instead of in
	// runs (slower; the reference for TestGrouping).
	pointwise bool
}

// Default resolutions of the formal integral.
const (
	// DefaultCoreRays is the default number of rays across the photosphere's disc.
	DefaultCoreRays = 16
	// DefaultEnvelopeRays is the default number of rays outside the photosphere.
	DefaultEnvelopeRays = 32
	// DefaultPreviewRays is the default number of rays of the absorption-only
	// preview, which trades accuracy for speed.
	DefaultPreviewRays = 8
	// DefaultNodes is the default number of velocity nodes of an envelope.
	DefaultNodes = 16
)

func (o Options) withDefaults() Options {
	if o.CoreRays <= 0 {
		o.CoreRays = DefaultCoreRays
	}
	if o.EnvelopeRays <= 0 {
		o.EnvelopeRays = DefaultEnvelopeRays
	}
	return o
}

// point is one resonance point along a ray: the line bin i = j − k resonates
// there for observed point j; the optical depth is interpolated between
// velocity nodes s and s+1 with weight f; w is the dilution factor W(r).
type point struct {
	k    int
	s    int
	f    float64
	w    float64
	frac float64 // share of the ray's annulus where the point is in the envelope
}

// ray is one impact parameter with its quadrature weight (relative to the
// area of the photosphere's disc) and its resonance points in the order a
// photon meets them (increasing z, towards the observer).
type ray struct {
	weight float64
	core   bool    // impact parameter inside the photosphere's disc
	back   []point // behind the photosphere (core rays only)
	front  []point // in front of the photosphere, or all points for envelope rays
	// The same points gathered into runs (see group).
	backRuns, frontRuns []run
}

// run is a stretch of consecutive resonance points along a ray, offsets
// k0, k0−1, …, k1, that lie between the same two velocity nodes, fully inside
// the envelope, with nearly the same node weight f and dilution w. Along a ray
// the lines of a run are met one after another with (nearly) one source
// function, so their sequential effect is exactly
// I ← w + (I − w) e^{−Σ τ}, and Σ τ over consecutive bins is a difference of
// prefix sums: the cost of a run does not grow with its length.
type run struct {
	k0, k1 int
	s      int
	f, w   float64 // means over the run's points
	single bool    // a lone point (e.g. partly outside the envelope): use the point form
	p      point
}

// Limits on a run: the spread of the node weight f and of the dilution W
// across it, and its length. Chosen so that grouping changes F/F_c by well
// under 0.5 % (TestGrouping).
const (
	runMaxDF  = 0.25
	runMaxDW  = 0.005
	runMaxLen = 64
)

// group gathers pts into runs.
func group(pts []point) []run {
	var out []run
	for i := 0; i < len(pts); {
		p := pts[i]
		if p.frac < 1 {
			out = append(out, run{k0: p.k, k1: p.k, s: p.s, f: p.f, w: p.w, single: true, p: p})
			i++
			continue
		}
		j := i + 1
		sf, sw := p.f, p.w
		for j < len(pts) && j-i < runMaxLen {
			q := pts[j]
			if q.frac < 1 || q.s != p.s || q.k != pts[j-1].k-1 ||
				math.Abs(q.f-p.f) > runMaxDF || math.Abs(q.w-p.w) > runMaxDW {
				break
			}
			sf += q.f
			sw += q.w
			j++
		}
		n := float64(j - i)
		out = append(out, run{k0: p.k, k1: pts[j-1].k, s: p.s, f: sf / n, w: sw / n})
		i = j
	}
	return out
}

// dilution returns W(r) = ½[1 − √(1 − (r_ph/r)²)], the geometric dilution
// factor of a uniformly bright sphere of radius r_ph seen from radius r.
func dilution(rPh, r float64) float64 {
	x := rPh / r
	if x >= 1 {
		return 0.5
	}
	return 0.5 * (1 - math.Sqrt(1-x*x))
}

// resonanceZ returns the position z (units of c t) along a ray of impact
// parameter b where a line resonates for observed/rest wavelength ratio q, and
// whether such a point exists with |z| ≤ zmax.
func resonanceZ(d Doppler, q, b, zmax float64) (float64, bool) {
	if d == FirstOrder {
		z := 1 - q
		return z, z >= -zmax && z <= zmax
	}
	// q = γ(1 − z) with γ = (1 − b² − z²)^{−1/2}: squaring gives
	// (1 + q²) z² − 2z + 1 − q²(1 − b²) = 0, whose smaller root is the
	// physical one (for b = 0 it is the relativistic Doppler velocity
	// (1 − q²)/(1 + q²)).
	q2 := q * q
	disc := 1 - (1+q2)*(1-q2*(1-b*b))
	if disc < 0 {
		return 0, false
	}
	z := (1 - math.Sqrt(disc)) / (1 + q2)
	return z, z >= -zmax && z <= zmax
}

// buildRays returns the rays of the formal integral for an envelope on a grid
// of step dlnl.
//
// Each ray stands for an annulus [b_lo, b_hi] of impact parameters. A
// resonance point near a boundary of the envelope (the photosphere, the outer
// edge, the occulted region) lies inside it for only part of the annulus; its
// 1 − e^{−τ} is weighted by that part's share of the annulus area, so that the
// flux does not change in steps where one ray starts or stops meeting a line.
// This brings the error of the impact-parameter quadrature from first to
// about second order in the number of rays.
func buildRays(env Envelope, step float64, opt Options, absorptionOnly bool) []ray {
	bph, bmax := env.BetaPh, env.BetaMax
	bph2, bmax2 := bph*bph, bmax*bmax
	// Offsets k = j − i with q = exp(k·step) that can resonate at all.
	kmin := int(math.Floor(math.Log(1-bmax)/step)) - 1
	kmax := int(math.Ceil(math.Log((1+bmax)/math.Sqrt(1-bmax2))/step)) + 1
	var rays []ray
	add := func(b, lo2, hi2, weight float64, core bool) {
		r := ray{weight: weight, core: core}
		zmax := math.Sqrt(bmax2 - lo2)
		for k := kmax; k >= kmin; k-- { // increasing z is decreasing k
			z, ok := resonanceZ(opt.Doppler, math.Exp(float64(k)*step), b, zmax)
			if !ok {
				continue
			}
			// Share of the annulus where b² + z² lies in [r_ph², r_max²].
			frac := (min(hi2, bmax2-z*z) - max(lo2, bph2-z*z)) / (hi2 - lo2)
			if frac <= 0 {
				continue
			}
			frac = min(frac, 1)
			rad := math.Min(math.Max(math.Sqrt(b*b+z*z), bph), bmax)
			s, f := env.locate(rad)
			p := point{k: k, s: s, f: f, w: dilution(bph, rad), frac: frac}
			switch {
			case !core || z > 0:
				r.front = append(r.front, p)
			case opt.NoOccultation && !absorptionOnly:
				r.back = append(r.back, p)
			}
		}
		r.backRuns, r.frontRuns = group(r.back), group(r.front)
		rays = append(rays, r)
	}
	nc := opt.CoreRays
	for m := range nc {
		lo2 := bph2 * float64(m) / float64(nc)
		hi2 := bph2 * float64(m+1) / float64(nc)
		add(math.Sqrt(0.5*(lo2+hi2)), lo2, hi2, 1/float64(nc), true)
	}
	if absorptionOnly {
		return rays
	}
	ne := opt.EnvelopeRays
	db := (bmax - bph) / float64(ne)
	for m := range ne {
		lo, hi := bph+float64(m)*db, bph+float64(m+1)*db
		b := 0.5 * (lo + hi)
		add(b, lo*lo, hi*hi, (hi*hi-lo*lo)/bph2, false)
	}
	return rays
}

// Profile returns the normalised flux F/F_c at the observed points
// [from, to) of tau.Grid: the formal integral over impact parameters of the
// intensity emerging from a sharp photosphere of uniform brightness inside a
// purely resonance-scattering envelope (source function S = W(r) I_ph), with
// occultation by the photosphere unless opt.NoOccultation, and sequential
// interaction of the lines met along each ray: I ← I e^{−τ} + S (1 − e^{−τ})
// in order of increasing rest wavelength. The photospheric intensity is taken
// as locally flat across the profile, so F/F_c does not depend on the
// photosphere's temperature (multiply by the continuum for the flux).
// Lines outside tau.Grid contribute nothing.
func Profile(ctx context.Context, tau *Tau, from, to int, opt Options, workers int) ([]float64, error) {
	return integrate(ctx, tau, from, to, opt.withDefaults(), workers, false)
}

// AbsorptionProfile returns the "absorption only" preview of F/F_c: only the
// absorption of the photospheric beam by the lines in front of the
// photosphere, I = I_ph ∏ e^{−τ}, averaged over the photosphere's disc. It
// has no scattered emission, so it exaggerates the depth of features and has
// no emission peaks; it is an approximation for quick previews, not a
// spectrum model.
func AbsorptionProfile(ctx context.Context, tau *Tau, from, to int, opt Options, workers int) ([]float64, error) {
	if opt.CoreRays <= 0 {
		opt.CoreRays = DefaultPreviewRays
	}
	return integrate(ctx, tau, from, to, opt.withDefaults(), workers, true)
}

// chunk is the number of observed points a worker handles at a time.
const chunk = 512

func integrate(ctx context.Context, tau *Tau, from, to int, opt Options, workers int, absorptionOnly bool) ([]float64, error) {
	if tau == nil {
		return nil, fmt.Errorf("synth: no optical depths")
	}
	if err := tau.Env.Validate(); err != nil {
		return nil, err
	}
	if from < 0 || to > tau.Grid.N || from >= to {
		return nil, fmt.Errorf("synth: observed points [%d, %d) outside the grid of %d points", from, to, tau.Grid.N)
	}
	if opt.Doppler != FirstOrder && opt.Doppler != Relativistic {
		return nil, fmt.Errorf("synth: unknown Doppler policy %d", opt.Doppler)
	}
	if opt.CoreRays > 1<<14 || opt.EnvelopeRays > 1<<14 {
		return nil, fmt.Errorf("synth: too many rays (%d core, %d envelope)", opt.CoreRays, opt.EnvelopeRays)
	}
	rays := buildRays(tau.Env, tau.Grid.Step, opt, absorptionOnly)

	// a[s*N+i] = 1 − exp(−τ) at node s; interpolated linearly in r.
	n := tau.Grid.N
	a := make([]float32, len(tau.Values))
	for i, t := range tau.Values {
		if t < 0 || math.IsNaN(t) {
			return nil, fmt.Errorf("synth: optical depth %g of bin %d at node %d is negative or NaN", t, i%n, i/n)
		}
		a[i] = float32(-math.Expm1(-t))
	}
	// Prefix sums of τ per node, padded so that any bin offset a ray can
	// ask for is in range: P[s][pad+i] = Σ_{0 ≤ i' < i} τ_s[i'].
	pad := 0
	for _, r := range rays {
		for _, list := range [][]point{r.back, r.front} {
			for _, p := range list {
				pad = max(pad, p.k+1, -p.k+1)
			}
		}
	}
	pre := make([][]float64, tau.Env.Nodes)
	for k := range pre {
		row := tau.Node(k)
		P := make([]float64, n+2*pad+1)
		sum := 0.0
		for i := range P {
			P[i] = sum
			if b := i - pad; b >= 0 && b < n {
				sum += row[b]
			}
		}
		pre[k] = P
	}
	pt := prefix{P: pre, pad: pad}

	out := make([]float64, to-from)
	nchunks := (to - from + chunk - 1) / chunk
	var next atomic.Int64
	var failed atomic.Bool
	work := func() {
		buf := make([]float64, chunk)
		dbuf := make([]float64, chunk)
		for {
			c := int(next.Add(1)) - 1
			if c >= nchunks || failed.Load() {
				return
			}
			if ctx.Err() != nil {
				failed.Store(true)
				return
			}
			j0 := from + c*chunk
			j1 := min(j0+chunk, to)
			dst := out[j0-from : j1-from]
			for _, r := range rays {
				I := buf[:j1-j0]
				switch {
				case absorptionOnly && opt.pointwise:
					for x := range I {
						I[x] = 1
					}
					absorb(I, j0, r.front, a, n)
				case absorptionOnly:
					D := dbuf[:j1-j0]
					clear(D)
					for x := range I {
						I[x] = 1
					}
					depthRuns(D, I, j0, r.frontRuns, pt, a, n)
					for x, v := range D {
						I[x] *= math.Exp(-v)
					}
				case opt.pointwise:
					clear(I)
					if r.core {
						scatter(I, j0, r.back, a, n)
						for x := range I {
							I[x]++
						}
					}
					scatter(I, j0, r.front, a, n)
				default:
					clear(I)
					if r.core {
						scatterRuns(I, j0, r.backRuns, pt, a, n)
						for x := range I {
							I[x]++
						}
					}
					scatterRuns(I, j0, r.frontRuns, pt, a, n)
				}
				for x, v := range I {
					dst[x] += r.weight * v
				}
			}
		}
	}
	workers = min(workers, runtime.GOMAXPROCS(0), nchunks)
	if workers <= 1 {
		work()
	} else {
		var wg sync.WaitGroup
		for range workers {
			wg.Go(work)
		}
		wg.Wait()
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("synth: formal integral: %w", err)
	}
	return out, nil
}

// span returns the observed points [lo, hi) (relative to j0, within I) for
// which line bin j − k lies inside [0, n).
func span(j0, m, k, n int) (int, int) {
	lo, hi := 0, m
	if j0-k < 0 {
		lo = k - j0
	}
	if j0+m-k > n {
		hi = n + k - j0
	}
	return max(lo, 0), min(hi, m)
}

// scatter applies the resonance points pts in order: at each,
// I ← I + (S − I)(1 − e^{−τ}) with S = W I_ph (I_ph = 1).
func scatter(I []float64, j0 int, pts []point, a []float32, n int) {
	for _, p := range pts {
		scatterPoint(I, j0, p, a, n)
	}
}

// pointSpan returns the part of I (the observed points from j0) that the
// resonance point p reaches, and the matching runs of the tabulated
// strengths at p's two velocity nodes (empty slices where it reaches none).
func pointSpan(I []float64, j0 int, p point, a []float32, n int) (seg []float64, a0, a1 []float32) {
	lo, hi := span(j0, len(I), p.k, n)
	if lo >= hi {
		return nil, nil, nil
	}
	base := j0 - p.k
	seg = I[lo:hi]
	a0 = a[p.s*n+base+lo : p.s*n+base+hi]
	a1 = a[(p.s+1)*n+base+lo : (p.s+1)*n+base+hi]
	return seg, a0[:len(seg)], a1[:len(seg)]
}

// scatterPoint applies one resonance point: on each observed point it
// reaches, I ← I + (w − I)·c·(a0 + f·(a1 − a0)) (kernels.Scatter, the
// hottest loop of the full synthesis).
func scatterPoint(I []float64, j0 int, p point, a []float32, n int) {
	seg, a0, a1 := pointSpan(I, j0, p, a, n)
	kernels.Scatter(seg, a0, a1, p.f, p.w, p.frac)
}

// absorb applies I ← I e^{−τ} for the points pts.
func absorb(I []float64, j0 int, pts []point, a []float32, n int) {
	for _, p := range pts {
		seg, a0, a1 := pointSpan(I, j0, p, a, n)
		f, c := p.f, p.frac
		for x := range seg {
			seg[x] *= 1 - c*(float64(a0[x])+f*float64(a1[x]-a0[x]))
		}
	}
}

// prefix holds padded prefix sums of τ per velocity node.
type prefix struct {
	P   [][]float64
	pad int
}

// runDepth writes into dst[x] the summed optical depth of run u for observed
// point j0+x: Σ over bins j0+x−k0 … j0+x−k1 of (1−f) τ_s + f τ_{s+1}.
func (pt prefix) runDepth(dst []float64, j0 int, u run, add bool) {
	m := len(dst)
	p0, p1 := pt.P[u.s], pt.P[u.s+1]
	lo := pt.pad + j0 - u.k0
	hi := pt.pad + j0 - u.k1 + 1
	l0, h0 := p0[lo:lo+m], p0[hi:hi+m]
	l1, h1 := p1[lo:lo+m], p1[hi:hi+m]
	g, f := 1-u.f, u.f
	if add {
		for x := range dst {
			dst[x] += g*(h0[x]-l0[x]) + f*(h1[x]-l1[x])
		}
		return
	}
	for x := range dst {
		dst[x] = g*(h0[x]-l0[x]) + f*(h1[x]-l1[x])
	}
}

// depthRuns adds to D the optical depth of the runs (absorption only) and
// multiplies T by the transmission 1 − c(1 − e^{−τ}) of each lone point with
// a partial share c.
func depthRuns(D, T []float64, j0 int, runs []run, pt prefix, a []float32, n int) {
	for _, u := range runs {
		if !u.single {
			pt.runDepth(D, j0, u, true)
			continue
		}
		absorb(T, j0, []point{u.p}, a, n)
	}
}

// scatterRuns applies the runs in order: I ← w + (I − w) e^{−Σ τ} for a run,
// the point form for a lone point.
func scatterRuns(I []float64, j0 int, runs []run, pt prefix, a []float32, n int) {
	var tmp [chunk]float64
	for _, u := range runs {
		if u.single {
			scatterPoint(I, j0, u.p, a, n)
			continue
		}
		d := tmp[:len(I)]
		pt.runDepth(d, j0, u, false)
		kernels.RunDecay(I, d, u.w)
	}
}

package synth

import (
	"fmt"
	"math"
)

// Envelope is the line-forming region: a sharp photosphere at velocity BetaPh
// and an outer edge at BetaMax (both fractions of c), with the Sobolev optical
// depths tabulated on Nodes velocities spaced evenly from BetaPh to BetaMax
// and interpolated linearly in between.
type Envelope struct {
	BetaPh  float64 // photosphere velocity / c
	BetaMax float64 // outer velocity / c
	Nodes   int     // number of velocity nodes (≥ 2)
}

// Validate reports whether the envelope is usable.
func (e Envelope) Validate() error {
	switch {
	case !(e.BetaPh > 0) || e.BetaPh >= 1:
		return fmt.Errorf("synth: photosphere velocity %g c must be in (0, 1)", e.BetaPh)
	case !(e.BetaMax > e.BetaPh) || e.BetaMax >= 1:
		return fmt.Errorf("synth: outer velocity %g c must exceed the photosphere velocity %g c and be below c", e.BetaMax, e.BetaPh)
	case e.Nodes < 2 || e.Nodes > 1<<12:
		return fmt.Errorf("synth: %d velocity nodes; need 2 … 4096", e.Nodes)
	}
	return nil
}

// Node returns the velocity (fraction of c) of node s. The last node is
// BetaMax exactly (the formula could round a hair above it, where the
// density law ends).
func (e Envelope) Node(s int) float64 {
	if s >= e.Nodes-1 {
		return e.BetaMax
	}
	return min(e.BetaPh+(e.BetaMax-e.BetaPh)*float64(s)/float64(e.Nodes-1), e.BetaMax)
}

// locate returns the node below beta and the fraction of the way to the next.
func (e Envelope) locate(beta float64) (int, float64) {
	x := (beta - e.BetaPh) / (e.BetaMax - e.BetaPh) * float64(e.Nodes-1)
	s := int(math.Floor(x))
	if s >= e.Nodes-1 {
		s = e.Nodes - 2
	}
	if s < 0 {
		s = 0
	}
	return s, x - float64(s)
}

// Tau holds the summed Sobolev optical depths of the lines in each bin of a
// logarithmic rest-wavelength grid, at each velocity node of an envelope.
// Lines in one bin share a resonance point along every ray and, to the bin's
// width, the same source function, so applying them one after another is the
// same as applying their summed τ once: binning is exact up to the bin width.
type Tau struct {
	Grid Grid
	Env  Envelope
	// Values[s*Grid.N + i] is the summed τ of bin i at velocity node s.
	Values []float64
}

// NewTau returns zero optical depths on grid g and envelope env.
func NewTau(g Grid, env Envelope) (*Tau, error) {
	if err := env.Validate(); err != nil {
		return nil, err
	}
	if g.N <= 0 || !(g.Step > 0) || !(g.Start > 0) {
		return nil, fmt.Errorf("synth: empty wavelength grid")
	}
	return &Tau{Grid: g, Env: env, Values: make([]float64, g.N*env.Nodes)}, nil
}

// Node returns the optical depths of all bins at node s (a view, not a copy).
func (t *Tau) Node(s int) []float64 { return t.Values[s*t.Grid.N : (s+1)*t.Grid.N] }

// AddLine adds a line of rest wavelength lambda (Å) whose Sobolev optical
// depth at node s is tau[s]. A line outside the grid is ignored and reported
// as false.
func (t *Tau) AddLine(lambda float64, tau []float64) bool {
	if len(tau) != t.Env.Nodes {
		panic(fmt.Sprintf("synth: %d optical depths for %d nodes", len(tau), t.Env.Nodes))
	}
	i := t.Grid.Nearest(lambda)
	if i < 0 || i >= t.Grid.N {
		return false
	}
	for s, v := range tau {
		t.Values[s*t.Grid.N+i] += v
	}
	return true
}

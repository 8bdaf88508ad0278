package core

import "testing"

// demoBench loads the built-in demo.
func demoBench(t testing.TB) *Bench {
	t.Helper()
	b, err := Demo()
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// mustComp parses a composition the test writes.
func mustComp(t testing.TB, s string) Composition {
	t.Helper()
	c, err := ParseComposition(s)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

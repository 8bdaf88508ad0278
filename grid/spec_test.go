package grid

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

const exampleSpec = `{
  "format": "broadline-grid/1",
  "label": "invented example",
  "axes": [
    {"quantity": "velocity", "from": 0.1, "to": 0.3, "steps": 5},
    {"quantity": "temperature", "values": [5000, 3500, 4000]},
    {"quantity": "fraction", "element": "nd", "from": 1e-5, "to": 1e-2, "steps": 4, "spacing": "log"}
  ]
}`

func mustSpec(t testing.TB, js string) *Spec {
	t.Helper()
	s, err := DecodeSpec(strings.NewReader(js), "test.json")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestDecodeSpec(t *testing.T) {
	s := mustSpec(t, exampleSpec)
	if got := s.Points(); got != 5*3*4 {
		t.Errorf("Points = %d, want 60", got)
	}
	if got := strings.Join(s.Names(), ","); got != "velocity,temperature,fraction_Nd" {
		t.Errorf("names %s", got)
	}
	// Linear: from + i(to−from)/(steps−1), the ends exact.
	v := s.AxisValues(0)
	for i, want := range []float64{0.1, 0.15, 0.2, 0.25, 0.3} {
		if math.Abs(v[i]-want) > 1e-15 {
			t.Errorf("velocity %d = %v, want %v", i, v[i], want)
		}
	}
	if v[0] != 0.1 || v[4] != 0.3 {
		t.Errorf("ends %v %v not exact", v[0], v[4])
	}
	// Listed values keep their order.
	if got := s.AxisValues(1); got[0] != 5000 || got[1] != 3500 || got[2] != 4000 {
		t.Errorf("temperatures %v", got)
	}
	// Log: decades 1e-5, 1e-4, 1e-3, 1e-2 (within a few ulp of from·(to/from)^(i/3)).
	x := s.AxisValues(2)
	for i, want := range []float64{1e-5, 1e-4, 1e-3, 1e-2} {
		if math.Abs(x[i]-want) > 1e-15*want {
			t.Errorf("fraction %d = %v, want %v", i, x[i], want)
		}
	}
	if s.Axes[2].Element != "Nd" {
		t.Errorf("element stored as %q, want the standard symbol Nd", s.Axes[2].Element)
	}
	// The canonical form decodes to the same spec (same checksum).
	again := mustSpec(t, string(s.Canonical()))
	if again.SHA256() != s.SHA256() {
		t.Errorf("canonical form does not reproduce the checksum")
	}
	// A reformatted file is the same grid.
	if s2 := mustSpec(t, strings.ReplaceAll(exampleSpec, "\n", "\n   ")); s2.SHA256() != s.SHA256() {
		t.Errorf("whitespace changed the checksum")
	}
}

func TestDecodeSpecErrors(t *testing.T) {
	axis := func(a string) string { return `{"format":"broadline-grid/1","axes":[` + a + `]}` }
	cases := []struct{ name, js, want string }{
		{"unknown top key", `{"format":"broadline-grid/1","axes":[{"quantity":"epoch","values":[0]}],"colour":1}`, `unknown field "colour"`},
		{"unknown axis key", axis(`{"quantity":"velocity","values":[0.1],"unit":"c"}`), `unknown field "unit"`},
		{"trailing data", axis(`{"quantity":"epoch","values":[0]}`) + `{}`, "data after the JSON object"},
		{"format", `{"format":"grid/2","axes":[{"quantity":"epoch","values":[0]}]}`, `format "grid/2"`},
		{"no axes", `{"format":"broadline-grid/1","axes":[]}`, "0 axes"},
		{"no quantity", axis(`{"values":[1]}`), `no "quantity"`},
		{"bad quantity", axis(`{"quantity":"density","values":[1]}`), `unknown quantity "density"`},
		{"both", axis(`{"quantity":"velocity","values":[0.1],"from":0.1,"to":0.2,"steps":2}`), "both"},
		{"no values", axis(`{"quantity":"velocity"}`), "no values"},
		{"empty values", axis(`{"quantity":"velocity","values":[]}`), "0 values"},
		{"partial range", axis(`{"quantity":"velocity","from":0.1,"steps":3}`), "go together"},
		{"steps negative", axis(`{"quantity":"velocity","from":0.1,"to":0.2,"steps":-3}`), "steps -3"},
		{"reversed", axis(`{"quantity":"velocity","from":0.3,"to":0.2,"steps":3}`), "must be less than"},
		{"steps 1 two ends", axis(`{"quantity":"velocity","from":0.1,"to":0.2,"steps":1}`), "steps 1 needs to = from"},
		{"log from 0", axis(`{"quantity":"fraction","element":"Sr","from":0,"to":0.1,"steps":3,"spacing":"log"}`), "log spacing needs from > 0"},
		{"spacing", axis(`{"quantity":"velocity","from":0.1,"to":0.2,"steps":3,"spacing":"cubic"}`), `spacing "cubic"`},
		{"velocity 1", axis(`{"quantity":"velocity","values":[0.2,1]}`), "value 2 (1): out of range (want 0 < v/c < 1)"},
		{"temperature 0", axis(`{"quantity":"temperature","values":[0]}`), "out of range"},
		{"fraction > 1", axis(`{"quantity":"fraction","element":"Sr","values":[1.5]}`), "0 ≤ mass fraction ≤ 1"},
		{"epoch fraction", axis(`{"quantity":"epoch","values":[1.5]}`), "an integer"},
		{"epoch log", axis(`{"quantity":"epoch","from":1,"to":4,"steps":4,"spacing":"log"}`), "cannot be log-spaced"},
		{"duplicate value", axis(`{"quantity":"temperature","values":[4000,5000,4000]}`), "4000 appears twice"},
		{"duplicate axis", axis(`{"quantity":"days","values":[1]},{"quantity":"days","values":[2]}`), "a second days axis"},
		{"two fractions same element", axis(`{"quantity":"fraction","element":"Sr","values":[0.1]},{"quantity":"fraction","element":"sr","values":[0.2]}`), "a second fraction_Sr axis"},
		{"unknown element", axis(`{"quantity":"fraction","element":"Xx","values":[0.1]}`), `element "Xx"`},
		{"element on velocity", axis(`{"quantity":"velocity","element":"Sr","values":[0.1]}`), `"element" is only for`},
		{"too many values", axis(`{"quantity":"days","from":1,"to":2,"steps":100001}`), "steps 100001"},
		{"too many points", axis(`{"quantity":"velocity","from":0.01,"to":0.99,"steps":1000},{"quantity":"temperature","from":1000,"to":9000,"steps":1000},{"quantity":"days","from":1,"to":30,"steps":20}`),
			"the axes give 2e+07 points (1000 × 1000 × 20), more than the limit 10000000"},
		{"syntax", "{\"format\": \"broadline-grid/1\",\n  \"axes\": [}", "line 2, column 12"},
		{"wrong type", axis(`{"quantity":"velocity","values":"0.1"}`), "cannot unmarshal"},
		{"huge number", axis(`{"quantity":"velocity","values":[1e400]}`), "cannot unmarshal"},
		{"label control", `{"format":"broadline-grid/1","label":"a\u0007b","axes":[{"quantity":"epoch","values":[0]}]}`, "control characters"},
		{"too large", axis(`{"quantity":"epoch","values":[0]}`) + strings.Repeat(" ", MaxSpecBytes), "larger than"},
	}
	for _, c := range cases {
		_, err := DecodeSpec(strings.NewReader(c.js), "bad.json")
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "bad.json") {
			t.Errorf("%s: error %q, want it to contain %q and the file name", c.name, err, c.want)
		}
		if !errors.Is(err, ErrSpec) {
			t.Errorf("%s: error does not wrap ErrSpec", c.name)
		}
	}
}

// TestEnumerationRowMajor walks the axes in nested loops, the last
// innermost, and requires Spec.Point to give the same sequence.
func TestEnumerationRowMajor(t *testing.T) {
	s := mustSpec(t, exampleSpec)
	a, b, c := s.AxisValues(0), s.AxisValues(1), s.AxisValues(2)
	k := 0
	for _, va := range a {
		for _, vb := range b {
			for _, vc := range c {
				p := s.Point(k)
				if p.Index != k || p.Values[0] != va || p.Values[1] != vb || p.Values[2] != vc {
					t.Fatalf("point %d = %+v, want %v %v %v", k, p, va, vb, vc)
				}
				if got, ok := p.Get("fraction_Nd"); !ok || got != vc {
					t.Fatalf("Get(fraction_Nd) = %v %v", got, ok)
				}
				if m := p.Map(); m["temperature"] != vb || len(m) != 3 {
					t.Fatalf("Map = %v", m)
				}
				k++
			}
		}
	}
	if k != s.Points() {
		t.Fatalf("walked %d points, Points() = %d", k, s.Points())
	}
	if _, ok := s.Point(0).Get("days"); ok {
		t.Error("Get of an absent axis reports it present")
	}
}

func TestNewSpec(t *testing.T) {
	lo, hi := 2.0, 4.0
	s, err := NewSpec("invented", Axis{Quantity: Days, From: &lo, To: &hi, Steps: 3}, Axis{Quantity: Epoch, Values: []float64{0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	if s.Points() != 6 || s.Point(5).Values[0] != 4 || s.Point(5).Values[1] != 1 {
		t.Errorf("points %d, last %v", s.Points(), s.Point(5).Values)
	}
	if _, err := NewSpec("", Axis{Quantity: Days}); !errors.Is(err, ErrSpec) {
		t.Errorf("NewSpec without values: %v", err)
	}
}

func TestShardCoverage(t *testing.T) {
	for _, c := range []struct{ points, n int }{{1, 1}, {60, 1}, {60, 4}, {61, 4}, {5, 7}, {97, 13}} {
		seen := make([]int, c.points)
		sizes := 0
		for i := range c.n {
			sh := Shard{Index: i, Count: c.n}
			count := 0
			for k := range c.points {
				if sh.Contains(k) {
					seen[k]++
					count++
				}
			}
			if sh.Size(c.points) != count {
				t.Errorf("%d points, shard %s: Size %d, counted %d", c.points, sh, sh.Size(c.points), count)
			}
			sizes += count
		}
		for k, n := range seen {
			if n != 1 {
				t.Errorf("%d points in %d shards: point %d in %d shards", c.points, c.n, k, n)
			}
		}
		if sizes != c.points {
			t.Errorf("sizes add to %d, want %d", sizes, c.points)
		}
	}
}

func TestParseShard(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Shard
	}{{"0/1", Whole}, {"3/4", Shard{3, 4}}, {"0/100000", Shard{0, 100000}}} {
		got, err := ParseShard(c.in)
		if err != nil || got != c.want || got.String() != c.in {
			t.Errorf("ParseShard(%q) = %v, %v", c.in, got, err)
		}
	}
	for _, c := range []struct{ in, want string }{
		{"4/4", "index 4 out of range 0–3 (shards count from 0)"},
		{"1/0", "count 0"},
		{"-1/4", "index -1"},
		{"1", "want i/n"},
		{"a/4", "two decimal integers"},
		{"+1/4", "two decimal integers"},
		{"1/ 4", "two decimal integers"},
		{"0/100001", "count 100001"},
	} {
		_, err := ParseShard(c.in)
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrShard) {
			t.Errorf("ParseShard(%q): %v, want %q", c.in, err, c.want)
		}
	}
}

func TestShardFromEnv(t *testing.T) {
	env := func(kv ...string) func(string) string {
		m := map[string]string{}
		for i := 0; i < len(kv); i += 2 {
			m[kv[i]] = kv[i+1]
		}
		return func(k string) string { return m[k] }
	}
	good := []struct {
		env  func(string) string
		want Shard
	}{
		{env(EnvTaskID, "2", EnvTaskCount, "4"), Shard{2, 4}},
		{env(EnvTaskID, "0", EnvTaskCount, "4", EnvTaskMin, "0", EnvTaskStep, "1"), Shard{0, 4}},
		{env(EnvTaskID, "4", EnvTaskCount, "4", EnvTaskMin, "1"), Shard{3, 4}}, // --array=1-4 without MAX
		// The variables Slurm 22.05 sets for --array=1-4 and --array=0-6:2 (seen on the test cluster).
		{env(EnvTaskID, "4", EnvTaskCount, "4", EnvTaskMin, "1", EnvTaskMax, "4", EnvTaskStep, "1"), Shard{3, 4}},
		{env(EnvTaskID, "6", EnvTaskCount, "4", EnvTaskMin, "0", EnvTaskMax, "6", EnvTaskStep, "2"), Shard{3, 4}},
		{env(EnvTaskID, "2", EnvTaskCount, "4", EnvTaskMin, "0", EnvTaskMax, "6", EnvTaskStep, "2"), Shard{1, 4}},
	}
	for i, c := range good {
		got, found, err := ShardFromEnv(c.env)
		if err != nil || !found || got != c.want {
			t.Errorf("case %d: %v %v %v, want %v", i, got, found, err, c.want)
		}
	}
	if _, found, err := ShardFromEnv(env()); found || err != nil {
		t.Errorf("no array variables: found %v, err %v", found, err)
	}
	bad := []struct {
		env  func(string) string
		want string
	}{
		{env(EnvTaskID, "1"), "SLURM_ARRAY_TASK_COUNT is not"},
		{env(EnvTaskID, "x", EnvTaskCount, "4"), `SLURM_ARRAY_TASK_ID="x"`},
		{env(EnvTaskID, "1", EnvTaskCount, "-4"), "not a non-negative integer"},
		{env(EnvTaskID, "1", EnvTaskCount, "0"), "SLURM_ARRAY_TASK_COUNT=0: want 1–100000"},
		{env(EnvTaskID, "1", EnvTaskCount, "3", EnvTaskStep, "99999999999999999"), "up to 2⁴⁰"},
		// What Slurm 22.05 sets for --array=1,4,9 (seen on the test cluster): every task refuses.
		{env(EnvTaskID, "1", EnvTaskCount, "3", EnvTaskMin, "1", EnvTaskMax, "9", EnvTaskStep, "1"), "ids 1–9 with step 1 are not 3 evenly stepped ids"},
		{env(EnvTaskID, "9", EnvTaskCount, "3", EnvTaskMin, "1", EnvTaskMax, "9", EnvTaskStep, "1"), "ids 1–9 with step 1 are not 3 evenly stepped ids"},
		{env(EnvTaskID, "9", EnvTaskCount, "3", EnvTaskMin, "1"), "the ids must form a range of 3"}, // --array=1,4,9
		{env(EnvTaskID, "0", EnvTaskCount, "3", EnvTaskMin, "1"), "is not min 1 plus a multiple"},
		{env(EnvTaskID, "3", EnvTaskCount, "3", EnvTaskMin, "0", EnvTaskStep, "2"), "is not min 0 plus a multiple of step 2"},
		{env(EnvTaskID, "1", EnvTaskCount, "3", EnvTaskStep, "0"), "want at least 1"},
	}
	for i, c := range bad {
		_, found, err := ShardFromEnv(c.env)
		if err == nil || !found || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrShard) {
			t.Errorf("bad case %d: found %v, err %v, want %q", i, found, err, c.want)
		}
	}
}

func ExampleSpec_Point() {
	s, _ := DecodeSpec(strings.NewReader(`{"format":"broadline-grid/1","axes":[
		{"quantity":"velocity","values":[0.1,0.2]},
		{"quantity":"temperature","values":[4000,5000,6000]}]}`), "example.json")
	for k := range s.Points() {
		p := s.Point(k)
		fmt.Println(k, p.Values, Shard{Index: k % 2, Count: 2})
	}
	// Output:
	// 0 [0.1 4000] 0/2
	// 1 [0.1 5000] 1/2
	// 2 [0.1 6000] 0/2
	// 3 [0.2 4000] 1/2
	// 4 [0.2 5000] 0/2
	// 5 [0.2 6000] 1/2
}

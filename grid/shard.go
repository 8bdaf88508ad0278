package grid

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// MaxShards bounds the number of shards of one grid.
const MaxShards = 100_000

// Shard is one of Count interleaved parts of a grid: it holds the points k
// with k mod Count = Index. Shards count from 0, as job-array task ids
// usually do; the whole grid is Shard{0, 1}.
type Shard struct {
	Index, Count int
}

// Whole is the shard of an unsharded run, and of a merged file.
var Whole = Shard{Index: 0, Count: 1}

// ErrShard is wrapped by every error about a shard designation.
var ErrShard = errors.New("invalid shard")

// String writes the shard as "i/n".
func (s Shard) String() string { return fmt.Sprintf("%d/%d", s.Index, s.Count) }

// Valid reports an error unless 1 ≤ Count ≤ MaxShards and 0 ≤ Index < Count.
func (s Shard) Valid() error {
	if s.Count < 1 || s.Count > MaxShards {
		return fmt.Errorf("grid: shard %s: count %d (want 1–%d): %w", s, s.Count, MaxShards, ErrShard)
	}
	if s.Index < 0 || s.Index >= s.Count {
		return fmt.Errorf("grid: shard %s: index %d out of range 0–%d (shards count from 0): %w", s, s.Index, s.Count-1, ErrShard)
	}
	return nil
}

// Contains reports whether point k belongs to the shard.
func (s Shard) Contains(k int) bool { return k%s.Count == s.Index }

// Size is the number of the grid's points (of total) in the shard.
func (s Shard) Size(total int) int {
	if s.Index >= total {
		return 0
	}
	return (total-1-s.Index)/s.Count + 1
}

// ParseShard reads "i/n" (0 ≤ i < n, decimal, no spaces).
func ParseShard(text string) (Shard, error) {
	a, b, ok := strings.Cut(text, "/")
	if !ok {
		return Shard{}, fmt.Errorf("grid: shard %q: want i/n, e.g. 0/4 for the first of four: %w", text, ErrShard)
	}
	i, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if err1 != nil || err2 != nil || strings.HasPrefix(a, "+") || strings.HasPrefix(b, "+") {
		return Shard{}, fmt.Errorf("grid: shard %q: want two decimal integers i/n: %w", text, ErrShard)
	}
	s := Shard{Index: i, Count: n}
	if err := s.Valid(); err != nil {
		return Shard{}, err
	}
	return s, nil
}

// The job-array variables ShardFromEnv reads.
const (
	EnvTaskID    = "SLURM_ARRAY_TASK_ID"
	EnvTaskCount = "SLURM_ARRAY_TASK_COUNT"
	EnvTaskMin   = "SLURM_ARRAY_TASK_MIN"
	EnvTaskMax   = "SLURM_ARRAY_TASK_MAX"
	EnvTaskStep  = "SLURM_ARRAY_TASK_STEP"
)

// ShardFromEnv derives the shard from a job array's variables, looked up
// with getenv (os.Getenv in a program): Index = (ID − MIN) / STEP and Count =
// COUNT, where MIN defaults to 0 and STEP to 1 when unset. found is false,
// with no error, when SLURM_ARRAY_TASK_ID is unset (not a job-array task).
// An array whose ids are not an evenly stepped range of COUNT ids is an
// error in every task: Slurm gives --array=1,4,9 MIN 1, MAX 9, STEP 1 and
// COUNT 3, and MIN + (COUNT−1)·STEP ≠ MAX tells it apart from a range.
func ShardFromEnv(getenv func(string) string) (s Shard, found bool, err error) {
	idText := getenv(EnvTaskID)
	if idText == "" {
		return Shard{}, false, nil
	}
	// num reads a variable; def is its value when unset, or required (the
	// variable must be set) or optional (-1 when unset).
	const required, optional = -1, -2
	num := func(name string, def int) (int, error) {
		v := getenv(name)
		if v == "" {
			switch def {
			case required:
				return 0, fmt.Errorf("grid: %s is set but %s is not (is this a job-array task?): %w", EnvTaskID, name, ErrShard)
			case optional:
				return -1, nil
			}
			return def, nil
		}
		n, err := strconv.Atoi(v)
		if err != nil || n < 0 || n > 1<<40 {
			return 0, fmt.Errorf("grid: %s=%q is not a non-negative integer up to 2⁴⁰: %w", name, v, ErrShard)
		}
		return n, nil
	}
	id, err := num(EnvTaskID, 0)
	if err != nil {
		return Shard{}, true, err
	}
	count, err := num(EnvTaskCount, required)
	if err != nil {
		return Shard{}, true, err
	}
	lo, err := num(EnvTaskMin, 0)
	if err != nil {
		return Shard{}, true, err
	}
	step, err := num(EnvTaskStep, 1)
	if err != nil {
		return Shard{}, true, err
	}
	hi, err := num(EnvTaskMax, optional)
	if err != nil {
		return Shard{}, true, err
	}
	if step < 1 {
		return Shard{}, true, fmt.Errorf("grid: %s=%d: want at least 1: %w", EnvTaskStep, step, ErrShard)
	}
	if count < 1 || count > MaxShards {
		return Shard{}, true, fmt.Errorf("grid: %s=%d: want 1–%d: %w", EnvTaskCount, count, MaxShards, ErrShard)
	}
	if hi >= 0 && count >= 1 && lo+(count-1)*step != hi {
		return Shard{}, true, fmt.Errorf("grid: job array ids %d–%d with step %d are not %d evenly stepped ids (a list such as --array=1,4,9?); use a range such as --array=0-%d, or --shard: %w", lo, hi, step, count, count-1, ErrShard)
	}
	if id < lo || (id-lo)%step != 0 {
		return Shard{}, true, fmt.Errorf("grid: task id %d is not min %d plus a multiple of step %d (use a range such as --array=0-%d, or --shard): %w", id, lo, step, max(count-1, 0), ErrShard)
	}
	s = Shard{Index: (id - lo) / step, Count: count}
	if err := s.Valid(); err != nil {
		return Shard{}, true, fmt.Errorf("grid: job array (%s=%d, %s=%d, %s=%d): the ids must form a range of %d (use --array=0-%d, or --shard): %w",
			EnvTaskID, id, EnvTaskMin, lo, EnvTaskCount, count, count, max(count-1, 0), err)
	}
	return s, true, nil
}

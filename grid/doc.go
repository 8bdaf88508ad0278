// Package grid evaluates a model over a grid of parameters, in shards that
// a cluster's job-array scheduler can run side by side, and merges the
// shards into one file identical to an unsharded run's. It knows nothing of
// the model: the caller passes an Evaluator that gives χ²/N per epoch (and
// optionally the model spectra) at a point. It imports no GUI code.
//
// # Grid spec
//
// A spec is JSON (DecodeSpec; FORMAT.md beside this file has the full
// description, to be folded into the README):
//
//	{"format": "broadline-grid/1", "label": "optional text",
//	 "axes": [{"quantity": "velocity", "from": 0.1, "to": 0.3, "steps": 21},
//	          {"quantity": "temperature", "values": [3500, 4000, 5000]},
//	          {"quantity": "fraction", "element": "Nd", "from": 1e-5, "to": 1e-2, "steps": 7, "spacing": "log"}]}
//
// Quantities and units: "velocity" (photosphere, v/c, 0–1), "temperature"
// (K), "fraction" (mass fraction of the named element), "days" (since
// explosion), "epoch" (integer index of a dataset epoch). Each axis gives
// "values" or "from"/"to"/"steps" with "spacing" "linear" (default) or
// "log". Decoding is strict (unknown keys are errors) and bounded
// (MaxAxes, MaxValuesPerAxis, MaxPoints, MaxSpecBytes).
//
// # Enumeration and shards
//
// Points are numbered row-major: the last axis varies fastest (Spec.Point).
// Shard i/n, counting from 0, holds the points k with k mod n = i
// (ParseShard, ShardFromEnv for SLURM_ARRAY_TASK_ID and
// SLURM_ARRAY_TASK_COUNT, with SLURM_ARRAY_TASK_MIN/STEP for arrays that
// do not start at 0). The whole grid is shard 0/1 (Whole).
//
// # Part files
//
// Run writes a shard's part file: CSV with '#' comment lines recording the
// format version, the spec (canonical JSON and its SHA-256), the inputs
// (role, SHA-256, name), the epoch labels, the shard and the point count;
// then a header row, one row per point in point order (index, axis values,
// combined χ²/N, χ²/N and N per epoch, error message of a failed point),
// and an end line with the row count and the SHA-256 of all bytes before
// it. Floats are written with strconv 'g' −1, so they read back exactly.
// Files are written to a temporary file and renamed (mode 0644). A part
// that exists, is complete and matches is skipped; otherwise it is redone,
// and the run says why. Merge checks the parts and writes the file an
// unsharded run writes, byte for byte. ReadPart checks one part.
//
// Points are evaluated by runtime.GOMAXPROCS goroutines (Options.Workers)
// and written in point order, so output never depends on timing.
package grid

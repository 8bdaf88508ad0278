// Package linelists holds the atomic data the physics reads: the element
// table, species in spectroscopic notation, line-list readers, the compact
// line store and its binary cache, energy levels and partition functions.
//
// Loading files (for other packages):
//
//	func Load(paths []string, opts Options) (*Store, Report, error)
//
// reads and merges line-list files (our text format, or any table through
// Options.Import; gzip is recognised), adds levels files (Options.Levels),
// applies Options.Filter, and uses a binary cache per file (next to it as
// NAME.blcache, or in Options.CacheDir / the user cache directory). The
// zero Options is the usual choice. Report says what was read, skipped,
// deduplicated and taken from the cache; WriteSummary prints it.
//
//	func LoadContext(ctx context.Context, paths []string, opts Options) (*Store, Report, error)
//
// is Load for an interactive caller: it stops when ctx is done (an error
// wrapping ctx.Err(), no store, no cache left behind) and reports each
// file's bytes read to Options.Progress.
//
// Conventions:
//   - Wavelengths in the store are vacuum wavelengths in ångström, sorted
//     ascending. Air wavelengths are converted when a file is read, with the
//     IAU standard formula (Morton 2000, ApJS 130, 403) of
//     physics.AirToVacuum. The medium of a file or an option is a
//     physics.Medium (MediumDefault: not said).
//   - Energies are in eV, measured from the ground level of their own ion.
//   - A species is an element and an ion stage; stage I is the neutral atom,
//     stage II singly ionised, and so on. Species.Charge counts from 0.
//   - Partition functions U(T) = Σ g exp(−E/kT) are summed over the levels a
//     store knows for a species: a levels file when one was given,
//     otherwise the distinct levels the line list names plus the ground
//     level. Both are lower bounds when the level set is incomplete; with no
//     levels at all U is the ground weight and PartitionFunction says
//     complete = false. LevelSourceOf tells which case applies.
//   - This package imports no other package of broadline except the leaf
//     broadline/physics (constants: cm⁻¹ → eV is physics.InvCmToEV, k in
//     eV K⁻¹ physics.BoltzmannEV).
//   - Bad data returns an error (a *ParseError naming file:line and column for
//     files, wrapping one of the Err* sentinels); a programming mistake
//     panics with a "linelists: ..." message.
package linelists

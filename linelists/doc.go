// Package linelists holds the atomic data the physics reads: the element
// table, species in spectroscopic notation, line-list readers, the compact
// line store and its binary cache, energy levels and partition functions.
//
// Conventions:
//   - Wavelengths in the store are vacuum wavelengths in ångström, sorted
//     ascending. Air wavelengths are converted when a file is read.
//   - Energies are in eV, measured from the ground level of their own ion.
//   - A species is an element and an ion stage; stage I is the neutral atom,
//     stage II singly ionised, and so on. Species.Charge counts from 0.
//   - This package imports no other package of broadline.
//   - Bad data returns an error (a *ParseError naming file:line and column for
//     files); a programming mistake panics with a "linelists: ..." message.
package linelists

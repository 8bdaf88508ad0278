#!/usr/bin/python3
"""Writes atomic_weights.tsv: Z, symbol and the atomic mass that Debian's
python3-periodictable (1.6.0) holds for Z = 1-100, as an independent check of
the element table in linelists/element.go.

Run with Debian's python: /usr/bin/python3 atomic_weights.py > atomic_weights.tsv
"""
import periodictable

print("# Z\tsymbol\tmass_u\t(source: python3-periodictable %s)" % periodictable.__version__)
for z in range(1, 101):
    el = periodictable.elements[z]
    print("%d\t%s\t%.6f" % (z, el.symbol, el.mass))

"""Physics models: pure functions over numpy arrays, SI units, no I/O.

Frame: metres, x east, y north, z up; the ground surface is the plane z = 0.
"""

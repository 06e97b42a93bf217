"""Continuous-beam analysis of one-way slab strips (knows no design code)."""

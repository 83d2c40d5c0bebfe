"""Tiltyard computation engine: pure numpy/pandas/pvlib, never Qt."""

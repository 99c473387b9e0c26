"""Benches around a core: measurement harness, self-checking test benches, display bench."""

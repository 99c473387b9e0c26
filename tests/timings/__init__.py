"""Tests of synccore.timings."""

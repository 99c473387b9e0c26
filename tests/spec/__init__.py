"""Tests of synccore.spec."""

"""Tests of synccore.clocking."""

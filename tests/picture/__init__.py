"""Tests of synccore.picture."""

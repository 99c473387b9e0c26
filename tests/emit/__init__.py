"""Tests of synccore.emit."""

"""Tests of synccore.model."""

"""Tests of synccore.verification."""

"""The first-light design: a test-pattern generator and a top level around the core."""

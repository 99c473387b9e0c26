"""Running a core in the simulators or the built-in engine, measuring it, judging it."""

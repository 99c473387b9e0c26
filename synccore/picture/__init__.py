"""The picture before the board: first-light runs to pins, simulated monitor, VCD, diagrams."""

"""The Amaranth model of the core (SyncCore, the built-in engine) and of the first-light design."""

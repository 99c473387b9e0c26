"""The Amaranth model of the core (SyncCore, the built-in engine), of the multi-mode core
(multi.MultiSyncCore) and of the first-light design."""

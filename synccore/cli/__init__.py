from synccore.cli.main import main

__all__ = ["main"]

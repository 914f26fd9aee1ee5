"""The ``engine-air`` command: ``main(argv)`` returns the exit code (0 holds, 1 fails, 2 unusable input)."""

from engine_air.cli.commands import main

__all__ = ["main"]

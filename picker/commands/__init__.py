"""Subcommands of the CLI: one module each, ``register(subparsers)`` and ``run(args)``."""

"""One module per command: ``add_arguments(parser)`` and ``execute(args) -> int``."""

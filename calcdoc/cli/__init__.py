"""The command line: :mod:`.args` (the parser of every command), :mod:`.light` (``check`` and ``schema``,
which load the job layer only) and :mod:`.commands` (every command, with the engine and the report). The
console script is :func:`calcdoc.entry`; :func:`calcdoc.main` runs a command as a function."""

"""matezone's command line (``matezone``, ``python -m matezone``): see :mod:`matezone.cli`."""

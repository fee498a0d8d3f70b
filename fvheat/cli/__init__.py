"""The ``fvheat`` command."""

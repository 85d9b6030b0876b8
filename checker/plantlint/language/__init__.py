"""language layer of plantlint."""

#: Part of the cache key: raise it when the unit checks (``units.py``) change their results.
#: Here, not in ``units.py``, so that a run answered from the cache does not import the unit
#: checker to compute its key.
UNITS_VERSION = 1

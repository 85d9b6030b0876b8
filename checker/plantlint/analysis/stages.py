"""The analysis stages in order, defined once (light: the runner imports it without sympy).

Each stage is reported when it completes, so a stopped run keeps what finished and can
still decide the claims those stages settle.
"""

STAGES = ("structure", "envelope", "points", "zero dynamics", "linearisation", "distributions", "claims")

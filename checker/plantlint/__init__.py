"""plantlint: a static checker for nonlinear plant models (``.plant`` files).

plantlint checks structure (relative degree, regularity, zero dynamics,
involutivity). It does not certify safety.
"""

__version__ = "0.1.0"

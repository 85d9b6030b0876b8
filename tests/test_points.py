"""Operating points as engineers write them: values from definitions, one finding
per cause, rounded values near an equilibrium. Plants are invented demo data unless
a source is named."""

from __future__ import annotations

import math

from plantlint.run.config import Config
from plantlint.run.pipeline import analyse_bytes, read_model

# One tank of a quadruple-tank rig (demo numbers, invented): the level at the
# operating point is written from the flow through a `let`, as engineers do.
TANK = b"""plant tank3
const grav = 981
param a3 = 0.071
param A3 = 28
param gam2 = 0.7
param k2 = 3.35
param vnom = 3
state h3 in 0.1 .. 20
input v in 0 .. 6
let q3 = (1 - gam2)*k2*vnom
rate h3 = -a3/A3*sqrt(2*grav*h3) + (1 - gam2)*k2/A3*v
output y = h3
point op: h3 = (q3/a3)^2/(2*grav), v = vnom
"""


def rules(data: bytes) -> list[str]:
    return sorted(f.rule for f in analyse_bytes(data, Config()).findings)


def test_point_value_may_use_a_constant_definition() -> None:
    model, findings = read_model(TANK)
    assert findings == []
    h3 = float(model.point("op").values["h3"])
    # Torricelli's law (any fluid-mechanics text, e.g. White, Fluid Mechanics, sec. 3.6,
    # from memory): outflow a*sqrt(2 g h) equals the inflow q at h = (q/a)^2 / (2 g)
    q3 = (1 - 0.7) * 3.35 * 3
    assert math.isclose(h3, (q3 / 0.071) ** 2 / (2 * 981), rel_tol=1e-12)
    # the same rate in floats (math.sqrt, not the checker) vanishes there
    assert abs(-0.071 / 28 * math.sqrt(2 * 981 * h3) + q3 / 28) < 1e-12
    raw = analyse_bytes(TANK, Config())
    assert raw.findings == []
    assert raw.analysis is not None and raw.analysis["points"]["op"]["equilibrium"] is True


def test_point_value_from_a_state_dependent_definition_is_refused_once() -> None:
    text = TANK.replace(b"point op: h3 = (q3/a3)^2/(2*grav)", b"let lvl = 2*h3\npoint op: h3 = lvl/2")
    _, findings = read_model(text)
    assert [f.rule for f in findings] == ["unknown-name", "unused-name"]  # q3 is no longer used
    assert "definition 'lvl', which depends on the state 'h3'" in findings[0].message
    # the state is given (with a bad value): it is not also reported as missing
    assert not any(f.rule == "point-incomplete" for f in findings)


def test_missing_state_is_reported_once() -> None:
    text = b"plant cart\nstate x in -1 .. 1\nstate v in -1 .. 1\ninput F\nrate x = v\nrate v = F\n" \
           b"output y = x\npoint home: x = 0\n"
    assert rules(text) == ["point-incomplete"]

"""Configuration: ``plantlint.toml`` or ``[tool.plantlint]`` in ``pyproject.toml``.

Found by walking up from the working directory; a typed, frozen :class:`Config`
comes out, and every unknown key or bad value is a :class:`ConfigError` (the CLI
exits 2 on it). Command-line options override the file.
"""

from __future__ import annotations

import math
import os
import sys
from dataclasses import dataclass, field, replace
from pathlib import Path
from types import MappingProxyType
from typing import Any, Mapping

from plantlint.core.findings import Adjustment, Severity
from plantlint.core.settings import AnalysisSettings

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib


class ConfigError(Exception):
    """A configuration problem the user must fix (exit code 2)."""


@dataclass(frozen=True)
class Config:
    """Everything the command line and the configuration file set (the run layer's settings);
    the analysis sees only :attr:`analysis`."""

    include: tuple[str, ...] = ("**/*.plant",)
    exclude: tuple[str, ...] = ()
    fail_on: Severity = Severity.ERROR
    only: frozenset[str] = frozenset()
    skip: frozenset[str] = frozenset()
    severity: Mapping[str, Severity] = field(default_factory=lambda: MappingProxyType({}))
    #: why each rule is skipped, why `only` selects, why each severity is changed, and where
    #: each was set (the configuration file, or "--skip on the command line"); shown in every report
    skip_reasons: Mapping[str, str] = field(default_factory=lambda: MappingProxyType({}))
    only_reason: str = ""
    severity_reasons: Mapping[str, str] = field(default_factory=lambda: MappingProxyType({}))
    skip_source: str = ""
    only_source: str = ""
    jobs: int = 0  # 0: one per CPU
    timeout: float | None = None  # seconds per model; None: the budget of the profile
    profile: str = "auto"  # "interactive", "ci" or "auto" (ci when the CI variable is set)
    timeout_interactive: float = 20.0  # the budget per model of an interactive / pre-commit run
    timeout_ci: float = 120.0  # the budget per model in CI
    undecided_fail: bool = True  # not-decided models and claims fail the run
    undecided_reason: str | None = None  # required when undecided_fail is False
    envelope_seconds: float = 5.0
    envelope_boxes: int = 20000
    #: relative residual within which a declared point counts as a rounded equilibrium
    #: (0: only exact equilibria); a point's own `tolerance T` takes precedence
    point_tolerance: float = 0.0
    cache_dir: str = ".plantlint/cache"  # under the project folder .plantlint/
    cache: bool = True
    root: Path = field(default_factory=Path.cwd)  # folder of the config file (or cwd)
    source: Path | None = None  # the file the settings came from

    def adjustments(self) -> tuple[Adjustment, ...]:
        """The active settings that drop or re-grade findings, with their reasons."""
        out: list[Adjustment] = []
        if self.only:
            out.append(Adjustment("only", tuple(sorted(self.only)), self.only_reason, self.only_source))
        for rule in sorted(self.skip):
            out.append(Adjustment("skip", (rule,), self.skip_reasons.get(rule, ""), self.skip_source))
        where = shown_path(self.source) if self.source is not None else "configuration"
        for rule, level in sorted(self.severity.items()):
            out.append(Adjustment("severity", (rule,), self.severity_reasons.get(rule, ""), where, level))
        return tuple(out)

    def resolved_profile(self, env: Mapping[str, str] | None = None) -> str:
        """``interactive`` or ``ci``: ``auto`` means ci when the ``CI`` environment
        variable is set to anything but empty, 0, false or no (as CI services do)."""
        if self.profile != "auto":
            return self.profile
        value = (os.environ if env is None else env).get("CI", "").strip().lower()
        return "ci" if value not in ("", "0", "false", "no") else "interactive"

    def budget(self, env: Mapping[str, str] | None = None) -> tuple[float, str]:
        """The time budget per model and how it was chosen, in words."""
        if self.timeout is not None:
            return self.timeout, f"{self.timeout:g} s per model, set explicitly"
        profile = self.resolved_profile(env)
        if profile == "ci":
            why = "" if self.profile == "ci" else ", the CI variable is set"
            return self.timeout_ci, f"{self.timeout_ci:g} s per model, CI profile{why}"
        return self.timeout_interactive, (f"{self.timeout_interactive:g} s per model, interactive profile "
                                          f"(CI runs get {self.timeout_ci:g} s)")

    @property
    def seconds(self) -> float:
        """The time budget per model in effect."""
        return self.budget()[0]

    @property
    def analysis(self) -> AnalysisSettings:
        """What the analysis reads of these settings (all that a worker receives)."""
        return AnalysisSettings(self.envelope_seconds, self.envelope_boxes, self.point_tolerance)

    def analysis_key(self) -> str:
        """The settings that change analysis results (part of the cache key)."""
        return self.analysis.key()


_KEYS = {
    "include", "exclude", "fail-on", "only", "skip", "severity", "jobs", "timeout",
    "envelope-seconds", "envelope-boxes", "cache-dir", "cache", "point-tolerance",
    "profile", "timeout-interactive", "timeout-ci", "undecided",
}
PROFILES = ("auto", "interactive", "ci")


def find_config(start: Path) -> tuple[Path, dict[str, Any]] | None:
    """The nearest plantlint.toml, or pyproject.toml with a [tool.plantlint] table."""
    here = start.resolve()
    for folder in (here, *here.parents):
        own = folder / "plantlint.toml"
        if own.is_file():
            return own, _read(own)
        project = folder / "pyproject.toml"
        if project.is_file():
            data = _read(project)
            table = data.get("tool", {}).get("plantlint")
            if table is not None:
                if not isinstance(table, dict):
                    raise ConfigError(f"{project}: [tool.plantlint] must be a table")
                return project, table
    return None


def _read(path: Path) -> dict[str, Any]:
    try:
        with path.open("rb") as fh:
            return tomllib.load(fh)
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{path}: not valid TOML: {exc}") from None
    except OSError as exc:
        raise ConfigError(f"{path}: cannot read: {exc.strerror}") from None


def load_config(start: Path | None = None, explicit: Path | None = None, known_rules: frozenset[str] = frozenset()) -> Config:
    """Settings from ``explicit`` or the nearest config file, else defaults."""
    if explicit is not None:
        if not explicit.is_file():
            raise ConfigError(f"{explicit}: no such configuration file")
        data = _read(explicit)
        if explicit.name == "pyproject.toml":
            data = data.get("tool", {}).get("plantlint", {})
        found: tuple[Path, dict[str, Any]] | None = (explicit, data)
    else:
        found = find_config(start or Path.cwd())
    if found is None:
        return Config(root=(start or Path.cwd()).resolve())
    path, table = found
    return from_table(table, path, known_rules)


def _swallowed(table: Mapping[str, Any], where: str) -> None:
    """A top-level setting written below a [table] header is, in TOML, a key of that table
    (a common slip at the end of a file): say so, rather than that the table is malformed."""
    tables = ("skip", "only", "severity", "undecided")
    scalars = _KEYS - set(tables)
    found: list[tuple[str, str]] = []
    for name in tables:
        value = table.get(name)
        if not isinstance(value, dict):
            continue
        found += [(key, f"[{name}]") for key in value if key in scalars]
        if name == "severity":
            found += [(key, f"[severity.{rule}]") for rule, entry in value.items() if isinstance(entry, dict)
                      for key in entry if key in scalars]
    if found:
        key, header = found[0]
        raise ConfigError(f"{where}: '{key}' is written inside the table {header}: in TOML every key after a "
                          f"[table] header belongs to that table; move top-level settings such as '{key}' above "
                          "the first [table] line")


def from_table(table: Mapping[str, Any], path: Path, known_rules: frozenset[str] = frozenset()) -> Config:
    where = shown_path(path)
    _swallowed(table, where)
    unknown = sorted(set(table) - _KEYS)
    if unknown:
        raise ConfigError(f"{where}: unknown setting {', '.join(repr(k) for k in unknown)} "
                          f"(known: {', '.join(sorted(_KEYS))})")
    cfg = Config(root=path.parent.resolve(), source=path)
    changes: dict[str, Any] = {}
    if "include" in table:
        changes["include"] = _globs(table["include"], "include", where)
    if "exclude" in table:
        changes["exclude"] = _globs(table["exclude"], "exclude", where)
    if "fail-on" in table:
        changes["fail_on"] = _severity(table["fail-on"], "fail-on", where)
    if "only" in table:
        rules, reason = _only(table["only"], where, known_rules)
        changes.update(only=rules, only_reason=reason, only_source=where)
    if "skip" in table:
        reasons = _skip(table["skip"], where, known_rules)
        changes.update(skip=frozenset(reasons), skip_reasons=MappingProxyType(reasons), skip_source=where)
    if "severity" in table:
        levels, reasons = _severities(table["severity"], where, known_rules)
        changes.update(severity=MappingProxyType(levels), severity_reasons=MappingProxyType(reasons))
    if "jobs" in table:
        changes["jobs"] = _int(table["jobs"], "jobs", where, low=0)
    if "timeout" in table:
        changes["timeout"] = _positive(table["timeout"], "timeout", where)
    if "timeout-interactive" in table:
        changes["timeout_interactive"] = _positive(table["timeout-interactive"], "timeout-interactive", where)
    if "timeout-ci" in table:
        changes["timeout_ci"] = _positive(table["timeout-ci"], "timeout-ci", where)
    if "profile" in table:
        changes["profile"] = parse_profile(table["profile"], f"{where}: 'profile'")
    if "undecided" in table:
        changes["undecided_fail"], changes["undecided_reason"] = _undecided(table["undecided"], where)
    if "envelope-seconds" in table:
        changes["envelope_seconds"] = _positive(table["envelope-seconds"], "envelope-seconds", where)
    if "envelope-boxes" in table:
        changes["envelope_boxes"] = _int(table["envelope-boxes"], "envelope-boxes", where, low=1)
    if "point-tolerance" in table:
        changes["point_tolerance"] = _tolerance(table["point-tolerance"], where)
    if "cache-dir" in table:
        value = table["cache-dir"]
        if not isinstance(value, str) or not value.strip():
            raise ConfigError(f"{where}: 'cache-dir' must be a folder name")
        changes["cache_dir"] = value
    if "cache" in table:
        if not isinstance(table["cache"], bool):
            raise ConfigError(f"{where}: 'cache' must be true or false")
        changes["cache"] = table["cache"]
    return replace(cfg, **changes)


def _reason(value: Any, key: str, where: str, how: str) -> str:
    if not isinstance(value, str) or not value.strip():
        raise ConfigError(f"{where}: {key} needs a reason, as text: {how}")
    return " ".join(value.split())


def _skip(value: Any, where: str, known: frozenset[str]) -> dict[str, str]:
    """``[skip]`` maps each rule id to the reason it is left out."""
    how = '[skip] then RULE = "why it is left out", one line per rule'
    if value == []:
        return {}
    if isinstance(value, (list, str)):
        named = [r for r in (value if isinstance(value, list) else [value]) if isinstance(r, str)] or ["RULE"]
        lines = "; ".join(f'{r} = "why it is left out"' for r in named)
        raise ConfigError(f"{where}: 'skip' is a table now, with a reason for each rule: replace `skip = [...]` "
                          f"by [skip] and one line per rule ({lines})")
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: 'skip' must be written {how}")
    _rule_set(list(value), "skip", where, known)
    return {rule: _reason(reason, f"skip.{rule}", where, how) for rule, reason in value.items()}


def _only(value: Any, where: str, known: frozenset[str]) -> tuple[frozenset[str], str]:
    """``[only]`` with ``rules = [...]`` and one ``reason`` for reporting nothing else."""
    how = '[only] then rules = ["RULE", ...] and reason = "why no other rule is reported"'
    if value == []:
        return frozenset(), ""
    if isinstance(value, (list, str)):
        raise ConfigError(f"{where}: 'only' is a table now, with a reason: replace `only = [...]` by {how}")
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: 'only' must be written {how}")
    extra = sorted(set(value) - {"rules", "reason"})
    if extra or "rules" not in value:
        raise ConfigError(f"{where}: 'only' must be written {how}")
    rules = _rule_set(value["rules"], "only.rules", where, known)
    return rules, (_reason(value.get("reason"), "only", where, how) if rules else "")


def _severities(value: Any, where: str, known: frozenset[str]) -> tuple[dict[str, Severity], dict[str, str]]:
    """``[severity.RULE]`` tables with ``level`` and ``reason``."""
    how = '[severity.RULE] then level = "error|warning|note" and reason = "why"'
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: 'severity' must be written {how}")
    _rule_set(list(value), "severity", where, known)
    levels: dict[str, Severity] = {}
    reasons: dict[str, str] = {}
    for rule, entry in value.items():
        if isinstance(entry, str):
            raise ConfigError(f"{where}: severity override of '{rule}' needs a reason: replace "
                              f'`{rule} = "{entry}"` under [severity] by a table [severity.{rule}] with '
                              f'level = "{entry}" and reason = "why"')
        if isinstance(entry, dict) and set(entry) < {"level", "reason"}:  # one of the two is missing
            missing = "reason = \"why\"" if "level" in entry else 'level = "error|warning|note"'
            raise ConfigError(f"{where}: [severity.{rule}] needs {missing} as well")
        if not isinstance(entry, dict) or sorted(entry) != ["level", "reason"]:
            raise ConfigError(f"{where}: 'severity.{rule}' must be written {how}")
        levels[rule] = _severity(entry["level"], f"severity.{rule}.level", where)
        reasons[rule] = _reason(entry["reason"], f"severity.{rule}", where, how)
    return levels, reasons


def parse_profile(value: Any, what: str) -> str:
    if not isinstance(value, str) or value not in PROFILES:
        raise ConfigError(f"{what} must be one of {', '.join(repr(p) for p in PROFILES)}")
    return value


def _undecided(value: Any, where: str) -> tuple[bool, str | None]:
    """``[undecided] fail = false, reason = "..."``: letting not-decided results pass is
    an explicit choice with a reason (shown in every report)."""
    if not isinstance(value, dict):
        raise ConfigError(f"{where}: 'undecided' must be a table: [undecided] fail = false, reason = \"...\"")
    unknown = sorted(set(value) - {"fail", "reason"})
    if unknown:
        raise ConfigError(f"{where}: unknown setting {', '.join(repr(f'undecided.{k}') for k in unknown)} "
                          "(known: undecided.fail, undecided.reason)")
    fail = value.get("fail", True)
    if not isinstance(fail, bool):
        raise ConfigError(f"{where}: 'undecided.fail' must be true or false")
    reason = value.get("reason")
    if reason is not None and (not isinstance(reason, str) or not reason.strip()):
        raise ConfigError(f"{where}: 'undecided.reason' must be a non-empty string")
    if not fail and reason is None:
        raise ConfigError(f"{where}: 'undecided.fail = false' lets models that could not be checked pass; "
                          "say why with undecided.reason = \"...\"")
    if fail and reason is not None:
        raise ConfigError(f"{where}: 'undecided.reason' only applies with undecided.fail = false")
    return fail, (reason.strip() if reason else None)


def _globs(value: Any, key: str, where: str) -> tuple[str, ...]:
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
        raise ConfigError(f"{where}: '{key}' must be a list of glob patterns")
    return tuple(value)


def _severity(value: Any, key: str, where: str) -> Severity:
    if not isinstance(value, str):
        raise ConfigError(f"{where}: '{key}' must be \"error\", \"warning\" or \"note\"")
    try:
        return Severity.parse(value)
    except ValueError:
        raise ConfigError(f"{where}: '{key}' = {value!r}; use \"error\", \"warning\" or \"note\"") from None


def _rule_set(value: Any, key: str, where: str, known: frozenset[str]) -> frozenset[str]:
    if isinstance(value, str):
        value = [v.strip() for v in value.split(",") if v.strip()]
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise ConfigError(f"{where}: '{key}' must be a list of rule ids")
    unknown = sorted(v for v in value if known and v not in known)
    if unknown:
        raise ConfigError(f"{where}: '{key}' names unknown rule {', '.join(repr(u) for u in unknown)} "
                          "(`plantlint rules` lists them)")
    return frozenset(value)


def _int(value: Any, key: str, where: str, low: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < low:
        raise ConfigError(f"{where}: '{key}' must be a whole number >= {low}")
    return value


def _positive(value: Any, key: str, where: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
        raise ConfigError(f"{where}: '{key}' must be a positive, finite number of seconds")
    return float(value)


def _tolerance(value: Any, where: str) -> float:
    """``point-tolerance``: a relative residual, 0 <= T < 1."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) \
            or not 0 <= value < 1:
        raise ConfigError(f"{where}: 'point-tolerance' must be a number with 0 <= T < 1 (a residual relative "
                          f"to the size of the rates' terms, e.g. 1e-6), not {value!r}")
    return float(value)


def parse_rule_list(text: str, option: str, known: frozenset[str]) -> frozenset[str]:
    """A comma-separated --only/--skip value, checked against the catalogue."""
    return _rule_set(text, option, "command line", known)


def shown_path(path: Path | str) -> str:
    """A configuration file as reports show it: relative to the working folder where it can be."""
    try:
        return Path(path).resolve().relative_to(Path.cwd().resolve()).as_posix()
    except (ValueError, OSError):
        return Path(path).as_posix()



def effective_jobs(cfg: Config) -> int:
    return cfg.jobs if cfg.jobs > 0 else max(os.cpu_count() or 1, 1)

"""The ``plantlint`` command line.

Imports are lazy so that ``plantlint --version`` and cached runs start fast:
sympy is loaded only when a model actually has to be analysed.
"""

from __future__ import annotations

import argparse
import errno
import math
import os
import signal
import stat
import sys
from pathlib import Path
from typing import TYPE_CHECKING, Callable, NoReturn, Sequence, TextIO

from plantlint import __version__

if TYPE_CHECKING:  # imported lazily at run time (no sympy for --version or warm runs)
    from plantlint.run.config import Config
    from plantlint.run.runner import Target

CAUTION = (
    "plantlint checks the structure of a plant model (relative degree, regularity, zero "
    "dynamics, involutivity). It does not check safety: a clean run is no evidence that a "
    "controller is safe. Verify every design with your team's own verification, the "
    "standards that apply to your machine, and licensed engineering judgement."
)

EXIT_OK, EXIT_FINDINGS, EXIT_USAGE = 0, 1, 2
EXIT_SIGINT, EXIT_SIGTERM = 130, 143  # 128 + signal number, as shells report it

EXIT_CODES = (
    "Exit codes: 0 every model checked and nothing at or above the fail level; 1 a defect found "
    "at or above the fail level, or a model or claim not decided (the analysis was cut short or "
    "failed: the model could not be checked); 2 usage or configuration error; 130 interrupted "
    "(SIGINT, Ctrl-C), 143 terminated (SIGTERM): workers stopped, no report written."
)
BUDGETS = (
    "Time budget per model: 20 s in an interactive or pre-commit run, 120 s in CI (the CI "
    "environment variable is set, or --profile ci); --timeout or `timeout` in the configuration "
    "overrides both, `timeout-interactive` and `timeout-ci` change them."
)

#: Report formats that show findings only, never the analysis: a model the light route
#: proves clean is answered in them without sympy (the json report shows the analysis, so
#: it always runs it; see DEVELOPERS.md, "The light route").
LIGHT_FORMATS = frozenset({"text", "lines", "markdown", "sarif"})


def _paragraphs(*texts: str) -> str:
    """Help text kept in paragraphs (argparse would run them together)."""
    import textwrap

    return "\n\n".join(textwrap.fill(t, 79) for t in texts)


class _Parser(argparse.ArgumentParser):
    """argparse that exits with 2 and one line on usage errors (never a traceback)."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(EXIT_USAGE, f"{self.prog}: error: {message} (see `{self.prog} --help`)\n")


def build_parser() -> argparse.ArgumentParser:
    top = _Parser(
        prog="plantlint",
        description="Static checks for nonlinear plant models (.plant files): relative degree, "
        "decoupling, regularity over the operating envelope, zero dynamics, involutivity.",
        epilog=_paragraphs(CAUTION, EXIT_CODES, BUDGETS),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    top.add_argument("--version", action="version", version=f"plantlint {__version__}")
    sub = top.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    check = sub.add_parser("check", help="check model files or folders",
                           epilog=_paragraphs(CAUTION, EXIT_CODES, BUDGETS),
                           formatter_class=argparse.RawDescriptionHelpFormatter,
                           description="Check .plant files (folders are searched for *.plant). Each model "
                           "passes, has a defect found, or is not decided (could not be checked).")
    check.add_argument("paths", nargs="*", metavar="PATH", help="files or folders (default: the configured root)")
    check.add_argument("--format", choices=("text", "lines", "json", "sarif", "markdown"), default="text",
                       help="report format (default: text; markdown: a summary for a merge-request comment)")
    check.add_argument("--output", metavar="FILE", help="write the report to FILE instead of standard output "
                       "(a json or sarif report to a file also lists the findings on standard output, one "
                       "per line, for the CI log)")
    check.add_argument("--only", metavar="IDS", help="comma-separated rule ids to report (all others are dropped)")
    check.add_argument("--skip", metavar="IDS", help="comma-separated rule ids to drop")
    check.add_argument("--fail-on", choices=("error", "warning", "note"),
                       help="lowest severity that fails the run (default: error)")
    check.add_argument("--since", metavar="REF",
                       help="regression gate: fail only on findings introduced since git revision REF")
    check.add_argument("--jobs", type=int, metavar="N", help="models analysed in parallel (default: CPU count)")
    check.add_argument("--timeout", type=float, metavar="SECONDS",
                       help="time budget per model (default: by profile, 20 s interactive, 120 s CI)")
    check.add_argument("--profile", choices=("auto", "interactive", "ci"),
                       help="budget profile (default: auto, which is ci when the CI environment variable is set)")
    check.add_argument("--no-cache", action="store_true", help="neither read nor write the result cache")
    check.add_argument("--cache-dir", metavar="DIR", help="cache folder (default: .plantlint/cache beside the configuration)")
    check.add_argument("--config", metavar="FILE", help="use this plantlint.toml / pyproject.toml")
    check.add_argument("--color", choices=("auto", "always", "never"), default="auto",
                       help="colour in text output (default: auto: on a terminal unless NO_COLOR is set; "
                       "always overrides NO_COLOR)")
    check.add_argument("--shard", metavar="K/N",
                       help="check only shard K of N (a deterministic share of the models; "
                       "`plantlint merge` joins the shards' JSON reports)")

    merge = sub.add_parser("merge", help="merge the JSON reports of a sharded run into one report",
                           description="Join the JSON reports written by `check --shard K/N --format json` "
                           "for K = 1..N into the report the unsharded run would have written, with the "
                           "same exit code. Refuses a missing, repeated or foreign shard.")
    merge.add_argument("reports", nargs="+", metavar="REPORT.json")
    merge.add_argument("--format", choices=("text", "lines", "json", "sarif", "markdown"), default="text",
                       help="format of the merged report (default: text)")
    merge.add_argument("--output", metavar="FILE", help="write the merged report to FILE")
    merge.add_argument("--fail-on", choices=("error", "warning", "note"),
                       help="lowest severity that fails (default: the level the shards ran with)")
    merge.add_argument("--color", choices=("auto", "always", "never"), default="auto")

    plot = sub.add_parser("plot", help="draw envelope slices and zero-dynamics traces (needs the plot extra)",
                          description="Per model: a 2-D slice of the operating envelope shaded where the "
                          "decoupling matrix is singular or nearly so, with the envelope proof's witness; and the "
                          "zero-dynamics eigenvalues across each ranged parameter, with the imaginary axis and "
                          "the crossing. Needs matplotlib: pip install \"plantlint[plot]\".")
    plot.add_argument("paths", nargs="+", metavar="PATH", help="model files or folders")
    plot.add_argument("--states", metavar="A,B", help="the two states of the slice (default: those the decoupling "
                      "matrix depends on)")
    plot.add_argument("--point", metavar="NAME", help="hold the other states at this operating point, and trace "
                      "the zero dynamics there (default: the envelope witness, else the range centres; the first point)")
    plot.add_argument("--param", metavar="NAME", help="trace only this ranged parameter (default: every one)")
    plot.add_argument("--out", metavar="DIR", default="plantlint-plots", help="folder for the pictures "
                      "(default: plantlint-plots)")
    plot.add_argument("--format", choices=("png", "svg"), default="png")
    plot.add_argument("--config", metavar="FILE", help="use this plantlint.toml / pyproject.toml")
    plot.add_argument("--timeout", type=float, metavar="SECONDS",
                      help="time budget per model, as for check (default: by profile, 20 s interactive, 120 s CI); "
                      "a model that runs out of it is not drawn")

    rules = sub.add_parser("rules", help="list the rule catalogue, or show one rule",
                           description="The rule catalogue: ids, default severities and rationale.")
    rules.add_argument("rule", nargs="?", metavar="ID", help="show this rule in full")
    rules.add_argument("--format", choices=("text", "json"), default="text")

    explain = sub.add_parser("explain", help="show the derivation behind the findings for one model",
                             epilog=CAUTION,
                             description="A readable report of the analysis of one model: Lie derivatives, "
                             "decoupling matrix, envelope, normal form, zero dynamics, distributions.")
    explain.add_argument("file", metavar="FILE")
    explain.add_argument("--point", metavar="NAME", help="only this operating point")
    explain.add_argument("--only", metavar="IDS", help="comma-separated rule ids to list among the findings")
    explain.add_argument("--skip", metavar="IDS", help="comma-separated rule ids to leave out of the findings")
    explain.add_argument("--format", choices=("text", "json"), default="text")
    explain.add_argument("--color", choices=("auto", "always", "never"), default="auto")
    explain.add_argument("--timeout", type=float, metavar="SECONDS",
                         help="time budget of the model, as for check (default: by profile, 20 s interactive, "
                         "120 s CI)")
    explain.add_argument("--config", metavar="FILE", help="use this plantlint.toml / pyproject.toml")
    return top


#: What a write to a stream that cannot take more says (a full disk or quota, a file too
#: large, a failing device); the error names no file, unlike a model that cannot be read.
_OUTPUT_FULL = frozenset({errno.ENOSPC, errno.EDQUOT, errno.EFBIG, errno.EIO})


def main(argv: Sequence[str] | None = None) -> int:
    for stream in (sys.stdout, sys.stderr):
        try:  # a model's non-ASCII text must not crash a non-UTF-8 console
            stream.reconfigure(errors="replace")  # type: ignore[union-attr]
        except (AttributeError, ValueError):
            pass
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return EXIT_USAGE
    previous = _on_sigterm()
    try:
        if args.command == "check":
            return _check(args)
        if args.command == "rules":
            return _rules(args)
        if args.command == "merge":
            return _merge(args)
        if args.command == "plot":
            return _plot(args)
        return _explain(args)
    except KeyboardInterrupt:
        _quiet_exit("interrupted")
        return EXIT_SIGINT
    except Terminated:
        _quiet_exit("terminated")
        return EXIT_SIGTERM
    except BrokenPipeError:
        return EXIT_OK
    except OSError as exc:  # a write to standard output failed (a full disk under a redirect)
        if exc.filename is not None or exc.errno not in _OUTPUT_FULL:
            raise
        return _cannot_write("standard output", exc)
    finally:
        if previous is not None:
            signal.signal(signal.SIGTERM, previous)  # type: ignore[arg-type]


class Terminated(BaseException):
    """SIGTERM arrived: unwind (the runner's cleanup stops every worker), then exit 143."""


def _on_sigterm() -> object:
    """Turn SIGTERM into :class:`Terminated` so that the run ends as on Ctrl-C:
    workers stopped, one line on stderr, no traceback."""
    def handler(_signum: int, _frame: object) -> None:
        raise Terminated()

    try:
        return signal.signal(signal.SIGTERM, handler)
    except (ValueError, OSError):  # not the main thread
        return None


def _quiet_exit(what: str) -> None:
    """One line on stderr; further interrupts while exiting are ignored."""
    for sig in (signal.SIGINT, signal.SIGTERM):
        try:
            signal.signal(sig, signal.SIG_IGN)
        except (ValueError, OSError):
            pass
    print(f"plantlint: {what}; workers stopped, no report written", file=sys.stderr)


def _fail(message: str) -> int:
    print(f"plantlint: error: {message}", file=sys.stderr)
    return EXIT_USAGE


def _cannot_write(where: str, exc: Exception) -> int:
    """One line for output that could not be written (exit 2, never 1)."""
    return _fail(f"{where}: cannot write: {getattr(exc, 'strerror', None) or exc}")


def _use_color(choice: str, stream: TextIO) -> bool:
    if choice == "always":
        return True
    if choice == "never" or os.environ.get("NO_COLOR"):
        return False
    return bool(getattr(stream, "isatty", lambda: False)())


def _check(args: argparse.Namespace) -> int:
    from dataclasses import replace

    from plantlint.core.catalogue import load_catalogue
    from plantlint.run.config import ConfigError, effective_jobs, parse_rule_list
    from plantlint.core.findings import Report, Severity
    from plantlint.run.runner import UsageError, check_targets

    for option in ("since", "cache_dir", "config", "output", "shard", "only", "skip"):
        value = getattr(args, option)
        if value is not None and not value.strip():  # `--since "$UNSET"`: not the same as leaving it out
            return _fail(f"--{option.replace('_', '-')} needs a value; it was given an empty one")
    catalogue = load_catalogue()
    known = frozenset(catalogue.ids())
    try:
        config, targets = _load_config(args.paths, args.config, known)  # the models: one discovery
        changes = {}
        if args.only:  # replaces the configuration's selection; every report says so
            changes.update(only=parse_rule_list(args.only, "--only", known), only_reason="",
                           only_source="--only on the command line")
        if args.skip:
            changes.update(skip=parse_rule_list(args.skip, "--skip", known), skip_reasons={},
                           skip_source="--skip on the command line")
        if args.fail_on:
            changes["fail_on"] = Severity.parse(args.fail_on)
        changes.update(_timeout_change(args.timeout))
        if args.profile is not None:
            changes["profile"] = args.profile
        if args.jobs is not None:
            if args.jobs < 0:
                raise ConfigError("--jobs must be >= 0 (0: one per CPU)")
            changes["jobs"] = args.jobs
        config = replace(config, **changes)
    except (ConfigError, UsageError) as exc:
        return _fail(str(exc))
    defaults = {r.id: r.severity for r in catalogue}
    paths = args.paths or [str(config.root)]
    cache_dir = Path(args.cache_dir) if args.cache_dir else config.root / config.cache_dir
    use_cache = config.cache and not args.no_cache
    _say_excluded(args.paths, config)
    shard = None
    if args.shard:
        from plantlint.run.shard import Shard, ShardError, parse_shard

        try:
            shard = Shard(*parse_shard(args.shard), root=config.root)
        except ShardError as exc:
            return _fail(str(exc))
    try:
        if args.since:
            from plantlint.run.gate import gate

            report = gate(args.since, paths, config, defaults, jobs=effective_jobs(config), use_cache=use_cache,
                          cache_dir=cache_dir, show_progress=sys.stderr.isatty(), shard=shard, every=targets)
        else:
            if shard is not None:
                targets = shard.pick(targets)
            files = check_targets(targets, config, defaults, jobs=effective_jobs(config), use_cache=use_cache,
                                  cache_dir=cache_dir, show_progress=sys.stderr.isatty(),
                                  light=args.format in LIGHT_FORMATS)
            report = Report(files=files, tool_version=__version__, fail_on=config.fail_on)
    except UsageError as exc:
        return _fail(str(exc))
    if shard is not None:
        report.shard = shard.record(config.fail_on)
        print(f"plantlint: shard {shard.index}/{shard.count}: {len(report.files)} of {shard.models} models",
              file=sys.stderr)
    report.adjustments = config.adjustments()
    report.budget = config.budget()[1]
    report.configuration = _shown_source(config)
    if not config.undecided_fail:
        from plantlint.core.findings import Relaxation

        report.relaxation = Relaxation(config.undecided_reason or "", str(config.source or "the configuration"))
    return _emit(report, args.format, args.output, args.color)


def _shown_source(config: Config) -> str | None:
    """The configuration file as reports show it (None: the run used the defaults)."""
    from plantlint.run.config import shown_path

    return shown_path(config.source) if config.source is not None else None


def _say_excluded(paths: list[str], config: Config) -> None:
    """A file named on the command line that the configuration excludes is not checked;
    say so on standard error, naming the pattern and where it is set (not an error: a
    pre-commit hook passes whatever is staged)."""
    from plantlint.run.config import shown_path
    from plantlint.run.runner import excluded_by

    where = shown_path(config.source) if config.source is not None else "the configuration"
    for path, pattern in excluded_by(paths, config.root, config.exclude):
        print(f"plantlint: note: {path} is not checked: it is excluded by exclude pattern "
              f"\"{pattern}\" in {where}", file=sys.stderr)


def _folder(p: Path) -> Path:
    """The folder a checked path's configuration is looked for from."""
    try:
        return p.resolve() if p.is_dir() else p.resolve().parent
    except (RuntimeError, OSError):  # a symbolic link loop: discovery reports it
        return Path(os.path.abspath(p)).parent


def _config_start(paths: list[str]) -> Path:
    """Where to look for the configuration: above the checked paths, else here.

    `plantlint check example_repo` then uses example_repo's own settings, as a
    team running it from anywhere would expect.
    """
    if not paths:
        return Path.cwd()
    folders = [_folder(Path(p)) for p in paths]
    try:
        return Path(os.path.commonpath([str(f) for f in folders]))
    except ValueError:
        return Path.cwd()


def _load_config(paths: list[str], explicit: str | None, known: frozenset[str]) -> tuple[Config, list[Target]]:
    """The run's configuration (``--config``, else the one the checked paths fall under)
    and the models it finds (discovery raises UsageError for a path it cannot use). Models
    under different configurations (two projects side by side, a project nested in a
    folder that is checked, or a project's models beside models under none) are a usage
    error unless ``--config`` names one: one run has one set of rules, so some model would
    be judged by rules that are not its own."""
    from plantlint.run.config import ConfigError, find_config, load_config, shown_path
    from plantlint.run.runner import discover

    config = load_config(_config_start(paths), Path(explicit) if explicit else None, known)
    targets = discover(paths or [str(config.root)], config.root, config.include, config.exclude)
    if explicit is not None:
        return config, targets
    used = config.source.resolve() if config.source is not None else None
    own: dict[Path, Path | None] = {}
    mismatched: dict[Path | None, str] = {}
    for t in targets:
        folder = _folder(t.path)
        if folder not in own:
            found = find_config(folder)
            own[folder] = found[0].resolve() if found is not None else None
        if own[folder] != used:
            mismatched.setdefault(own[folder], str(t.display))
    if mismatched:
        named = ", ".join(f"{shown_path(f) if f is not None else 'no configuration file'} (for {p})"
                          for f, p in sorted(mismatched.items(), key=lambda kv: str(kv[0])))
        this = shown_path(used) if used is not None else "no configuration file"
        raise ConfigError(f"the models fall under different configurations: this run would use {this}, "
                          f"but {named}; check each project separately, or pass --config FILE to use one "
                          "for all")
    return config, targets


def _emit(report: object, fmt: str, output: str | None, color_choice: str) -> int:
    """Write the report; the exit code says what it found (0 or 1), or 2 when it could not
    be written. With ``output`` the report is rendered in full into a temporary file beside
    it and then renamed over it, so a run that fails leaves an earlier report whole."""
    from plantlint.core.findings import Report
    from plantlint.report.formats import get_formatter

    assert isinstance(report, Report)
    formatter = get_formatter(fmt)
    if not output and sys.stdout is None:  # started with standard output closed (`>&-`)
        return _fail("standard output is closed; no report written (give --output FILE)")
    try:
        if output:
            _write_atomically(output, lambda fh: formatter.render(report, fh, color=False))
        else:
            formatter.render(report, sys.stdout, color=fmt == "text" and _use_color(color_choice, sys.stdout))
            sys.stdout.flush()  # a full disk shows here, as "cannot write", not at exit
    except BrokenPipeError:
        raise
    except OSError as exc:
        return _cannot_write(output or "standard output", exc)
    except Exception as exc:  # a report that cannot be written is no finding: never exit 1 for it
        return _fail(f"the {fmt} report could not be written: internal error ({type(exc).__name__}: "
                     f"{_one_line(str(exc))}); {'no report written' if output else 'the output is incomplete'}")
    if output and fmt in ("json", "sarif"):
        # keep the terminal informed when the report went to a file
        get_formatter("lines").render(report, sys.stdout, color=False)
    return EXIT_FINDINGS if report.fails() else EXIT_OK


def _one_line(text: str) -> str:
    from plantlint.report.formats.base import one_line

    return one_line(text)


def _write_atomically(output: str, write: Callable[[TextIO], None]) -> None:
    """Call ``write`` on a temporary file in ``output``'s folder, then rename it to
    ``output`` (``os.replace``: readers see the old report or the new one, never a part).
    A link is followed, so the file it points to is replaced; a device or a pipe
    (``/dev/stdout``) is written directly, as it cannot be replaced."""
    import tempfile

    target = os.path.realpath(output)
    try:
        mode = os.stat(target).st_mode
    except FileNotFoundError:
        mode = None
    if mode is not None and not stat.S_ISREG(mode):
        with open(output, "w", encoding="utf-8", newline="\n") as fh:
            write(fh)
        return
    if mode is None:  # a new file gets the permissions open() would have given it
        umask = os.umask(0)
        os.umask(umask)
        permissions = 0o666 & ~umask
    else:
        permissions = stat.S_IMODE(mode)
    folder, name = os.path.split(target)
    fd, temporary = tempfile.mkstemp(prefix=f".{name}.", suffix=".tmp", dir=folder or ".")
    try:
        with open(fd, "w", encoding="utf-8", newline="\n") as fh:
            write(fh)
        os.chmod(temporary, permissions)
        os.replace(temporary, target)
    except BaseException:
        try:
            os.unlink(temporary)
        except OSError:
            pass
        raise


def _rules(args: argparse.Namespace) -> int:
    from plantlint.core.catalogue import load_catalogue
    from plantlint.report.rules_view import render_rules

    catalogue = load_catalogue()
    if args.rule and args.rule not in catalogue:
        return _fail(f"unknown rule '{args.rule}' (`plantlint rules` lists them)")
    if args.format == "json":
        import json

        rules = [catalogue.get(args.rule)] if args.rule else list(catalogue)
        json.dump([r.to_data() for r in rules], sys.stdout, indent=2)
        sys.stdout.write("\n")
        return EXIT_OK
    from rich.console import Console

    color = _use_color("auto", sys.stdout)
    console = Console(file=sys.stdout, force_terminal=color, no_color=not color, highlight=False,
                      width=None if color else 100)
    render_rules(catalogue, args.rule, console)
    return EXIT_OK


def _explain(args: argparse.Namespace) -> int:
    from plantlint.core.catalogue import load_catalogue
    from plantlint.run.config import ConfigError, parse_rule_list

    path = Path(args.file)
    if path.is_dir():  # one derivation at a time: the report is long; name the models to choose from
        models = sorted(p.relative_to(path).as_posix() for p in path.rglob("*.plant") if p.is_file())
        listed = ", ".join(models[:5]) + (f", ... ({len(models)} in all)" if len(models) > 5 else "")
        return _fail(f"{args.file}: is a folder; explain needs one model file"
                     + (f" (models here: {listed})" if models else " (there is no .plant file in it)"))
    if not path.is_file():
        return _fail(f"{args.file}: no such file")
    known = frozenset(load_catalogue().ids())
    try:
        only = parse_rule_list(args.only, "--only", known) if args.only else None
        skip = parse_rule_list(args.skip, "--skip", known) if args.skip else None
    except ConfigError as exc:
        return _fail(str(exc))
    color = args.format == "text" and _use_color(args.color, sys.stdout)
    return explain_file(path, args.point, args.format, sys.stdout, color, only=only, skip=skip, errors=sys.stderr,
                        timeout=args.timeout, config_file=Path(args.config) if args.config else None)


def explain_file(path: Path, point: str | None, fmt: str, stream: TextIO, color: bool, *,
                 only: frozenset[str] | None = None, skip: frozenset[str] | None = None,
                 errors: TextIO | None = None, timeout: float | None = None,
                 config_file: Path | None = None) -> int:
    """Explain one model to ``stream`` through the pipeline of ``check``: a worker under the
    per-model budget, the policy with waivers and the selection (``only``/``skip`` replace
    the configuration's, as on ``check``); uncached, so explain writes nothing. Usage errors go to ``errors`` (standard
    error) and return 2; a model that cannot be analysed, or an analysis cut short (not
    decided), returns 1 after showing what there is."""
    from dataclasses import replace

    from plantlint.core.catalogue import load_catalogue
    from plantlint.report.explain import explain_view, render_blocked, render_json, render_text
    from plantlint.run.config import ConfigError, load_config
    from plantlint.run.pipeline import BLOCKING, finish
    from plantlint.run.runner import Target, UsageError, raw_results, read_source

    errors = errors if errors is not None else sys.stderr
    try:
        config = load_config(path.parent, config_file, frozenset(load_catalogue().ids()))
        config = replace(config, **_timeout_change(timeout))
    except ConfigError as exc:
        print(f"plantlint: error: {exc}", file=errors)
        return EXIT_USAGE
    config = replace(config, only=only if only is not None else config.only,
                     skip=skip if skip is not None else config.skip)
    defaults = {r.id: r.severity for r in load_catalogue()}
    try:
        source = read_source(Target(path, str(path)))
    except UsageError as exc:
        print(f"plantlint: error: {exc}", file=errors)
        return EXIT_USAGE
    (raw,) = raw_results([source], config, jobs=1, use_cache=False, cache_dir=None, show_progress=False,
                         explain=True)
    report = finish(str(path), raw, None, config, defaults)
    data = raw.explain
    if data is None:  # not read, blocked by model errors, or stopped before the first stage completed
        if raw.stop is not None:
            render_blocked(str(path), report.sorted_findings(), stream,
                           "plantlint: the analysis was cut short before its first stage completed; nothing to explain")
        else:
            render_blocked(str(path), [f for f in raw.findings if f.rule in BLOCKING] or raw.findings, stream,
                           "plantlint: the model cannot be analysed until these are fixed")
        return EXIT_FINDINGS
    if point is not None and point not in data["point_names"]:
        names = ", ".join(data["point_names"]) or "none"
        print(f"plantlint: error: {path} has no point '{point}' (its points: {names})", file=errors)
        return EXIT_USAGE
    view = explain_view(data, report.findings, point, report.stop)
    if fmt == "json":
        render_json(view, stream)
    else:
        render_text(view, stream, color)
    return EXIT_FINDINGS if report.stop is not None and config.undecided_fail else EXIT_OK


def _merge(args: argparse.Namespace) -> int:
    import json

    from plantlint.core.findings import Severity
    from plantlint.run.runner import read_source, source_text, Target
    from plantlint.run.shard import ShardError, merge_reports

    if args.output is not None and not args.output.strip():
        return _fail("--output needs a value; it was given an empty one")
    named = []
    for name in args.reports:
        try:
            with open(name, "r", encoding="utf-8") as fh:
                named.append((name, json.load(fh)))
        except OSError as exc:
            return _fail(f"{name}: cannot read: {exc.strerror or exc}")
        except ValueError as exc:
            return _fail(f"{name}: not JSON ({exc})")
    try:
        report = merge_reports(named, Severity.parse(args.fail_on) if args.fail_on else None)
    except ShardError as exc:
        return _fail(str(exc))
    for file_report in report.files:  # source lines for the text view, when the checkout has the file
        path = Path(file_report.path)
        if not file_report.deleted and path.is_file():
            file_report.source = source_text(read_source(Target(path, file_report.path)).data)
    return _emit(report, args.format, args.output, args.color)


def _timeout_change(timeout: float | None) -> dict[str, float]:
    """The configuration change that ``--timeout`` asks for (none when not given)."""
    from plantlint.run.config import ConfigError

    if timeout is None:
        return {}
    if not math.isfinite(timeout) or timeout <= 0:
        raise ConfigError("--timeout must be a positive, finite number of seconds")
    return {"timeout": timeout}


def _plot(args: argparse.Namespace) -> int:
    from plantlint.report.plots import INSTALL_HINT, matplotlib_missing

    if matplotlib_missing():
        print(f"plantlint: {INSTALL_HINT}", file=sys.stderr)
        return EXIT_USAGE
    from dataclasses import replace

    from plantlint.core.catalogue import load_catalogue
    from plantlint.core.deadline import LATE, bounded
    from plantlint.report.plots import plot_model
    from plantlint.run.config import ConfigError
    from plantlint.run.runner import UsageError, read_source

    states = [s.strip() for s in args.states.split(",")] if args.states else None
    if states is not None and (len(states) != 2 or not all(states)):
        return _fail("--states needs two state names separated by a comma, e.g. --states th,w")
    try:
        config, targets = _load_config(args.paths, args.config, frozenset(load_catalogue().ids()))
        config = replace(config, **_timeout_change(args.timeout))
    except (ConfigError, UsageError) as exc:
        return _fail(str(exc))
    seconds, why = config.budget()
    out = Path(args.out)
    status = EXIT_OK
    written: set[str] = set()
    for target in targets:
        source = read_source(target)
        if source.data is None:
            print(f"{target.display}: cannot plot: {source.problem.message if source.problem else 'unreadable'}",
                  file=sys.stderr)
            status = EXIT_FINDINGS
            continue
        try:
            outcome = bounded(seconds, lambda: plot_model(
                source.data, args.format, states=states, point=args.point, param=args.param,
                envelope_seconds=config.envelope_seconds, envelope_boxes=config.envelope_boxes))
        except (Exception, RecursionError) as exc:  # a hostile model must not end in a traceback
            print(f"{target.display}: cannot plot: internal error ({type(exc).__name__}); "
                  "`plantlint check` reports what it can", file=sys.stderr)
            status = EXIT_FINDINGS
            continue
        if outcome is LATE:
            print(f"{target.display}: cannot plot: stopped at the budget of {why}; nothing drawn for this model",
                  file=sys.stderr)
            status = EXIT_FINDINGS
            continue
        if outcome.error:
            print(f"{target.display}: cannot plot: {outcome.error}", file=sys.stderr)
            status = EXIT_FINDINGS
        for note in outcome.notes:
            print(f"{target.display}: {note}")
        for name, data in outcome.pictures:
            if name in written:  # two models with one plant name: keep both
                name = f"{Path(target.display).stem}-{name}"
            written.add(name)
            try:
                out.mkdir(parents=True, exist_ok=True)
                (out / name).write_bytes(data)
            except OSError as exc:
                return _cannot_write(str(out / name), exc)
            print(f"{target.display}: wrote {out / name}")
    return status


def run() -> NoReturn:
    """The ``plantlint`` program: :func:`main`, then the process ends at once.

    Once the report is flushed nothing is left to do: every file the run writes (a report,
    the cache, a picture) is closed by then, and the workers are reaped. The interpreter's
    own teardown would spend about 0.2 s of a cold run that imported sympy freeing its
    objects one by one, so it is skipped with ``os._exit``. ``main`` itself returns as
    usual, for callers in the same process (the tests)."""
    code = main()
    try:
        if sys.stdout is not None:  # None: started with standard output closed (`>&-`)
            sys.stdout.flush()
    except BrokenPipeError:  # the reader went away (`| head`): as main() answers it
        pass
    except (OSError, ValueError) as exc:  # a full disk, a closed stdout: the output is incomplete
        if code != EXIT_USAGE:  # (a report that could not be written has said so already)
            code = _cannot_write("standard output", exc)
    try:
        if sys.stderr is not None:
            sys.stderr.flush()
    except (OSError, ValueError):
        pass
    os._exit(code)


if __name__ == "__main__":  # pragma: no cover
    run()

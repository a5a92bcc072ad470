"""Command line: ``sheetlint check|report|derive|extract|rules|schema``.

Imports are kept inside the commands so that a single-file check starts fast.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Callable, Sequence
from typing import Any

from sheetlint import __version__
from sheetlint.compare import command as compare_command

FORMATS = ("text", "json", "sarif")


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="sheetlint",
        description="Check permanent-magnet synchronous machine datasheets for physical "
                    "consistency. Findings are engineering aids, not approvals.")
    parser.add_argument("--version", action="version", version=f"sheetlint {__version__}",
                        help="print the version and exit")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    for register, _run in SUBCOMMANDS.values():
        register(sub)
    return parser


def _add_check(sub: Any) -> None:
    check = sub.add_parser("check", help="check data files (JSON, YAML, PDF) and folders",
                           description="Check machine records and PDF datasheets. Text output "
                                       "shows errors and warnings; --notes adds the infos.")
    check.add_argument("paths", nargs="+", metavar="PATH",
                       help="data files or folders (folders are searched for *.json, *.yaml, "
                            "*.yml)")
    check.add_argument("--format", choices=FORMATS, default="text",
                       help="output format (default: text)")
    check.add_argument("--notes", action="store_true",
                       help="also show info findings and each record's coverage (text format)")
    check.add_argument("--show-derived", action="store_true",
                       help="list derived values with their provenance (text format)")
    check.add_argument("-o", "--output", default=None, metavar="OUT",
                       help="write the report to this file (default: standard output)")
    _batch_options(check)


def _add_report(sub: Any) -> None:
    report = sub.add_parser("report", help="write one self-contained HTML report with plots")
    report.add_argument("paths", nargs="+", metavar="PATH", help="data files or folders")
    report.add_argument("-o", "--output", default=None, metavar="OUT.html",
                        help="write the HTML here (default: standard output)")
    report.add_argument("--title", default=None, help="title of the report")
    _batch_options(report)


def _add_derive(sub: Any) -> None:
    derive = sub.add_parser("derive", help="write the record completed with derived values",
                            description="Write the input record(s) with every derived value "
                                        "added (YAML comments and order kept). `check` reads "
                                        "the result back with the same findings.")
    derive.add_argument("path", metavar="FILE", help="a JSON or YAML data file")
    derive.add_argument("-o", "--output", required=True, metavar="OUT",
                        help="where to write (.yaml/.yml: YAML, else JSON; '-' for standard "
                             "output, in the input's format)")
    derive.add_argument("--include-estimates", action="store_true",
                        help="also write estimates (marked as such)")


def _add_schema(sub: Any) -> None:
    sub.add_parser("schema", help="print the JSON Schema of a data file")


def _add_rules(sub: Any) -> None:
    rules = sub.add_parser("rules", help="list the rules, or print one rule's documentation",
                           description="Without NAME: every rule with its equation, severity "
                                       "policy and source. With NAME: that rule's "
                                       "documentation as plain text.")
    rules.add_argument("name", nargs="?", default=None, metavar="NAME",
                       help="a rule id, e.g. overspeed-emf")
    rules.add_argument("--format", choices=("text", "json"), default="text",
                       help="output format of the list (default: text)")
    rules.add_argument("--status", choices=STATUSES, default=None,
                       help="list only rules of this status")


def _add_extract(sub: Any) -> None:
    extract = sub.add_parser("extract", help="turn the machine tables of a PDF, CSV or XLSX "
                                             "file into records")
    extract.add_argument("path", metavar="FILE", help="a PDF, CSV or XLSX datasheet")
    extract.add_argument("--format", choices=("json", "yaml"), default="json",
                         help="format of the records (default: json)")
    extract.add_argument("-o", "--output", default=None, metavar="OUT",
                         help="write the records here (default: standard output)")
    extract.add_argument("--show-unmapped", action="store_true",
                         help="list table rows that were not mapped to a field (stderr)")


STATUSES = ("established", "trial")


def _batch_options(command: argparse.ArgumentParser) -> None:
    """Options shared by ``check`` and ``report``: rule choice, settings, limits."""
    command.add_argument("--fail-on", choices=("error", "warning", "info"), default=None,
                         help="lowest severity that makes the exit status 1 (default: error)")
    command.add_argument("--only", default=None, metavar="RULES",
                         help="comma-separated rule ids: check only these")
    command.add_argument("--skip", default=None, metavar="RULES",
                         help="comma-separated rule ids: never check these")
    command.add_argument("--exclude", action="append", default=None, metavar="GLOB",
                         help="leave out files matching this glob (repeatable; adds to the "
                              "settings file's exclude)")
    command.add_argument("--settings", default=None, metavar="FILE",
                         help="settings file (default: the first sheetlint.toml, or "
                              "pyproject.toml with [tool.sheetlint], from here upwards)")
    command.add_argument("--no-settings", action="store_true",
                         help="use no settings file (defaults and the command line only)")
    command.add_argument("--no-progress", action="store_true",
                         help="never show progress on stderr (shown only on a terminal)")
    command.add_argument("--jobs", type=int, default=None,
                         help="worker processes (default: only for batches large enough)")
    command.add_argument("--time-limit", type=float, default=None,
                         help="seconds allowed per file (default 30)")
    command.add_argument("--max-file-size", type=int, default=None,
                         help="bytes allowed per file (default 20 MB)")


def main(argv: Sequence[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        return SUBCOMMANDS[args.command][1](args)
    except KeyboardInterrupt:
        print("sheetlint: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except OutputProblem as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2


def _write(text: str, output: str | None) -> None:
    if output:
        try:
            with open(output, "w", encoding="utf-8") as handle:
                handle.write(text + "\n")
        except OSError as exc:
            raise OutputProblem(f"cannot write {output} ({exc.strerror or exc})") from None
    else:
        sys.stdout.write(text + "\n")


class OutputProblem(Exception):
    """The report cannot be written where asked; exit status 2 with the message."""


def _check_batch(args: argparse.Namespace, render: Any = None, progress: bool = True,
                 locate_info: bool = True) -> tuple[Any, str] | int:
    """Resolve the configuration and check every path (an iterator of results, or of
    ``render``'s parts); exit status 2 on a bad configuration."""
    from sheetlint.batch import check_paths
    from sheetlint.config import ConfigError, resolve, split_rule_list

    try:
        resolved = resolve(config=args.settings, use_config=not args.no_settings,
                           only=split_rule_list(args.only), skip=split_rule_list(args.skip),
                           fail_on=args.fail_on, exclude=args.exclude)
    except ConfigError as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    for warning in resolved.warnings:
        print(f"sheetlint: warning: {warning}", file=sys.stderr)
    import dataclasses

    # coverage is shown in JSON and with --notes only: spare its cost elsewhere; info lines
    # are looked up only when the report shows infos
    settings = dataclasses.replace(
        resolved.settings,
        coverage=getattr(args, "format", None) == "json" or getattr(args, "notes", False),
        locate_info=locate_info)
    results_iter = check_paths(args.paths, settings, jobs=args.jobs,
                               time_limit=args.time_limit, max_bytes=args.max_file_size,
                               exclude=resolved.exclude, render=render)
    if progress and not args.no_progress:
        from sheetlint.progress import file_label, with_progress

        results_iter = with_progress(
            results_iter, total=lambda: _count_files(args.paths, resolved.exclude),
            label=file_label)
    return results_iter, resolved.fail_on


def _count_files(paths: list[str], exclude: tuple[str, ...] = ()) -> int:
    from sheetlint.batch import collect_files

    files, missing = collect_files(paths, exclude)
    return len(files) + len(missing)


def _report_read_errors(results: list[Any]) -> None:
    for f in results:
        if f.error:
            print(f"sheetlint: {f.error}", file=sys.stderr)
        for r in f.records:
            if r.error:
                print(f"sheetlint: {r.error}", file=sys.stderr)


def cmd_check(args: argparse.Namespace) -> int:
    from sheetlint.report import ReportWriter

    if args.format == "json":
        from sheetlint.report.json_report import JsonReport

        report: Any = JsonReport()
    elif args.format == "sarif":
        from sheetlint.report.sarif import SarifReport

        report = SarifReport()
    else:
        from sheetlint.report.text_stream import TextReport

        report = TextReport(notes=args.notes, show_derived=args.show_derived)
    # results stream to the output as files finish; on a terminal they are the progress
    progress = bool(args.output) or not _is_terminal(sys.stdout)
    outcome = _check_batch(args, render=report.part, progress=progress,
                           locate_info=args.format != "text" or args.notes)
    if isinstance(outcome, int):
        return outcome
    parts, fail_on = outcome
    # the first part before the output file is opened: the folder walk has then run, so a
    # new report file inside a checked folder is not read as data while being written
    import itertools

    first = list(itertools.islice(parts, 1))
    parts = itertools.chain(first, parts)
    try:
        stream = open(args.output, "w", encoding="utf-8") if args.output else sys.stdout
    except OSError as exc:
        raise OutputProblem(f"cannot write {args.output} ({exc.strerror or exc})") from None
    try:
        writer = ReportWriter(report, stream)
        writer.start()
        for part in parts:
            writer.add(part)
        tally = writer.finish()
    except OSError as exc:
        if isinstance(exc, BrokenPipeError):
            raise
        raise OutputProblem(f"cannot write {args.output or 'the report'} "
                            f"({exc.strerror or exc})") from None
    finally:
        if stream is not sys.stdout:
            stream.close()
    for message in writer.messages:
        print(f"sheetlint: {message}", file=sys.stderr)
    return tally.exit_status(fail_on)


def _is_terminal(stream: Any) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError, OSError):
        return False


def cmd_report(args: argparse.Namespace) -> int:
    from sheetlint.batch import exit_status

    outcome = _check_batch(args)
    if isinstance(outcome, int):
        return outcome
    results_iter, fail_on = outcome
    results = list(results_iter)
    from sheetlint.report import html

    _write(html.render(results, title=args.title), args.output)
    _report_read_errors(results)
    return exit_status(results, fail_on)


def cmd_derive(args: argparse.Namespace) -> int:
    import os

    from sheetlint.completion import completed_document
    from sheetlint.intake.records import InputProblem

    to_stdout = args.output == "-"
    if not to_stdout and os.path.abspath(args.output) == os.path.abspath(args.path):
        print("sheetlint: derive never overwrites its input; choose another -o", file=sys.stderr)
        return 2
    yaml_out = None if to_stdout else args.output.lower().endswith((".yaml", ".yml"))
    try:
        text, errors = completed_document(args.path, args.include_estimates, yaml_out=yaml_out)
    except InputProblem as exc:  # a message, never a traceback
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    _write(text, None if to_stdout else args.output)
    for message in errors:
        print(f"sheetlint: {message}", file=sys.stderr)
    return 2 if errors else 0


def cmd_schema(args: argparse.Namespace) -> int:
    from sheetlint.model import file_json_schema

    _write(json.dumps(file_json_schema(), indent=2, ensure_ascii=False), None)
    return 0


def cmd_rules(args: argparse.Namespace) -> int:
    from sheetlint.rules_doc import rule_text, rules_payload, rules_table

    if args.name is not None:
        text = rule_text(args.name)
        if text is None:
            from sheetlint.relations.registry import rule_ids

            print(f"sheetlint: unknown rule '{args.name}'; known rules: "
                  f"{', '.join(rule_ids())}", file=sys.stderr)
            return 2
        _write(text, None)
        return 0
    if args.format == "json":
        _write(json.dumps(rules_payload(args.status), indent=2, ensure_ascii=False), None)
    else:
        _write(rules_table(args.status), None)
    return 0


def cmd_extract(args: argparse.Namespace) -> int:
    from sheetlint.intake.pdf import dump_records, location_text
    from sheetlint.intake.pdf_records import extract_document
    from sheetlint.intake.records import InputProblem

    try:
        extraction = extract_document(args.path)
    except InputProblem as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    _write(dump_records(extraction, args.format), args.output)
    for note in extraction.notes:
        print(f"sheetlint: {args.path}: {note}", file=sys.stderr)
    if args.show_unmapped:
        for row in extraction.unmapped:
            print(f"unmapped: {args.path} {location_text(row)}: {row.get('label')!s} = "
                  f"{row.get('value')!s}", file=sys.stderr)
    return 0 if extraction.records else 2


def _add_commission(sub: Any) -> None:
    from sheetlint.commission.command import add_parser

    add_parser(sub)


def _run_commission(args: argparse.Namespace) -> int:
    from sheetlint.commission.command import run

    return run(args)


#: every subcommand: name -> (registers its parser, runs it). A new subcommand adds one line
#: here and its two functions.
SUBCOMMANDS: dict[str, tuple[Callable[[Any], None], Callable[[argparse.Namespace], int]]] = {
    "check": (_add_check, cmd_check),
    "report": (_add_report, cmd_report),
    "derive": (_add_derive, cmd_derive),
    "extract": (_add_extract, cmd_extract),
    "rules": (_add_rules, cmd_rules),
    "schema": (_add_schema, cmd_schema),
    "compare": (compare_command.add_parser, compare_command.run),
    "commission": (_add_commission, _run_commission),
}


if __name__ == "__main__":
    sys.exit(main())

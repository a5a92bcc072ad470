"""Command line: ``sheetlint check|report|derive|schema|rules|explain|extract``.

Imports are kept inside the commands so that a single-file check starts fast.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence
from typing import Any

from sheetlint import __version__

FORMATS = ("text", "json", "sarif")


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="sheetlint",
        description="Check permanent-magnet synchronous machine datasheets for physical "
                    "consistency.")
    parser.add_argument("--version", action="version", version=f"sheetlint {__version__}")
    sub = parser.add_subparsers(dest="command", required=True)

    check = sub.add_parser("check", help="check data files (JSON, YAML, PDF) and folders")
    check.add_argument("paths", nargs="+", metavar="PATH")
    check.add_argument("--format", choices=FORMATS, default="text")
    check.add_argument("--show-derived", action="store_true",
                       help="list derived values with their provenance (text format)")
    check.add_argument("--quiet", action="store_true", help="hide info findings (text format)")
    check.add_argument("-o", "--output", default=None, help="write the report to this file")
    _batch_options(check)

    report = sub.add_parser("report", help="write one self-contained HTML report with plots")
    report.add_argument("paths", nargs="+", metavar="PATH")
    report.add_argument("-o", "--output", default=None, metavar="OUT.html",
                        help="write the HTML here (default: standard output)")
    report.add_argument("--title", default=None, help="title of the report")
    _batch_options(report)

    derive = sub.add_parser("derive", help="write the record completed with derived values")
    derive.add_argument("path", metavar="FILE")
    derive.add_argument("-o", "--output", required=True, metavar="OUT")
    derive.add_argument("--include-estimates", action="store_true",
                        help="also write estimates (marked as such)")

    sub.add_parser("schema", help="print the JSON Schema of a data file")
    rules = sub.add_parser("rules",
                           help="list every rule with its equation, severity policy and source")
    rules.add_argument("--format", choices=("text", "json"), default="text")
    rules.add_argument("--status", choices=("stable", "preview"), default=None,
                       help="list only rules of this status")
    explain = sub.add_parser("explain", help="print a rule's documentation")
    explain.add_argument("rule")

    extract = sub.add_parser("extract", help="turn the machine tables of a PDF, CSV or XLSX "
                                             "file into records")
    extract.add_argument("path", metavar="FILE")
    extract.add_argument("--format", choices=("json", "yaml"), default="json")
    extract.add_argument("-o", "--output", default=None)
    extract.add_argument("--show-unmapped", action="store_true",
                         help="list table rows that were not mapped to a field (stderr)")
    return parser


def _batch_options(command: argparse.ArgumentParser) -> None:
    """Options shared by ``check`` and ``report``: rule choice, configuration, limits."""
    command.add_argument("--fail-on", choices=("error", "warning", "info"), default=None,
                         help="lowest severity that makes the exit status 1 (default: error)")
    command.add_argument("--select", default=None, help="comma-separated rule ids to run")
    command.add_argument("--ignore", default=None, help="comma-separated rule ids to skip")
    command.add_argument("--config", default=None, metavar="FILE",
                         help="configuration file (default: the first sheetlint.toml, or "
                              "pyproject.toml with [tool.sheetlint], from here upwards)")
    command.add_argument("--no-config", action="store_true",
                         help="ignore configuration files")
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
        return COMMANDS[args.command](args)
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


def _check_batch(args: argparse.Namespace) -> tuple[list[Any], str] | int:
    """Resolve the configuration and check every path; exit status 2 on a bad configuration."""
    from sheetlint.batch import check_paths
    from sheetlint.config import ConfigError, resolve, split_rule_list

    try:
        resolved = resolve(config=args.config, use_config=not args.no_config,
                           select=split_rule_list(args.select),
                           ignore=split_rule_list(args.ignore), fail_on=args.fail_on)
    except ConfigError as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    for warning in resolved.warnings:
        print(f"sheetlint: warning: {warning}", file=sys.stderr)
    results_iter = check_paths(args.paths, resolved.settings, jobs=args.jobs,
                               time_limit=args.time_limit, max_bytes=args.max_file_size)
    if not args.no_progress:
        from sheetlint.progress import file_label, with_progress

        results_iter = with_progress(results_iter, total=lambda: _count_files(args.paths),
                                     label=file_label)
    return list(results_iter), resolved.fail_on


def _count_files(paths: list[str]) -> int:
    from sheetlint.batch import collect_files

    files, missing = collect_files(paths)
    return len(files) + len(missing)


def _report_read_errors(results: list[Any]) -> None:
    for f in results:
        if f.error:
            print(f"sheetlint: {f.error}", file=sys.stderr)
        for r in f.records:
            if r.error:
                print(f"sheetlint: {r.error}", file=sys.stderr)


def cmd_check(args: argparse.Namespace) -> int:
    from sheetlint.batch import exit_status

    outcome = _check_batch(args)
    if isinstance(outcome, int):
        return outcome
    results, fail_on = outcome
    if args.format == "json":
        from sheetlint.report import json_report

        _write(json_report.render(results), args.output)
    elif args.format == "sarif":
        from sheetlint.report import sarif

        _write(sarif.render(results), args.output)
    else:
        from sheetlint.report import text

        _write(text.render(results, show_info=not args.quiet,
                           show_derived=args.show_derived), args.output)
    _report_read_errors(results)
    return exit_status(results, fail_on)


def cmd_report(args: argparse.Namespace) -> int:
    from sheetlint.batch import exit_status

    outcome = _check_batch(args)
    if isinstance(outcome, int):
        return outcome
    results, fail_on = outcome
    from sheetlint.report import html

    _write(html.render(results, title=args.title), args.output)
    _report_read_errors(results)
    return exit_status(results, fail_on)


def cmd_derive(args: argparse.Namespace) -> int:
    import os

    from sheetlint.completion import completed_document

    if os.path.abspath(args.output) == os.path.abspath(args.path):
        print("sheetlint: derive never overwrites its input; choose another -o", file=sys.stderr)
        return 2
    try:
        text, errors = completed_document(args.path, args.include_estimates,
                                          yaml_out=args.output.lower().endswith((".yaml",
                                                                                 ".yml")))
    except Exception as exc:  # InputProblem and friends: a message, never a traceback
        from sheetlint.intake.records import InputProblem

        if not isinstance(exc, InputProblem):
            raise
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    _write(text, args.output)
    for message in errors:
        print(f"sheetlint: {message}", file=sys.stderr)
    return 2 if errors else 0


def cmd_schema(args: argparse.Namespace) -> int:
    from sheetlint.model import file_json_schema

    _write(json.dumps(file_json_schema(), indent=2, ensure_ascii=False), None)
    return 0


def cmd_rules(args: argparse.Namespace) -> int:
    from sheetlint.rules_doc import rules_payload, rules_table

    if args.format == "json":
        _write(json.dumps(rules_payload(args.status), indent=2, ensure_ascii=False), None)
    else:
        _write(rules_table(args.status), None)
    return 0


def cmd_explain(args: argparse.Namespace) -> int:
    from sheetlint.rules_doc import explain

    text = explain(args.rule)
    if text is None:
        from sheetlint.relations.registry import rule_ids

        print(f"sheetlint: unknown rule '{args.rule}'; known rules: {', '.join(rule_ids())}",
              file=sys.stderr)
        return 2
    _write(text, None)
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


COMMANDS = {
    "check": cmd_check,
    "report": cmd_report,
    "derive": cmd_derive,
    "schema": cmd_schema,
    "rules": cmd_rules,
    "explain": cmd_explain,
    "extract": cmd_extract,
}


if __name__ == "__main__":
    sys.exit(main())

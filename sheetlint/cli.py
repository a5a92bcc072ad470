"""Command line: ``sheetlint check|derive|schema|rules|explain|extract``.

Imports are kept inside the commands so that a single-file check starts fast.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence

from sheetlint import __version__

FORMATS = ("text", "json")


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
    check.add_argument("--fail-on", choices=("error", "warning", "info"), default=None,
                       help="lowest severity that makes the exit status 1 (default: error)")
    check.add_argument("--show-derived", action="store_true",
                       help="list derived values with their provenance (text format)")
    check.add_argument("--quiet", action="store_true", help="hide info findings (text format)")
    check.add_argument("--select", default=None, help="comma-separated rule ids to run")
    check.add_argument("--ignore", default=None, help="comma-separated rule ids to skip")
    check.add_argument("-o", "--output", default=None, help="write the report to this file")
    check.add_argument("--jobs", type=int, default=None,
                       help="worker processes (default: only for batches large enough)")
    check.add_argument("--time-limit", type=float, default=None,
                       help="seconds allowed per file (default 30)")
    check.add_argument("--max-file-size", type=int, default=None,
                       help="bytes allowed per file (default 20 MB)")

    derive = sub.add_parser("derive", help="write the record completed with derived values")
    derive.add_argument("path", metavar="FILE")
    derive.add_argument("-o", "--output", required=True, metavar="OUT")
    derive.add_argument("--include-estimates", action="store_true",
                        help="also write estimates (marked as such)")

    sub.add_parser("schema", help="print the JSON Schema of a data file")
    sub.add_parser("rules", help="list every rule with its equation, severity policy and source")
    explain = sub.add_parser("explain", help="print a rule's documentation")
    explain.add_argument("rule")

    extract = sub.add_parser("extract", help="turn the machine tables of a PDF into records")
    extract.add_argument("path", metavar="FILE.pdf")
    extract.add_argument("--format", choices=("json", "yaml"), default="json")
    extract.add_argument("-o", "--output", default=None)
    extract.add_argument("--show-unmapped", action="store_true",
                         help="list table rows that were not mapped to a field (stderr)")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        return COMMANDS[args.command](args)
    except KeyboardInterrupt:
        print("sheetlint: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0


def _split(text: str | None) -> frozenset[str] | None:
    if not text:
        return None
    return frozenset(t.strip() for t in text.split(",") if t.strip())


def _write(text: str, output: str | None) -> None:
    if output:
        with open(output, "w", encoding="utf-8") as handle:
            handle.write(text + "\n")
    else:
        sys.stdout.write(text + "\n")


def cmd_check(args: argparse.Namespace) -> int:
    from sheetlint.batch import check_paths, exit_status
    from sheetlint.engine.core import Settings

    settings = Settings(select=_split(args.select), ignore=_split(args.ignore) or frozenset())
    results = list(check_paths(args.paths, settings, jobs=args.jobs,
                               time_limit=args.time_limit, max_bytes=args.max_file_size))
    if args.format == "json":
        from sheetlint.report import json_report

        _write(json_report.render(results), args.output)
    else:
        from sheetlint.report import text

        _write(text.render(results, show_info=not args.quiet,
                           show_derived=args.show_derived), args.output)
    for f in results:
        if f.error:
            print(f"sheetlint: {f.error}", file=sys.stderr)
        for r in f.records:
            if r.error:
                print(f"sheetlint: {r.error}", file=sys.stderr)
    return exit_status(results, args.fail_on or "error")


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
    from sheetlint.rules_doc import rules_table

    _write(rules_table(), None)
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
    from sheetlint.intake.pdf import PdfError, dump_records, extract_pdf

    try:
        extraction = extract_pdf(args.path)
    except PdfError as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    _write(dump_records(extraction, args.format), args.output)
    for note in extraction.notes:
        print(f"sheetlint: {args.path}: {note}", file=sys.stderr)
    if args.show_unmapped:
        for row in extraction.unmapped:
            print(f"unmapped: {args.path} p.{row.get('page')}: {row.get('label')!s} = "
                  f"{row.get('value')!s}", file=sys.stderr)
    return 0 if extraction.records else 2


COMMANDS = {
    "check": cmd_check,
    "derive": cmd_derive,
    "schema": cmd_schema,
    "rules": cmd_rules,
    "explain": cmd_explain,
    "extract": cmd_extract,
}


if __name__ == "__main__":
    sys.exit(main())

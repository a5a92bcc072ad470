"""The ``compare`` subcommand: its options and its run function.

``sheetlint compare OFFER... [--requirement FILE] [--format text|json|csv|xlsx|html] [-o OUT]``;
``sheetlint compare --requirement-schema`` prints the requirement's JSON Schema.
Exit status: 2 when the requirement or any offer cannot be read (the other offers are still
compared and reported), else 0.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any

FORMATS = ("text", "json", "csv", "xlsx", "html")


def add_parser(subparsers: Any) -> argparse.ArgumentParser:
    """Register ``compare`` on the main parser's subparsers."""
    parser = subparsers.add_parser(
        "compare", help="put offers side by side against a purchase requirement")
    parser.add_argument("offers", nargs="*", metavar="OFFER",
                        help="offer files (records, PDFs, spreadsheets)")
    parser.add_argument("--requirement", default=None, metavar="FILE",
                        help="purchase requirement (YAML or JSON)")
    parser.add_argument("--format", choices=FORMATS, default="text",
                        help="output format (default: text; xlsx needs -o)")
    parser.add_argument("-o", "--output", default=None, metavar="OUT",
                        help="write here (needed for xlsx; default: standard output)")
    parser.add_argument("--rank-by", default=None, metavar="FIGURE",
                        help="figure that orders offers of equal verdict, lower first "
                             "(default duty[0].losses; e.g. machine.mass, duty[1].current); "
                             "append ':desc' for higher first (rated.efficiency:desc)")
    parser.add_argument("--no-letters", action="store_true",
                        help="text format: leave out the questions letters")
    parser.add_argument("--requirement-schema", action="store_true",
                        help="print the JSON Schema of a requirement file and exit")
    parser.set_defaults(func=run)
    return parser


def _fail(message: str) -> int:
    print(f"sheetlint: {message}", file=sys.stderr)
    return 2


def run(args: argparse.Namespace) -> int:
    """Run ``compare``; never raises for bad input."""
    from sheetlint.compare.requirement import (
        RequirementProblem,
        read_requirement,
        requirement_json_schema,
    )

    if args.requirement_schema:
        sys.stdout.write(json.dumps(requirement_json_schema(), indent=2, ensure_ascii=False)
                         + "\n")
        return 0
    if not args.offers:
        return _fail("compare: name at least one offer file")
    if args.format == "xlsx" and not args.output:
        return _fail("compare: --format xlsx needs -o FILE.xlsx")
    requirement = None
    if args.requirement:
        try:
            requirement = read_requirement(args.requirement)
        except RequirementProblem as exc:
            return _fail(str(exc))
    from sheetlint.compare.offers import compare_offers
    from sheetlint.compare.verdict import DEFAULT_RANK_FIGURE

    figure, descending = args.rank_by or DEFAULT_RANK_FIGURE, False
    if figure.endswith(":desc"):
        figure, descending = figure.removesuffix(":desc"), True
    elif figure.endswith(":asc"):
        figure = figure.removesuffix(":asc")
    comparison = compare_offers(list(args.offers), requirement, rank_figure=figure,
                                descending=descending)
    try:
        _write(comparison, args.format, args.output, not args.no_letters)
    except OSError as exc:
        return _fail(f"cannot write {args.output} ({exc.strerror or exc})")
    for message in comparison.errors:
        print(f"sheetlint: {message}", file=sys.stderr)
    return 2 if comparison.errors else 0


def _write(comparison: Any, fmt: str, output: str | None, letters: bool) -> None:
    from sheetlint.compare import formats

    if fmt == "xlsx":
        assert output is not None
        with open(output, "wb") as handle:
            handle.write(formats.render_xlsx(comparison))
        return
    if fmt == "json":
        text = formats.render_json(comparison)
    elif fmt == "csv":
        text = formats.render_csv(comparison)
    elif fmt == "html":
        from sheetlint.compare.html import render_html

        text = render_html(comparison)
    else:
        text = formats.render_text(comparison, letters)
    if output:
        with open(output, "w", encoding="utf-8", newline="") as handle:
            handle.write(text + "\n")
    else:
        sys.stdout.write(text + "\n")

"""``sheetlint commission RECORD [--measured FILE] [--format text|json|csv]``.

The parser setup and the run function live here; :mod:`sheetlint.cli` only registers them.
Exit status: 2 when the record or the measured file cannot be read (or the measured file is
for another machine); 1 when the identification results raise an error; else 0.
"""

from __future__ import annotations

import argparse
import sys
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from .report import CommissionResult

# the rest is imported inside the functions: registering the parser must cost the start-up
# of every other command nothing

FORMATS = ("text", "json", "csv")


class CommissionProblem(Exception):
    """Input that cannot be used; the message names the file and field (exit status 2)."""


def add_parser(subparsers: Any) -> argparse.ArgumentParser:
    parser = subparsers.add_parser(
        "commission", help="a drive's motor-data parameter set, and identification results "
                           "checked against the sheet")
    parser.add_argument("path", metavar="RECORD", help="the machine's record (JSON or YAML)")
    parser.add_argument("--measured", default=None, metavar="FILE",
                        help="identification results to check against the sheet")
    parser.add_argument("--id", default=None, dest="record_id",
                        help="the record to use when the file holds several")
    parser.add_argument("--format", choices=FORMATS, default="text",
                        help="output format (default: text)")
    parser.add_argument("--test-speed", type=float, default=None, metavar="RPM",
                        help="speed of the back-EMF the identification should find "
                             "(default: the measured file's, else the rated speed)")
    parser.add_argument("--test-temperature", type=float, default=None, metavar="DEGC",
                        help="winding and magnet temperature of the expected values "
                             "(default: the measured file's, else 20 °C)")
    parser.add_argument("-o", "--output", default=None, help="write the result to this file")
    parser.set_defaults(handler=run)
    return parser


def commission(path: str, measured_path: str | None = None, record_id: str | None = None,
               test_speed: float | None = None, test_temperature: float | None = None
               ) -> CommissionResult:
    """The commissioning result of one record. Raises :class:`CommissionProblem`."""
    from sheetlint.engine.run import check_record
    from sheetlint.intake.records import InputProblem, load_records

    from .checklist import checklist
    from .identification import identification
    from .measured import MeasuredFileProblem, read_measured_file
    from .parameters import parameter_set, with_doubts
    from .report import CommissionResult

    try:
        loaded = load_records(path)
    except InputProblem as exc:
        raise CommissionProblem(str(exc)) from None
    measured = None
    if measured_path is not None:
        try:
            measured = read_measured_file(measured_path)
        except MeasuredFileProblem as exc:
            raise CommissionProblem(str(exc)) from None
    wanted = record_id or (measured.machine if measured is not None else None)
    records = loaded.records
    if wanted is not None:
        records = [r for r in records if isinstance(r.data, dict)
                   and str(r.data.get("id")) == wanted]
        if not records:
            ids = ", ".join(str(r.data.get("id")) for r in loaded.records
                            if isinstance(r.data, dict))
            source = (f"{measured_path}: machine" if measured is not None and not record_id
                      else "--id")
            raise CommissionProblem(f"{source}: '{wanted}' does not match the record id of "
                                    f"{path} ({ids or 'none'})")
    if len(records) != 1:
        raise CommissionProblem(f"{path}: holds {len(records)} records; choose one with --id")
    result = check_record(records[0])
    if result.error or result.sheet is None:
        raise CommissionProblem(f"{path}: {result.id}: {result.error}")
    if measured is not None and measured.machine != result.id:
        raise CommissionProblem(f"{measured_path}: machine: '{measured.machine}' does not match "
                                f"the record id '{result.id}' of {path}")
    parameters = with_doubts(parameter_set(result.sheet), result.findings, result.sheet)
    return CommissionResult(
        path, result.id, parameters, checklist(result.findings, parameters),
        identification(result.sheet, measured, test_temperature, test_speed), result.findings)


def run(args: argparse.Namespace) -> int:
    from .report import render_csv, render_json, render_text

    try:
        result = commission(args.path, args.measured, args.record_id, args.test_speed,
                            args.test_temperature)
    except CommissionProblem as exc:
        print(f"sheetlint: {exc}", file=sys.stderr)
        return 2
    render = {"json": render_json, "csv": render_csv, "text": render_text}[args.format]
    text = render(result)
    if args.output:
        try:
            with open(args.output, "w", encoding="utf-8", newline="") as handle:
                handle.write(text if text.endswith("\n") else text + "\n")
        except OSError as exc:
            print(f"sheetlint: cannot write {args.output} ({exc.strerror or exc})",
                  file=sys.stderr)
            return 2
    else:
        sys.stdout.write(text if text.endswith("\n") else text + "\n")
    return 1 if any(f.severity == "error" for f in result.identification.findings) else 0


def main(argv: list[str] | None = None) -> int:
    """Run the command on its own (``python -m sheetlint.commission.command``)."""
    parser = argparse.ArgumentParser(prog="sheetlint")
    add_parser(parser.add_subparsers(dest="command", required=True))
    args = parser.parse_args(["commission", *(sys.argv[1:] if argv is None else argv)])
    return run(args)


if __name__ == "__main__":
    sys.exit(main())

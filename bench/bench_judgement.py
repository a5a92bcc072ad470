"""How sheetlint judges realistic catalogue sheets: false alarms per convention, catches per slip.

Generates N consistent sheets per convention and N sheets per planted slip with
``tools/realistic_catalogue.py`` (written apart from the engine), writes each as a YAML file
into a temporary folder, checks each folder with sheetlint's command line
(``sheetlint check --format json --no-settings``, read through DESIGN.md's JSON output
contract) and prints:

- per convention: % of consistent records with an error, with a warning, and the rules that
  fired most (records in which a rule gave a warning or error);
- per slip: % flagged (a warning or error), % whose warning/error findings list the corrupted
  field, % whose first listed field is it, % that name the slip's keyword in a cause or
  message, and the same in a ``cause`` alone.

Targets (issues 15 and 16): consistent → no error, warnings on ≤ 1 %; planted → ≥ 97 % flagged,
corrupted field listed ≥ 92 %, keyword named ≥ 80 % of the known slips. The script prints
figures and asserts nothing.

    .venv/bin/python bench/bench_judgement.py [N] [--examples FILE] [--keep DIR]
        [--only conventions|slips] [--first-seed K]
"""

from __future__ import annotations

import argparse
import re
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path
from typing import Any

import yaml

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from tools.realistic_catalogue import (
    CONVENTIONS,
    SLIP_BY_NAME,
    SLIPS,
    Sheet,
    check_with_sheetlint,
    consistent,
    planted,
    write_sheets,
)

#: names a finding may use for a field of the data contract (derived readings of one field)
FIELD_ALIASES = {"machine.poles": ("machine.pole_pairs",)}
LOUD = ("error", "warning")


def names_field(finding_field: str, corrupted: tuple[str, ...]) -> bool:
    """Whether a finding's field is one of the corrupted fields (or a hot/cold reading of it)."""
    for target in corrupted:
        if finding_field == target or finding_field in FIELD_ALIASES.get(target, ()):
            return True
        if re.fullmatch(re.escape(target) + r"_(hot|cold)", finding_field):
            return True
    return False


def run(sheets: list[Sheet], folder: Path) -> list[dict[str, Any]]:
    """Check every sheet (one file each) with the command line; results in the same order."""
    paths = write_sheets([sheet.record for sheet in sheets], folder)
    results = check_with_sheetlint(folder)
    return [results.get(path.name, {"error": "missing from the output", "findings": []})
            for path in paths]


def loud(record: dict[str, Any]) -> list[dict[str, Any]]:
    return [f for f in record.get("findings", []) if f["severity"] in LOUD]


def convention_table(count: int, folder: Path, examples: dict[str, Any],
                     first_seed: int = 0) -> list[str]:
    lines = [f"{'convention':28} {'n':>5} {'error%':>7} {'warn%':>7} {'unread':>6}  "
             "most frequent loud rules (records)"]
    by_topology: dict[str, dict[str, Any]] = {}
    for convention in CONVENTIONS:
        sheets = [consistent(convention, seed)
                  for seed in range(first_seed, first_seed + count)]
        sub = folder / convention
        records = run(sheets, sub)
        errors = sum(any(f["severity"] == "error" for f in r["findings"]) for r in records)
        warnings = sum(any(f["severity"] == "warning" for f in r["findings"]) for r in records)
        unread = sum(bool(r.get("error")) for r in records)
        rules: Counter[str] = Counter()
        for sheet, record in zip(sheets, records, strict=True):
            fired = {f"{f['rule']}:{f['severity'][0]}" for f in loud(record)}
            rules.update(fired)
            for key in fired:
                slot = examples.setdefault(convention, {})
                if key not in slot:
                    finding = next(f for f in loud(record)
                                   if f"{f['rule']}:{f['severity'][0]}" == key)
                    slot[key] = {"record": sheet.record, "finding": {
                        k: finding.get(k) for k in ("rule", "severity", "message", "fields",
                                                    "cause", "deviation")}}
        top = ", ".join(f"{k} {100 * v / count:.0f}%" for k, v in rules.most_common(6))
        lines.append(f"{convention:28} {count:5d} {100 * errors / count:7.1f} "
                     f"{100 * warnings / count:7.1f} {unread:6d}  {top}")
        for sheet, record in zip(sheets, records, strict=True):
            tally = by_topology.setdefault(sheet.machine.topology,
                                           {"n": 0, "error": 0, "warning": 0, "rules": Counter()})
            tally["n"] += 1
            tally["error"] += any(f["severity"] == "error" for f in record["findings"])
            tally["warning"] += any(f["severity"] == "warning" for f in record["findings"])
            tally["rules"].update({f"{f['rule']}:{f['severity'][0]}" for f in loud(record)})
    lines.append("")
    lines.append("The same consistent sheets by topology (all conventions together):")
    for topology, tally in sorted(by_topology.items()):
        n = tally["n"]
        top = ", ".join(f"{k} {100 * v / n:.0f}%" for k, v in tally["rules"].most_common(4))
        lines.append(f"{topology:28} {n:5d} {100 * tally['error'] / n:7.1f} "
                     f"{100 * tally['warning'] / n:7.1f} {'':6}  {top}")
    return lines


def slip_table(count: int, folder: Path, examples: dict[str, Any],
               keep: bool = False, first_seed: int = 0) -> list[str]:
    lines = [f"{'slip':20} {'n':>5} {'flag%':>6} {'new%':>6} {'err%':>6} {'field%':>7} "
             f"{'first%':>7} {'kw%':>6} {'kwcause%':>8}  most frequent loud rules"]
    for slip in SLIPS:
        sheets = [planted(slip.name, seed) for seed in range(first_seed, first_seed + count)]
        sub = folder / slip.name
        records = run(sheets, sub)
        twins_folder = folder / f"{slip.name}-twins"
        twins = run([Sheet(s.consistent_record or {}, "twin", s.machine, s.rated)
                     for s in sheets], twins_folder)
        flagged = new = listed = first = keyword = keyword_cause = errors = 0
        rules: Counter[str] = Counter()
        missed_example = None
        for sheet, record, twin in zip(sheets, records, twins, strict=True):
            findings = loud(record)
            twin_keys = {(f["rule"], f["severity"]) for f in loud(twin)}
            new += any((f["rule"], f["severity"]) not in twin_keys for f in findings)
            rules.update({f"{f['rule']}:{f['severity'][0]}" for f in findings})
            if findings:
                flagged += 1
            elif missed_example is None:
                missed_example = {"record": sheet.record,
                                  "infos": [f["message"] for f in record.get("findings", [])]}
            errors += any(f["severity"] == "error" for f in findings)
            listed += any(names_field(x, sheet.corrupted_fields)
                          for f in findings for x in f["fields"])
            first += any(f["fields"] and names_field(f["fields"][0], sheet.corrupted_fields)
                         for f in findings)
            if slip.keyword:
                pattern = re.compile(slip.keyword, re.IGNORECASE)
                keyword += any(pattern.search(f.get("cause") or "")
                               or pattern.search(f.get("message") or "") for f in findings)
                keyword_cause += any(pattern.search(f.get("cause") or "") for f in findings)
        if missed_example is not None:
            examples.setdefault("missed slips", {})[slip.name] = missed_example
        examples.setdefault("slip examples", {})[slip.name] = {
            "corrupted": list(sheets[0].corrupted_fields), "record": sheets[0].record,
            "loud": [{k: f.get(k) for k in ("rule", "severity", "fields", "cause", "message")}
                     for f in loud(records[0])]}
        if keep:
            manifest = {f"{index:05d}.yaml": {"slip": slip.name,
                                              "fields": list(sheet.corrupted_fields),
                                              "keyword": slip.keyword}
                        for index, sheet in enumerate(sheets)}
            (folder / f"{slip.name}-manifest.yaml").write_text(
                yaml.safe_dump(manifest, allow_unicode=True), encoding="utf-8")

        def pct(value: int) -> str:
            return f"{100 * value / count:.1f}"

        kw = pct(keyword) if slip.keyword else "n/a"
        kwc = pct(keyword_cause) if slip.keyword else "n/a"
        top = ", ".join(f"{k} {100 * v / count:.0f}%" for k, v in rules.most_common(4))
        lines.append(f"{slip.name:20} {count:5d} {pct(flagged):>6} {pct(new):>6} {pct(errors):>6} "
                     f"{pct(listed):>7} {pct(first):>7} {kw:>6} {kwc:>8}  {top}")
    return lines


def servo_table(folder: Path) -> list[str]:
    """Issue 21: the servo catalogue family of tools/make_servo_fixtures.py (its own generator:
    2–3 significant digits, R and L terminal to terminal, Kt at 20 °C, standstill point,
    no-load speed at a stated DC supply), consistent and with each servo slip planted."""
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tools"))
    from make_servo_fixtures import MOTORS, planted, record

    sub = folder / "servo-family"
    sub.mkdir(parents=True, exist_ok=True)
    for i, motor in enumerate(MOTORS):
        (sub / f"consistent-{i}.yaml").write_text(yaml.safe_dump(record(motor)), encoding="utf-8")
    expected: dict[str, tuple[str, str]] = {}
    for name, (comment, data) in planted().items():
        (sub / name).write_text(yaml.safe_dump(data, allow_unicode=True), encoding="utf-8")
        match = re.search(r"on (\S+), (.+)$", comment)
        if match:
            keyword = match[2].replace(" rather than rms", "").replace("×", "")
            expected[name] = (match[1], keyword)
    results = check_with_sheetlint(sub)
    out = ["Servo catalogue family (tools/make_servo_fixtures.py): consistent and planted",
           f"{'file':44} {'loud':>5} {'field':>6} {'cause':>6}"]
    for name in sorted(results):
        loud = [f for f in results[name]["findings"] if f["severity"] in ("error", "warning")]
        if name in expected:
            field, keyword = expected[name]
            named = any(field in f["fields"] for f in loud)
            caused = any(field in (f["cause"] or "") and keyword in (f["cause"] or "")
                         for f in loud)
            out.append(f"{name:44} {len(loud):5d} {'yes' if named else 'NO':>6} "
                       f"{'yes' if caused else 'NO':>6}")
        else:
            out.append(f"{name:44} {len(loud):5d} {'(consistent: no loud finding wanted)'}")
    return out


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("count", nargs="?", type=int, default=200,
                        help="sheets per convention and per slip (default 200)")
    parser.add_argument("--examples", type=Path, default=None,
                        help="write one example record per (convention, rule) here (YAML)")
    parser.add_argument("--keep", type=Path, default=None,
                        help="write the generated sheets into this folder and keep them (with a "
                             "SLIP-manifest.yaml per slip: corrupted fields and keyword)")
    parser.add_argument("--only", choices=("conventions", "slips"), default=None)
    parser.add_argument("--first-seed", type=int, default=0,
                        help="seeds FIRST…FIRST+N−1 (default 0): another sample of the same kind")
    args = parser.parse_args(argv)
    assert set(SLIP_BY_NAME) == {s.name for s in SLIPS}
    started = time.perf_counter()
    examples: dict[str, Any] = {}
    with tempfile.TemporaryDirectory(prefix="bench-judgement-") as temporary:
        folder = args.keep or Path(temporary)
        folder.mkdir(parents=True, exist_ok=True)
        if args.only != "slips":
            print("Consistent sheets: % of records with an error / a warning "
                  "(target: 0 % errors, ≤ 1 % warnings)")
            print("\n".join(convention_table(args.count, folder, examples, args.first_seed)))
            print()
        if args.only != "conventions":
            print("Planted slips (one per sheet): flagged = a warning or error (target ≥ 97 %); "
                  "field = a loud finding lists the corrupted field (≥ 92 %);")
            print("new = a loud finding (rule, severity) that the sheet's consistent twin does not "
                  "get; first = the corrupted field is a loud finding's first field;")
            print("kw = the slip's keyword in a loud finding's cause or message (≥ 80 %); "
                  "kwcause = in a cause")
            print("\n".join(slip_table(args.count, folder, examples, keep=bool(args.keep),
                                        first_seed=args.first_seed)))
        if args.only is None:
            print()
            print("\n".join(servo_table(folder)))
    if args.examples:
        args.examples.write_text(yaml.safe_dump(examples, allow_unicode=True, sort_keys=False,
                                                width=100), encoding="utf-8")
    print(f"\n{time.perf_counter() - started:.1f} s in all "
          "(timings on a shared 2-core machine are noisy)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

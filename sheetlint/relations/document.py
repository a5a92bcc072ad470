"""Relations of the written document itself, before any physics: keys written twice."""

from __future__ import annotations

from collections.abc import Iterator

from sheetlint.engine.core import Finding, Relation, Sheet
from sheetlint.relations.registry import register

#: the sheet attribute under which the engine passes the record's repeated keys
DUPLICATE_KEYS = "document.duplicate_keys"


@register
class DuplicateKey(Relation):
    """A key written twice in the same mapping of a record file.

    What it checks: no mapping of the record (JSON object, YAML mapping) names the same key
    twice. JSON and YAML readers keep one of the two values without a word (the later one,
    here too), so a sheet whose ``rated.power`` was pasted twice with different figures would
    be checked against a figure the writer may not have meant.

    What it tells you: the field path and the lines of both keys; the later value is the one
    checked.

    A sheet that fails::

        rated:
          power: 15 kW      # line 3
          speed: 1500 rpm
          power: 18.5 kW    # line 5

    Fix: delete the key that is wrong, or rename it if both values are wanted (an unknown
    field is kept and reported as info).

    Sources: IETF RFC 8259, *The JavaScript Object Notation (JSON) Data Interchange Format*,
    2017, section 4 ("The names within an object SHOULD be unique"; software receiving repeated
    names behaves unpredictably); YAML Ain't Markup Language 1.2.2, 2021, section 3.2.1.1
    (mapping keys are unique).
    """

    rule = "duplicate-key"
    title = "keys written twice"
    equation = "each key once per mapping"
    kind = "bound"
    severity_policy = "error: which of the two values was meant cannot be told"
    source = ("IETF RFC 8259 (2017), section 4; YAML 1.2.2 (2021), section 3.2.1.1 "
              "(mapping keys are unique)")
    order = 0

    def screen(self, sheet: Sheet) -> Iterator[Finding]:
        for repeat in sheet.attr(DUPLICATE_KEYS) or ():
            path, first, second = repeat
            yield sheet.finding(self, "error", f"{path} is written twice, at lines {first} and "
                                f"{second}; the value at line {second} was checked: keep one",
                                (path,))

"""Standards tables and the small pure functions that read them.

- :mod:`sheetlint.standards.tolerances` -- IEC 60034-1 tolerances on declared efficiency and
  power factor.
- :mod:`sheetlint.standards.efficiency` -- minimum efficiencies of the IE classes
  (IEC 60034-30-1 as published in EU Regulation 2019/1781 Annex I / SI 2021/745 Schedule 16).
- :mod:`sheetlint.standards.thermal` -- temperature-rise limits (IEC 60034-1), resistance
  temperature conversion, reference temperatures (IEC 60034-2-1), sizing bands.

Tables live in ``data/*.json`` beside this file, each with its source, edition and the
provenance of its values; each is read once, on first use.
"""

from __future__ import annotations

import json
from functools import cache
from importlib import resources
from typing import Any


@cache
def load_table(name: str) -> dict[str, Any]:
    """Read ``data/NAME`` of this package once; later calls return the same mapping."""
    text = resources.files(__name__).joinpath("data", name).read_text("utf-8")
    return json.loads(text)

"""``sheetlint commission``: a drive's motor-data parameter set, and identification results
checked against the sheet.

One direction of data, like the rest of sheetlint: the record goes through the engine
(:mod:`sheetlint.engine.run`), :mod:`.parameters` reads the completed sheet into the values a
converter's motor-data entry asks for, :mod:`.checklist` groups the engine's findings that
matter at commissioning, :mod:`.identification` states what an identification run should find
and judges a measured file (:mod:`.measured`), and :mod:`.output` formats the result as text,
JSON or CSV without computing anything.
"""

"""Relation families. Each module registers its relations with ``@register``; list new ones here."""

from sheetlint.relations import (  # noqa: F401
    basics,
    document,
    electrical,
    emf,
    machine,
    mechanics,
    reactance,
    servo,
    standards,
    torque,
)

"""The registry of relations: each relation module registers its classes with ``@register``.

Adding a relation touches one place: its class, in the module of its physical family, with the
``@register`` decorator. The family modules are listed once in ``sheetlint/relations/__init__.py``.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable
from typing import TypeVar

from sheetlint.engine.core import Relation, RuleOption

R = TypeVar("R", bound=type[Relation])

_RELATIONS: dict[str, Relation] = {}
_ORDER: list[Relation] = []
_SORTED: list[Relation] = []  # _ORDER sorted by ``order``; rebuilt when a relation registers
_HOOKS: dict[Hashable, list[Relation]] = {}  # selections of relations, by key


def register(cls: R) -> R:
    """Class decorator: instantiate the relation once and add it to the registry."""
    instance = cls()
    # several relation objects may share one rule id (e.g. per-point variants); keep all
    _ORDER.append(instance)
    _RELATIONS.setdefault(cls.rule, instance)
    _SORTED.clear()
    _HOOKS.clear()
    return cls


def all_relations() -> list[Relation]:
    """Every registered relation, in a stable order (``order`` then registration)."""
    return list(_sorted_relations())


def _sorted_relations() -> list[Relation]:
    if not _SORTED:
        from sheetlint import relations  # noqa: F401  (imports the family modules)

        _SORTED.extend(sorted(_ORDER, key=lambda r: r.order))
    return _SORTED


def relations_with(hook: str) -> list[Relation]:
    """The relations, in order, that define the optional method ``hook`` (``screen``,
    ``estimate``): looked up once, not for every record."""
    return relations_where(hook, lambda r: getattr(r, hook, None) is not None)


def relations_where(key: Hashable, keep: Callable[[Relation], bool]) -> list[Relation]:
    """The relations, in order, for which ``keep`` is true; worked out once per ``key`` (which
    must stand for ``keep``) until a relation registers."""
    found = _HOOKS.get(key)
    if found is None:
        found = _HOOKS[key] = [r for r in _sorted_relations() if keep(r)]
    return found


def relation_for(rule: str) -> Relation | None:
    _sorted_relations()
    return _RELATIONS.get(rule)


def rule_options() -> dict[str, dict[str, RuleOption]]:
    """Each rule's declared options, merged over the relations that share the rule id."""
    out: dict[str, dict[str, RuleOption]] = {}
    for r in all_relations():
        out.setdefault(r.rule, {}).update(r.options)
    return out


def rule_ids() -> list[str]:
    seen: dict[str, None] = {}
    for r in all_relations():
        seen.setdefault(r.rule, None)
    return list(seen)

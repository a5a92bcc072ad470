"""Offers against a purchase requirement (``sheetlint compare``).

Modules by job: :mod:`requirement` (the requirement file, its model and JSON Schema),
:mod:`evaluate` (each requirement against one checked offer), :mod:`verdict` (verdicts,
ranking, questions to the vendor), :mod:`formats` (text, JSON, CSV, XLSX), :mod:`html`
(one page with plots) and :mod:`command` (the subcommand).

The comparison is an engineering aid, not an approval: ratings are confirmed with the
manufacturer, and installation follows local codes and licensed practice.
"""

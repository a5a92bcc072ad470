"""The usual cautions (DESIGN.md "Cautions"), written once for every output.

Findings are engineering aids, not approvals; ratings are confirmed with the manufacturer;
installation follows local codes and licensed practice; a turning PM machine has voltage at
its terminals even with the converter off.
"""

#: the cautions one by one (the HTML report lists them)
CAUTIONS: tuple[str, ...] = (
    "Findings are engineering aids, not approvals.",
    "Machine and converter ratings must be confirmed with the manufacturer.",
    "Installation follows local codes and licensed practice.",
    "A permanent-magnet machine that turns produces voltage at its terminals even with the "
    "converter off: treat the terminals of a turning machine as live.",
)

#: the cautions as one line, closing a text report or carried by SARIF
REPORT_CAUTION = ("Findings are engineering aids, not approvals: confirm machine and converter "
                  "ratings with the manufacturer; install per local codes and licensed "
                  "practice; a turning PM machine has voltage at its terminals even with the "
                  "converter off.")

#: the caution carried by each safety finding (overspeed, voltage limit, short circuit)
FINDING_CAUTION = ("Engineering aid, not an approval: confirm machine and converter ratings "
                   "with the manufacturer and follow local codes and licensed practice; a "
                   "turning PM machine has voltage at its terminals even with the converter "
                   "off.")

#: rules whose warnings concern safety: a report that shows one ends with the cautions
SAFETY_RULES: tuple[str, ...] = ("overspeed-emf", "voltage-limit", "short-circuit-current",
                                 "field-weakening-speed")

#: the one cautions line closing every text report (the full cautions: README, HTML report,
#: ``sheetlint rules overspeed-emf``)
SHORT_CAUTION = ("Caution: findings are engineering aids, not approvals; a turning PM machine "
                 "has voltage at its terminals even with the converter off. Full cautions: "
                 "README, the HTML report, `sheetlint rules overspeed-emf`.")


def safety_pointer(rule: str) -> str:
    """The short pointer a safety finding carries in the text report."""
    return (f"safety: read the cautions (README, HTML report, `sheetlint rules {rule}`) "
            "before acting on this")

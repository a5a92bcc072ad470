"""Physics of the machine as small pure functions on SI floats (no engine imports).

Modules by physical family: :mod:`sheetlint.physics.magnets` (remanence and temperature),
:mod:`sheetlint.physics.dq` (steady-state dq model, converter voltage, field weakening).
"""

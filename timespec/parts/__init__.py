"""Parts: the standards and device classes that real components come from.

IEC 60063 preferred values (:mod:`~timespec.parts.series`), IEC 60062 RKM codes
and tolerance letters (:mod:`~timespec.parts.rkm`), capacitor dielectrics and
resistor technologies (:mod:`~timespec.parts.dielectrics`), timer and Schmitt
gate device classes (:mod:`~timespec.parts.devices`), and what a chosen part is
(:mod:`~timespec.parts.part`).  Plain data and pure functions: this layer
imports nothing of timespec but :mod:`timespec.errors` and :mod:`timespec.units`.
"""

"""Design: choosing parts for a spec and everything said about the choice.

:mod:`~timespec.design.solver` ranks candidate designs and proves the best by
worst case; :mod:`~timespec.design.statistics` adds RSS and Monte Carlo;
:mod:`~timespec.design.fixes` searches the cheapest change that makes an
infeasible block feasible; :mod:`~timespec.design.result` holds the result
types; :mod:`~timespec.design.limits` derives fixture acceptance limits.  May
import families, analysis, physics, parts, the model, numbers, units and errors;
never outputs or the command line.
"""

"""The spec language: from text to a :class:`~timespec.model.Spec`.

:mod:`~timespec.language.parser` reads text with the lark grammar into entries
whose arguments are the values of :mod:`~timespec.language.values`;
:mod:`~timespec.language.vocabulary` names every keyword;
:mod:`~timespec.language.statements` pairs each with its reader in
:mod:`~timespec.language.readers` (requirements, conditions, settings) or
:mod:`~timespec.language.policies` (part policies, pinned parts, part classes),
which share the argument checks of :mod:`~timespec.language.arguments`;
:mod:`~timespec.language.assemble` builds the
spec (includes, defaults, required statements); :mod:`~timespec.language.canonical`
is the canonical layout behind ``timespec format``.  May import the model,
parts, numbers, units and errors; never families, design or outputs.
"""

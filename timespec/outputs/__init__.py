"""Outputs: results rendered for people and programs.

The text report (:mod:`~timespec.outputs.report`), the versioned JSON document
(:mod:`~timespec.outputs.jsondoc`), part-value tables
(:mod:`~timespec.outputs.tables`) and charts (:mod:`~timespec.outputs.plot`).
May import design and every layer below it; never the API, CLI or Sphinx
extension.
"""

"""Outputs: results rendered for people and programs.

The text report (:mod:`~timespec.outputs.report`), the versioned JSON document
(:mod:`~timespec.outputs.jsondoc`), part-value tables
(:mod:`~timespec.outputs.tables`), charts (:mod:`~timespec.outputs.plot`) and
safe file writing (:mod:`~timespec.outputs.files`).
May import design and every layer below it; never the API, CLI or Sphinx
extension.
"""

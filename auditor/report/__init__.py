"""report stage: interchangeable views of one :class:`~auditor.decide.records.Report`.

* :func:`auditor.report.render.render` — ``text`` (rich), ``json``, ``sarif``,
  ``junit``, ``markdown`` to a stream;
* :func:`auditor.report.svg.write_svg` — the board picture;
* :mod:`auditor.report.diff_render` — a comparison of two reports
  (:mod:`auditor.decide.diff`; ``padaudit diff``, ``audit --against``).

Reporters lay out what the report holds; they compute nothing of their own.
"""

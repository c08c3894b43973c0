"""solve: from measured sensors to field-solver setups and back to metrics.

The one place that translates a sensor into what :mod:`auditor.field`
solves (``stack``, ``traces``: the board's layers and sense traces;
``shadows``: other nets' copper on the other layers, ring by ring;
``setup``: the quick model's pad; ``route``: which model the automatic mode
gives an electrode; ``precise``: the real copper in 3-D; ``mutual``: a
tx/rx pair as disk and ring; ``mutual_precise``: a pair in 3-D;
``mutual_pairs``: which of the two each pair gets), runs the solves
(``quick``, ``precise``, ``mutual``, ``mutual_precise``, ``extras`` for the
board-level coupling table and slider scans) and turns
the answers into :class:`auditor.model.results.PadMetrics`. ``dispatch`` is
the entry: it picks the solve for each sensor. Modules import only those
listed before them here, so the stage has no import loop.
"""

"""read stage: KiCad board files to the board model.

>>> from auditor.read import read_board  # doctest: +SKIP
>>> board = read_board("touch.kicad_pcb")  # doctest: +SKIP
"""

from auditor.read.reader import read_board, read_board_text

__all__ = ["read_board", "read_board_text"]

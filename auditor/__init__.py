"""padaudit: audit capacitive touch electrodes on KiCad boards.

The package is a pipeline of stages, one subpackage each::

    read -> model -> sensors -> rules -> field -> decide -> report

``cli`` is the only place that parses arguments, picks exit codes and touches
the terminal.
"""

__version__ = "0.1.0"

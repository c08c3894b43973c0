"""padaudit: audit capacitive touch electrodes on KiCad boards.

The package is a pipeline of stages, one subpackage each::

    read -> sensors -> solve (-> field) -> rules -> decide -> report -> cli

``model`` holds the records the stages share; ``audit`` runs one audit end to
end (see DEVELOPERS.md, "Layout").

``cli`` is the only place that parses arguments, picks exit codes and touches
the terminal.
"""

__version__ = "0.1.0"

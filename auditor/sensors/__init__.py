"""Find the sense electrodes, follow their traces, measure their surroundings.

>>> from auditor.sensors import find_sensors, measure  # doctest: +SKIP
>>> sensors, rejects = find_sensors(board, selection)  # doctest: +SKIP
>>> sensors = measure(board, sensors, selection)  # doctest: +SKIP
"""

from auditor.sensors.find import Rejected, find_sensors, ground_net
from auditor.sensors.measure import mark_sense_neighbours, measure, measure_each
from auditor.sensors.selection import SensorSelection, selection_from_mapping

__all__ = ["Rejected", "SensorSelection", "find_sensors", "ground_net", "mark_sense_neighbours",
           "measure", "measure_each", "selection_from_mapping"]

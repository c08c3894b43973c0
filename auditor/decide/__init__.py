"""decide: the one place that decides what is shown and what fails
(profile levels, severity overrides, waivers, baseline, the gate).

``records`` holds the decided result (:class:`~auditor.decide.records.Report`
with its gate, ``failing`` and ``exit_code``), ``diff`` the comparison of two
reports and its gate, ``baseline`` the baseline files, ``cautions`` the
safety notes a report carries.
"""

from auditor.decide.policy import Decision, Policy, decide, finding_order, mark_baseline
from auditor.decide.verdict import (
    ELECTRODE_VERDICTS,
    electrode_verdict,
    sensitivity_ranks,
    sensor_strength,
)

__all__ = ["Decision", "Policy", "decide", "finding_order", "mark_baseline",
           "sensitivity_ranks", "sensor_strength", "ELECTRODE_VERDICTS",
           "electrode_verdict"]

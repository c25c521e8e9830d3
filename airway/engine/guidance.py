"""Numbers from the published airway guidance that plans, checklists and sheets share.

Kept in one place so a plan, a unit's checklist (``{{max_intubation_attempts}}``)
and a laminated sheet can never disagree.
"""

from __future__ import annotations

from ..sources import Evidence

MAX_INTUBATION_ATTEMPTS = 2  # OAA/DAS 2015 (Mushambi), published
INTUBATION_ATTEMPTS_EVIDENCE = Evidence(
    "mushambi2015",
    "published",
    "at most two attempts; a third only by a more experienced anaesthetist (from memory)",
)
MAX_SGA_ATTEMPTS = 2  # OAA/DAS 2015 detail, from memory
SGA_ATTEMPTS_EVIDENCE = Evidence("mushambi2015", "from_memory", "at most two insertion attempts")
CRICOID_AWAKE_N = 10
CRICOID_ASLEEP_N = 30
CRICOID_EVIDENCE = Evidence("vanner1999", "from_memory", "also OAA/DAS 2015 and DAS 2015")

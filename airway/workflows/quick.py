"""Build an assessment from the few findings known in an emergency.

``airway quick`` passes its flags here; only the weight is required. The
result goes through the same validation as a file, so a bad flag gets the same
clear message.
"""

from __future__ import annotations

from typing import Any

from ..assessment import Assessment
from ..loading import assessment_from_mapping

# Which section of the assessment each quick field belongs to.
SECTIONS: dict[str, str] = {
    "weight_kg": "patient",
    "height_cm": "patient",
    "age_years": "patient",
    "gestation_weeks": "patient",
    "in_labour": "patient",
    "haemoglobin_g_per_l": "patient",
    "mallampati": "airway",
    "thyromental_cm": "airway",
    "mouth_opening_cm": "airway",
    "upper_lip_bite": "airway",
    "neck_movement": "airway",
    "large_breasts": "airway",
    "short_neck": "airway",
    "receding_mandible": "airway",
    "protruding_incisors": "airway",
    "intubation": "history",
    "difficult_mask_ventilation": "history",
    "obstructive_sleep_apnoea": "history",
    "snoring": "history",
    "status": "preeclampsia",
    "signs": "preeclampsia",
    "platelets_10e9_per_l": "preeclampsia",
    "urgency_category": "context",
    "anaesthetist": "context",
    "surgical_complexity": "context",
    "aspiration_risk": "context",
    "regional_alternative": "context",
}


def quick_assessment(**findings: Any) -> Assessment:
    """An assessment from keyword findings; ``None`` (or an empty list) means not given."""
    data: dict[str, dict[str, Any]] = {}
    for key, value in findings.items():
        if value is None or value == [] or value == ():
            continue
        data.setdefault(SECTIONS[key], {})[key] = value
    data.setdefault("patient", {})
    return assessment_from_mapping(data, "command-line flags")

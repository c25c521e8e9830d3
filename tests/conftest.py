from __future__ import annotations

import os
from pathlib import Path

import pytest
from typer.testing import CliRunner

from airway.assessment import Assessment
from airway.loading import assessment_from_mapping

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted(p for p in (ROOT / "examples").iterdir() if p.suffix in (".toml", ".json"))


@pytest.fixture(autouse=True)
def _clean_env(monkeypatch: pytest.MonkeyPatch) -> None:
    for name in ("NO_COLOR", "FORCE_COLOR", "COLUMNS", "TERM"):
        monkeypatch.delenv(name, raising=False)


@pytest.fixture
def runner() -> CliRunner:
    return CliRunner()


def make(**sections: object) -> Assessment:
    """An assessment from section dicts; weight 80 kg / height 165 cm unless given."""
    data = {k: dict(v) if isinstance(v, dict) else v for k, v in sections.items()}
    patient = {"weight_kg": 80, "height_cm": 165}
    patient.update(data.pop("patient", {}))
    return assessment_from_mapping({"patient": patient, **data})


# Fuzzing: a fixed, fast profile in CI; `HYPOTHESIS_PROFILE=deep` for a long run on demand.
from hypothesis import HealthCheck, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

settings.register_profile(
    "ci", derandomize=True, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
settings.register_profile(
    "deep", max_examples=20_000, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))

# Bedside airway findings, any of them given or not (for property tests).
AIRWAY_FINDINGS = st.fixed_dictionaries(
    {},
    optional={
        "mallampati": st.integers(1, 4),
        "upper_lip_bite": st.integers(1, 3),
        "thyromental_cm": st.floats(3, 10),
        "mouth_opening_cm": st.floats(1, 7),
        "neck_movement": st.sampled_from(["normal", "reduced", "fixed"]),
        "short_neck": st.booleans(),
        "receding_mandible": st.booleans(),
        "large_breasts": st.booleans(),
    },
)

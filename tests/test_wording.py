"""Words a clinician reads under pressure: levels that cannot be confused, plain labels,
one heading for the decision in every format."""

from __future__ import annotations

import re
from io import BytesIO

import pytest
from pypdf import PdfReader

from airway import plan_for
from airway.engine.decision import DECISION_TITLE, HEADLINE, URGENCY_TEXT
from airway.engine.scoring import LEVEL_LABELS, level_heading
from airway.render.markdown import render_markdown
from airway.render.pdf.plan import render_plan_pdf
from airway.render.text import render_text

from .conftest import make

LEVEL_4 = make(
    airway={"mallampati": 3},
    preeclampsia={"status": "with_severe_features", "signs": ["stridor", "voice_change"]},
    context={"urgency_category": 1},
)


def _pdf_text(plan) -> str:  # type: ignore[no-untyped-def]
    reader = PdfReader(BytesIO(render_plan_pdf(plan)))
    return " ".join(" ".join(p.extract_text().split()) for p in reader.pages)


def test_level_labels_share_no_word() -> None:
    words = [set(re.findall(r"[a-z]+", label.lower())) for label in LEVEL_LABELS.values()]
    for i, a in enumerate(words):
        for b in words[i + 1 :]:
            assert not a & b, (a, b)


def test_level_always_named_as_airway_level() -> None:
    plan = plan_for(LEVEL_4)
    for text in (render_text(plan), render_text(plan, compact=True), render_markdown(plan)):
        assert level_heading(4).lower() in text.lower()
        # No bare "level N" that a listener could take for another scale.
        bare = re.findall(r"(?<!airway )(?<!Airway )(?<!AIRWAY )\blevel [1-4]\b", text, re.I)
        assert not bare, bare
    assert level_heading(4) in _pdf_text(plan)


def test_override_rows_show_no_zero_contribution() -> None:
    plan = plan_for(LEVEL_4)
    stridor = next(line for line in render_text(plan).splitlines() if "Stridor;" in line)
    assert "0.00" not in stridor and "forces airway level 4" in stridor
    assert "+ 0.00" not in render_text(plan, compact=True)


def test_decision_heading_same_in_every_format() -> None:
    plan = plan_for(LEVEL_4)
    # The terminal sets headings in capitals; the words are the same.
    assert DECISION_TITLE.upper() in render_text(plan)
    assert DECISION_TITLE.upper() in render_text(plan, compact=True)
    assert f"## {DECISION_TITLE}\n" in render_markdown(plan)
    assert DECISION_TITLE in _pdf_text(plan)


def test_plain_words_for_assumed_ratios_and_unchecked_figures() -> None:
    plan = plan_for(LEVEL_4)
    for text in (render_text(plan), render_markdown(plan), _pdf_text(plan)):
        assert "ratio*" not in text and "from memory of the source" not in text
    assert "assumed ratio 2" in render_text(plan)
    assert "not yet checked against the paper" in render_text(plan)


def test_section_titles_say_what_they_hold() -> None:
    text = render_text(plan_for(LEVEL_4))
    assert "PREPARE BECAUSE OF" not in text and "\nCHECK\n" not in text
    assert "EXTRA PREPARATION FOR HER FINDINGS" in text
    assert "WARNINGS: CHECK THESE BEFORE RELYING ON THE PLAN" in text


def test_even_decision_has_a_name_a_clinician_says() -> None:
    assert "BALANCED" not in HEADLINE["balanced"] and "SENIOR" in HEADLINE["balanced"]


def test_one_term_for_saturation() -> None:
    text = _pdf_text(plan_for(LEVEL_4))
    assert "SaO2" not in text and "SpO2" in text


@pytest.mark.parametrize("category", [1, 2, 3, 4])
def test_urgency_categories_in_the_projects_words(category: int) -> None:
    """Lucas 2000's four categories, kept in order and meaning, not in its wording."""
    text = URGENCY_TEXT[category]
    assert text.startswith(f"category {category}: ")
    for published in ("immediate threat", "maternal or fetal compromise", "to suit the woman"):
        assert published not in text

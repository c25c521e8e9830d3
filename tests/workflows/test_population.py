"""The levels on a population of women at term, against published incidence.

Targets: difficult intubation in obstetric general anaesthesia 1 in 19 (Odor 2021,
DREAMY), 4.7-5.7% (McKeen 2011), about 2% (Reale 2022, from memory): levels 3-4
together between 3% and 15%; level 4 at most 4%, forced levels included (failed
intubation about 1 in 390, Kinsella 2015, is rarer still).
"""

from __future__ import annotations

from airway.workflows.population import run


def test_level_shares_match_published_incidence() -> None:
    shares = {s.group: s for s in run(women=4000, seed=11)}
    everyone = shares["all women"]
    assert 3.0 <= everyone.percent(3, 4) <= 15.0
    assert everyone.percent(4) <= 4.0
    # Heavier women and women in labour still rank higher.
    assert shares["BMI 40 or more"].percent(3, 4) > shares["BMI < 30"].percent(3, 4)
    assert shares["in labour"].percent(3, 4) > shares["not in labour"].percent(3, 4)


def test_method_doc_shows_the_figures_the_command_prints() -> None:
    from pathlib import Path

    from airway.workflows.population import chart, table

    doc = (Path(__file__).resolve().parents[2] / "docs" / "method.md").read_text("utf-8")
    block = doc.split("<!-- population:start -->\n```\n")[1].split("```\n<!-- population:end -->")[
        0
    ]
    shares = run(women=20_000, seed=2026)
    assert block == table(shares) + "\n" + chart(shares)

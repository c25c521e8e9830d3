"""Guided entry: answers typed as the examination runs, checked as they come."""

from __future__ import annotations

import contextlib
import json
import os
import select
import subprocess
import sys
import time
import tomllib
from pathlib import Path

from airway.cli import app
from airway.workflows.guided import GROUPS, assessment_toml, guided_entry

ORDER = [path for _heading, paths in GROUPS for path in paths]
ANSWERS = {
    "assessed_on": "2026-12-01",
    "patient.weight_kg": "98",
    "patient.height_cm": "165",
    "patient.in_labour": "yes",
    "airway.mallampati": "3",
    "airway.large_breasts": "yes",
    "preeclampsia.status": "with_severe_features",
    "preeclampsia.signs": "voice_change",
    "context.urgency_category": "1",
}


def _script(**bad_first: str) -> str:
    """One line per question, in order; a bad answer first where asked for."""
    lines = []
    for path in ORDER:
        if path in bad_first:
            lines.append(bad_first[path])
        lines.append(ANSWERS.get(path, ""))
    return "\n".join(lines) + "\n"


def test_every_question_is_a_model_field() -> None:
    from airway.fields import BY_PATH

    assert set(ORDER) <= set(BY_PATH) and len(ORDER) == len(set(ORDER))


def test_piped_answers_give_the_same_plan_as_the_saved_file(runner, tmp_path: Path) -> None:
    out = tmp_path / "a.toml"
    r = runner.invoke(app, ["assess", "-o", str(out)], input=_script())
    assert r.exit_code == 0, r.output
    assert "AIRWAY LEVEL" in r.stdout and "decision aid" in r.stdout
    assert "airway level 3 so far" in r.stderr  # the running level after Mallampati 3
    saved = tomllib.loads(out.read_text())
    assert saved["airway"]["mallampati"] == 3 and saved["patient"]["in_labour"] is True
    quick = runner.invoke(
        app,
        [
            "quick",
            "--weight-kg",
            "98",
            "--height-cm",
            "165",
            "--in-labour",
            "--mallampati",
            "3",
            "--large-breasts",
            "--preeclampsia",
            "with_severe_features",
            "--signs",
            "voice_change",
            "--urgency-category",
            "1",
            "-f",
            "json",
        ],
    )
    from_file = json.loads(runner.invoke(app, ["plan", str(out), "-f", "json"]).stdout)
    assert from_file["risk"] == json.loads(quick.stdout)["risk"]


def test_bad_answers_are_asked_again_never_defaulted(runner, tmp_path: Path) -> None:
    script = _script(
        **{
            "patient.weight_kg": "198 lb",
            "airway.mallampati": "5",
            "airway.large_breasts": "maybe",
            "preeclampsia.signs": "hoarse",
        }
    )
    out = tmp_path / "a.toml"
    r = runner.invoke(app, ["assess", "-o", str(out)], input=script)
    assert r.exit_code == 0, r.output
    assert r.stderr.count("try again") == 4
    assert "between 1 and 4" in r.stderr and "must be yes or no" in r.stderr
    assert tomllib.loads(out.read_text())["airway"]["mallampati"] == 3


def test_required_weight_cannot_be_left_blank(runner) -> None:
    r = runner.invoke(app, ["assess"], input=_script(**{"patient.weight_kg": ""}))
    assert r.exit_code == 0 and "needed for every plan" in r.stderr
    assert "not saved" in r.stderr


def test_end_of_input_saves_nothing(runner, tmp_path: Path) -> None:
    out = tmp_path / "a.toml"
    r = runner.invoke(app, ["assess", "-o", str(out)], input="2026-12-01\n98\n165\n")
    assert r.exit_code == 1 and "nothing saved" in r.stderr
    assert not out.exists() and list(tmp_path.iterdir()) == []


def test_refuses_to_overwrite_before_asking(runner, tmp_path: Path) -> None:
    out = tmp_path / "a.toml"
    out.write_text("keep me")
    r = runner.invoke(app, ["assess", "-o", str(out)], input=_script())
    assert r.exit_code == 2 and "--force" in r.stderr and "Current weight" not in r.stderr
    assert out.read_text() == "keep me"


def test_toml_round_trip_is_exact() -> None:
    answers = iter(_script().splitlines())
    a = guided_entry(lambda _prompt: next(answers), lambda _text: None)
    from airway.loading import parse_assessment

    assert parse_assessment(assessment_toml(a), "x", "toml") == a


def _read_until(fd: int, marker: bytes, seconds: float = 20) -> bytes:
    seen = b""
    end = time.monotonic() + seconds
    while marker not in seen and time.monotonic() < end:
        ready, _w, _x = select.select([fd], [], [], 0.2)
        if ready:
            try:
                seen += os.read(fd, 4096)
            except OSError:
                break
    return seen


def _in_a_terminal(args: list[str]) -> tuple[subprocess.Popen[bytes], int, int]:
    """Start ``args`` on a new pseudo-terminal as its controlling terminal, so that
    Ctrl-C typed into it interrupts the program as at a real keyboard.

    Returns the process and both ends of the terminal. The caller keeps the
    program's end open until the program has ended: closing it early can lose the
    program's last words, which the test reads (seen once on a loaded machine).
    """
    import fcntl
    import termios

    master, slave = os.openpty()

    def take_terminal() -> None:  # in the child, after the new session is made
        fcntl.ioctl(0, termios.TIOCSCTTY, 0)

    proc = subprocess.Popen(
        args,
        stdin=slave,
        stdout=slave,
        stderr=slave,
        start_new_session=True,
        preexec_fn=take_terminal,  # the test process runs no threads
    )
    return proc, master, slave


def test_through_a_terminal_ctrl_c_saves_nothing(tmp_path: Path) -> None:
    """Driven through a pseudo-terminal, as a clinician types: answers, then Ctrl-C."""
    out = tmp_path / "a.toml"
    proc, fd, slave = _in_a_terminal([sys.executable, "-m", "airway", "assess", "-o", str(out)])
    try:
        assert b"Her name" in _read_until(fd, b"Her name")  # the identifiers come first
        os.write(fd, b"\n\n\n")
        assert b"Date of this assessment" in _read_until(fd, b"Date of this assessment")
        os.write(fd, b"2026-12-01\n")
        assert b"Current weight" in _read_until(fd, b"Current weight")
        os.write(fd, b"98\n")
        assert b"Height" in _read_until(fd, b"Height")
        os.write(fd, b"\x03")  # Ctrl-C: the terminal sends SIGINT
        assert proc.wait(timeout=20) == 1
        text = _read_until(fd, b"nothing saved")
        assert b"nothing saved" in text and b"Traceback" not in text
    finally:
        with contextlib.suppress(ProcessLookupError):
            proc.kill()
        proc.wait()
        os.close(fd)
        os.close(slave)
    assert not out.exists()


def test_the_date_may_be_answered_today() -> None:
    """At the bedside the date of the assessment is today's: 'today' gives the date the
    caller passes in (the library reads no clock); without one, 'today' is not a date."""
    from datetime import date

    def answers(date_answers: list[str]):  # type: ignore[no-untyped-def]
        lines = iter(
            [
                a
                for p in ORDER
                for a in (date_answers if p == "assessed_on" else [ANSWERS.get(p, "")])
            ]
        )
        return lambda _prompt: next(lines)

    said: list[str] = []
    a = guided_entry(answers(["Today"]), said.append, date(2026, 12, 3))
    assert a.assessed_on == date(2026, 12, 3)
    b = guided_entry(answers(["today", "2026-12-01"]), said.append)
    assert b.assessed_on == date(2026, 12, 1)
    assert any("not a date" in s for s in said)


def test_identifiers_first_and_back_returns_to_the_previous_question() -> None:
    """The identifiers are asked first, so a plan can be filed; 'back' asks the previous
    question again and its new answer replaces the old one."""
    said: list[str] = []
    script = iter(["Ann Test", "RX1", "", "2026-12-01", "89", "back", "98"] + [""] * 60)
    prompts: list[str] = []

    def ask(prompt: str) -> str:
        prompts.append(prompt)
        return next(script)

    a = guided_entry(ask, said.append)
    assert prompts[0].startswith("Her name") and a.identity.name == "Ann Test"
    assert a.patient.weight_kg == 98 and prompts[5].startswith("Height")
    assert prompts[6].startswith("Current weight")


def test_clinical_wording_is_read_and_each_conversion_said() -> None:
    """'14 st 2', '5 ft 4' and '36+2' as the notes write them; the value in the
    field's unit is said back (14 st 2 lb = 198 lb = 89.8 kg; 64 in = 162.6 cm)."""
    said: list[str] = []
    script = iter(["", "", "", "2026-12-01", "14 st 2", "5 ft 4", "", "36+2"] + [""] * 60)
    a = guided_entry(lambda _prompt: next(script), said.append)
    assert (a.patient.weight_kg, a.patient.height_cm) == (89.8, 162.6)
    assert a.patient.gestation_weeks == 36.29
    assert "  = 89.8 kg" in said and "  = 162.6 cm" in said

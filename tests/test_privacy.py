"""No network, and her identifiers stay in the outputs she was planned into."""

from __future__ import annotations

import socket
from pathlib import Path

import pytest

from airway.cli import app

from .conftest import EXAMPLES

NAME, RECORD = "Zenobia Quillfeather", "QX-998877"


@pytest.fixture
def no_network(monkeypatch: pytest.MonkeyPatch) -> list[str]:
    """Every way to open a connection fails loudly and is recorded."""
    tried: list[str] = []

    def refuse(*args: object, **kwargs: object) -> None:
        tried.append(repr(args[:2]))
        raise OSError("network use is not allowed in this test")

    monkeypatch.setattr(socket.socket, "connect", refuse)
    monkeypatch.setattr(socket.socket, "connect_ex", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)
    monkeypatch.setattr(socket, "getaddrinfo", refuse)
    return tried


def _assessment(tmp_path: Path, extra: str = "") -> Path:
    f = tmp_path / "a.toml"
    f.write_text(
        f'[identity]\nname = "{NAME}"\nrecord_number = "{RECORD}"\n'
        "[patient]\nweight_kg = 88\nheight_cm = 160\n[airway]\nmallampati = 3\n" + extra
    )
    return f


def test_no_command_opens_a_connection(runner, tmp_path: Path, no_network) -> None:
    a = _assessment(tmp_path)
    clinic = tmp_path / "list.csv"
    clinic.write_text("id,patient.weight_kg\nA1,80\n")
    plans = tmp_path / "plans"
    commands = [
        ["plan", str(a), "-f", "json", "-o", str(tmp_path / "p.json")],
        ["plan", str(a), "--pdf", str(tmp_path / "p.pdf")],
        ["quick", "--weight-kg", "90", "-f", "markdown"],
        ["oxygen", str(a)],
        ["sheet", "doses", "-o", str(tmp_path / "d.pdf")],
        ["batch", str(clinic), "--out", str(plans), "--pdf", "--jobs", "1"],
        ["board", str(plans), "-o", str(tmp_path / "b.pdf")],
        ["compare", str(EXAMPLES[0]), str(a)],
        ["verify", str(tmp_path / "p.json"), str(a)],
        ["factors"],
        ["schema"],
    ]
    for args in commands:
        r = runner.invoke(app, args)
        assert r.exit_code == 0, (args, r.output)
    assert no_network == []


def test_identifiers_never_in_messages(runner, tmp_path: Path) -> None:
    bad = _assessment(tmp_path, "[context]\nurgency_category = 9\n")
    r = runner.invoke(app, ["plan", str(bad)])
    assert r.exit_code == 2 and "urgency_category" in r.stderr
    assert NAME not in r.stderr and RECORD not in r.stderr
    clinic = tmp_path / "list.csv"
    clinic.write_text(
        "id,identity.name,identity.record_number,patient.weight_kg,airway.mallampati\n"
        f"A1,{NAME},{RECORD},80,9\n{NAME},{NAME},{RECORD},80,1\n"
    )
    r = runner.invoke(app, ["batch", str(clinic), "--out", str(tmp_path / "out")])
    assert r.exit_code == 2
    assert NAME not in r.stderr and RECORD not in r.stderr
    summary = (tmp_path / "out" / "summary.csv").read_text()
    assert NAME not in summary and RECORD not in summary


def test_identifiers_only_in_the_requested_outputs(runner, tmp_path: Path) -> None:
    a = _assessment(tmp_path)
    out = tmp_path / "out"
    out.mkdir()
    r = runner.invoke(app, ["plan", str(a), "-f", "markdown", "-o", str(out / "plan.md")])
    assert r.exit_code == 0 and NAME not in r.stderr
    r = runner.invoke(app, ["plan", str(a), "--pdf", str(out / "plan.pdf")])
    assert r.exit_code == 0 and NAME not in r.stderr
    assert sorted(p.name for p in out.iterdir()) == ["plan.md", "plan.pdf"]  # no temporaries
    assert NAME in (out / "plan.md").read_text()

"""``airway serve`` over HTTP: every security rule, and the API giving exactly what the
command line gives."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

pytest.importorskip("fastapi")
from fastapi.testclient import TestClient

from airway.cli import app as cli
from airway.web.app import create_app
from airway.web.security import COOKIE, Settings, settings_for

from ..conftest import EXAMPLES

BASE = "http://127.0.0.1:8750"


def _client(tmp_path: Path | None = None, signed_in: bool = True) -> tuple[TestClient, Settings]:
    settings = Settings(plans=tmp_path)
    client = TestClient(create_app(settings), base_url=BASE)
    if signed_in:
        r = client.get(f"/?token={settings.token}", follow_redirects=False)
        assert r.status_code == 303 and COOKIE in r.headers["set-cookie"]
        assert (
            "HttpOnly" in r.headers["set-cookie"] and "SameSite=strict" in r.headers["set-cookie"]
        )
    return client, settings


def test_without_the_token_every_page_and_the_api_are_refused() -> None:
    client, settings = _client(signed_in=False)
    for path in ("/", "/board", "/sheets", "/static/style.css", "/api/openapi.json"):
        assert client.get(path).status_code == 401, path
    assert client.post("/api/plan", json={"patient": {"weight_kg": 80}}).status_code == 401
    assert client.get("/?token=wrong").status_code == 401
    bearer = {"Authorization": f"Bearer {settings.token}"}
    assert (
        client.post("/api/plan", json={"patient": {"weight_kg": 80}}, headers=bearer).status_code
        == 200
    )


def test_a_foreign_host_is_refused() -> None:
    """DNS rebinding: a page at evil.example resolving to 127.0.0.1 must not be served."""
    client, _ = _client()
    assert client.get("/", headers={"Host": "evil.example:8750"}).status_code == 421
    assert client.get("/", headers={"Host": "localhost:8750"}).status_code == 200


def test_a_form_without_its_csrf_token_is_refused() -> None:
    client, settings = _client()
    assert client.post("/plan", data={"patient.weight_kg": "80"}).status_code == 403
    ok = client.post("/plan", data={"patient.weight_kg": "80", "csrf": settings.csrf})
    assert ok.status_code == 200 and "Airway level" in ok.text


def test_an_oversized_body_is_refused_with_413() -> None:
    client, _ = _client()
    big = "x" * 2_000_000
    r = client.post("/api/plan", content=big, headers={"Content-Type": "application/json"})
    assert r.status_code == 413


def test_pages_carry_the_safety_headers() -> None:
    client, _ = _client()
    r = client.get("/")
    csp = r.headers["content-security-policy"]
    assert "default-src 'self'" in csp and "frame-ancestors 'none'" in csp
    assert "unsafe-inline" not in csp and "<script>" not in r.text
    assert r.headers["cache-control"] == "no-store" and r.headers["x-frame-options"] == "DENY"
    assert "decision aid" in r.text and "Reassess the airway" in r.text


def test_refusals_and_api_answers_carry_the_safety_headers_too() -> None:
    """A 401, 421, 403 or 413 and the API's answers are pages of this origin as well: none
    may be framed, sniffed or cached."""
    client, _ = _client()
    stranger, _ = _client(signed_in=False)
    json_body = {"Content-Type": "application/json"}
    answers = [
        stranger.get("/"),
        client.get("/", headers={"Host": "evil.example:8750"}),
        client.post("/plan", data={"patient.weight_kg": "80"}),
        client.post("/api/plan", content="x" * 2_000_000, headers=json_body),
        client.post("/api/plan", content='{"patient": {"weight_kg": 80}}', headers=json_body),
        client.post("/api/plan", content='{"patient": {}}', headers=json_body),
    ]
    assert [r.status_code for r in answers] == [401, 421, 403, 413, 200, 422]
    for r in answers:
        assert r.headers["cache-control"] == "no-store", r.status_code
        assert r.headers["x-frame-options"] == "DENY", r.status_code
        assert "frame-ancestors 'none'" in r.headers["content-security-policy"], r.status_code


def test_a_non_loopback_bind_needs_a_long_token_from_a_file(runner, tmp_path: Path) -> None:
    r = runner.invoke(cli, ["serve", "--host", "0.0.0.0", "--no-browser"])
    assert r.exit_code == 2 and "--token-file" in r.stderr
    short = tmp_path / "token"
    short.write_text("abc")
    r = runner.invoke(
        cli, ["serve", "--host", "0.0.0.0", "--token-file", str(short), "--no-browser"]
    )
    assert r.exit_code == 2 and "at least 32" in r.stderr
    long = tmp_path / "long"
    long.write_text("k" * 40)
    assert settings_for("0.0.0.0", 8750, None, long).token == "k" * 40


@pytest.mark.parametrize("example", EXAMPLES, ids=[p.name for p in EXAMPLES])
def test_the_api_gives_exactly_what_the_command_line_gives(runner, example: Path, tmp_path) -> None:
    from airway.loading import read_assessment

    client, _ = _client()
    body = read_assessment(example).model_dump_json(exclude_none=True)
    cli_json = runner.invoke(cli, ["plan", str(example), "-f", "json"]).stdout_bytes
    api = client.post("/api/plan", content=body, headers={"Content-Type": "application/json"})
    assert api.status_code == 200 and api.content == cli_json
    pdf = tmp_path / "p.pdf"
    assert runner.invoke(cli, ["plan", str(example), "--pdf", str(pdf)]).exit_code == 0
    api_pdf = client.post(
        "/api/plan.pdf", content=body, headers={"Content-Type": "application/json"}
    )
    assert api_pdf.content == pdf.read_bytes()


def test_bad_input_is_a_422_listing_each_problem_by_field() -> None:
    client, _ = _client()
    r = client.post(
        "/api/plan", json={"patient": {"weight_kg": 8000}, "airway": {"mallampati": True}}
    )
    assert r.status_code == 422
    fields = {p["field"] for p in r.json()["problems"]}
    assert fields == {"patient.weight_kg", "airway.mallampati"}


def test_the_form_keeps_what_was_typed_and_puts_the_error_beside_the_field() -> None:
    client, settings = _client()
    r = client.post(
        "/plan",
        data={
            "patient.weight_kg": "80 kg",
            "patient.height_cm": "1.62",
            "identity.name": "Ann Test",
            "csrf": settings.csrf,
        },
    )
    assert r.status_code == 422
    assert 'value="80 kg"' in r.text and 'value="Ann Test"' in r.text
    assert 'id="f-patient-height_cm-e"' in r.text and "looks like metres" in r.text


def test_a_plan_is_saved_to_the_plans_folder_and_shown_on_the_board(tmp_path: Path) -> None:
    client, settings = _client(tmp_path)
    r = client.post(
        "/plan", data={"patient.weight_kg": "80", "patient.in_labour": "yes", "csrf": settings.csrf}
    )
    assessment = r.text.split('name="assessment" value="')[1].split('"')[0]
    import html

    saved = client.post(
        "/save", data={"assessment": html.unescape(assessment), "csrf": settings.csrf}
    )
    assert saved.status_code == 200 and "Saved as plan-" in saved.text
    (plan_file,) = tmp_path.glob("plan-*.json")
    assert json.loads(plan_file.read_text())["risk"]["level"] in (1, 2, 3, 4)
    board = client.get("/board")
    assert plan_file.stem in board.text
    pdf = client.post(
        "/download/pdf", data={"assessment": html.unescape(assessment), "csrf": settings.csrf}
    )
    assert pdf.content.startswith(b"%PDF") and "attachment" in pdf.headers["content-disposition"]


def test_a_clinic_list_is_uploaded_planned_and_downloaded_as_a_zip() -> None:
    import io
    import zipfile

    client, settings = _client()
    csv = (EXAMPLES[0].parent / "clinic-list.csv").read_bytes()
    r = client.post(
        "/clinic",
        data={"csrf": settings.csrf, "pdf": "no"},
        files={"list": ("list.csv", csv, "text/csv")},
    )
    assert r.status_code == 200 and "bad rows first" in r.text
    key = r.text.split('href="/clinic/')[1].split(".zip")[0]
    made = zipfile.ZipFile(io.BytesIO(client.get(f"/clinic/{key}.zip").content))
    names = made.namelist()
    assert "summary.csv" in names and sum(n.endswith(".json") for n in names) >= 190
    first_row = r.text.split("<tbody>")[1].split("</tr>")[0]
    assert "not planned" in first_row  # a bad row leads the table


def test_a_name_the_font_cannot_draw_is_a_422_not_a_server_error() -> None:
    client, _ = _client()
    body = {"identity": {"name": "王秀英"}, "patient": {"weight_kg": 80}}
    r = client.post("/api/plan.pdf", json=body)
    assert r.status_code == 422 and "CJK" in r.json()["problems"][0]["message"]
    assert client.post("/api/plan", json=body).status_code == 200  # JSON carries any script


def test_the_api_reads_a_fhir_bundle_and_writes_what_plan_f_fhir_writes(runner) -> None:
    client, _ = _client()
    example = str(EXAMPLES[0])
    bundle = runner.invoke(cli, ["plan", example, "-f", "fhir"]).stdout_bytes
    fhir = client.post(
        "/api/plan.fhir", content=bundle, headers={"Content-Type": "application/json"}
    )
    assert fhir.status_code == 200 and fhir.content == bundle
    assert fhir.headers["content-type"].startswith("application/fhir+json")
    # A Bundle is an assessment wherever one is read: the API plans from it.
    from_bundle = client.post("/api/plan", content=bundle)
    assert from_bundle.content == runner.invoke(cli, ["plan", example, "-f", "json"]).stdout_bytes
    refused = client.post("/api/plan", json={"resourceType": "Bundle", "type": "document"})
    assert refused.status_code == 422


def test_the_form_is_filled_from_a_bundle_the_record_exported(runner) -> None:
    """The record's weight in pounds arrives converted and said; nothing is planned until
    the clinician has checked the values and sent the form."""
    from ..test_fhir_read import SPEC_BODY_HEIGHT, SPEC_BODY_WEIGHT, _bundle

    client, settings = _client()
    bundle = json.dumps(_bundle(SPEC_BODY_WEIGHT, SPEC_BODY_HEIGHT)).encode()
    r = client.post(
        "/start",
        data={"csrf": settings.csrf},
        files={"file": ("record.json", bundle, "application/fhir+json")},
    )
    assert r.status_code == 200
    assert 'name="patient.weight_kg" value="83.91"' in r.text
    assert 'name="patient.height_cm" value="169.93"' in r.text
    assert "185 [lb_av] read as 83.91 kg" in r.text
    bad = json.dumps({"resourceType": "Bundle", "type": "document"}).encode()
    refused = client.post(
        "/start", data={"csrf": settings.csrf}, files={"file": ("x.json", bad, "application/json")}
    )
    assert refused.status_code == 422 and "could not be read" in refused.text
    no_csrf = client.post("/start", files={"file": ("x.json", bundle, "application/json")})
    assert no_csrf.status_code == 403


def test_the_form_reads_clinical_wording_and_shows_what_it_converted() -> None:
    client, settings = _client()
    r = client.post(
        "/plan",
        data={
            "csrf": settings.csrf,
            "patient.weight_kg": "14 st 2",
            "patient.height_cm": "5 ft 4",
            "patient.gestation_weeks": "36+2",
            "airway.mallampati": "III",
            "preeclampsia.status": "severe",
        },
    )
    assert r.status_code == 200, r.text
    # 14 st 2 lb = 198 lb = 89.8 kg; 5 ft 4 in = 64 in = 162.6 cm (exact UCUM factors).
    assert "Current weight: 14 st 2 = 89.8 kg" in r.text
    assert "Height: 5 ft 4 = 162.6 cm" in r.text
    assert "Gestation: 36+2 = 36.29 weeks" in r.text


def test_a_reassessment_starts_from_a_saved_plan_and_shows_the_dangerous_change(
    tmp_path: Path, runner
) -> None:
    """Her clinic plan chosen from the plans folder fills the form; a new voice change in
    labour gives a plan whose changes come first, marked '!', and the PDF keeps them."""
    from airway import plan_for
    from airway.render.json import render_json_bytes

    from ..conftest import make

    clinic = make(assessed_on="2026-11-02", airway={"mallampati": 2})
    (tmp_path / "C001.json").write_bytes(render_json_bytes(plan_for(clinic)))
    client, settings = _client(tmp_path)
    listed = client.get("/reassess")
    assert listed.status_code == 200 and "C001" in listed.text
    started = client.post("/reassess", data={"csrf": settings.csrf, "plan": "C001"})
    assert started.status_code == 200
    assert 'name="airway.mallampati" value="2"' in started.text
    earlier = started.text.split('name="earlier" value="')[1].split('"')[0]
    import html

    form = {
        "csrf": settings.csrf,
        "earlier": html.unescape(earlier),
        "patient.weight_kg": "80",
        "patient.height_cm": "165",
        "patient.in_labour": "yes",
        "airway.mallampati": "2",
        "preeclampsia.signs": "voice_change",
        "assessed_on": "2026-12-01",
    }
    later = client.post("/plan", data=form)
    assert later.status_code == 200
    assert "Changed since the assessment of 2026-11-02: more dangerous now" in later.text
    assert "<li><strong>!</strong> airway level: Airway level 1 of 4" in later.text
    pdf = client.post(
        "/download/pdf",
        data={
            "csrf": settings.csrf,
            "assessment": html.unescape(
                later.text.split('name="assessment" value="')[1].split('"')[0]
            ),
            "earlier": html.unescape(earlier),
        },
    )
    from io import BytesIO

    from pypdf import PdfReader

    text = " ".join(p.extract_text() for p in PdfReader(BytesIO(pdf.content)).pages)
    assert "more dangerous now" in text
    missing = client.post("/reassess", data={"csrf": settings.csrf, "plan": "../etc/passwd"})
    assert missing.status_code == 422

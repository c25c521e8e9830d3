"""The web application in a real browser: Debian's Chromium driven by Playwright.

Playwright's own browser download cannot work on these machines, so the system
Chromium is launched by path; the test is skipped where there is none.
"""

from __future__ import annotations

import shutil
import socket
import threading
import time
from pathlib import Path

import pytest

pytest.importorskip("playwright")
uvicorn = pytest.importorskip("uvicorn")
CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="no system Chromium")


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@pytest.fixture
def server(tmp_path: Path):  # type: ignore[no-untyped-def]
    from airway.web.app import create_app
    from airway.web.security import Settings

    settings = Settings(port=_free_port(), plans=tmp_path)
    config = uvicorn.Config(
        create_app(settings),
        host="127.0.0.1",
        port=settings.port,
        log_level="warning",
        lifespan="off",
    )
    srv = uvicorn.Server(config)
    thread = threading.Thread(target=srv.run, daemon=True)
    thread.start()
    for _ in range(100):
        if srv.started:
            break
        time.sleep(0.05)
    yield settings
    srv.should_exit = True
    thread.join(5)


@pytest.fixture
def page(server):  # type: ignore[no-untyped-def]
    """Debian's Chromium on the server's first page, signed in through the printed URL."""
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=CHROMIUM, args=["--no-sandbox"])
        page = browser.new_page()
        page.goto(server.url())
        yield page
        browser.close()


def _no_serious_accessibility_violation(page) -> None:  # type: ignore[no-untyped-def]
    """axe-core (as shipped by axe-playwright-python): no serious or critical violation."""
    axe = pytest.importorskip("axe_playwright_python.sync_playwright")
    found = axe.Axe().run(page).response["violations"]
    bad = [v["id"] for v in found if v.get("impact") in ("serious", "critical")]
    assert not bad, bad


def test_a_clinic_doctor_enters_a_woman_with_the_keyboard_and_gets_her_plan(
    server, page, tmp_path
) -> None:
    from playwright.sync_api import expect

    assert page.url.endswith("/") and "token" not in page.url  # the token became a cookie
    page.locator("#f-identity-name").focus()
    page.keyboard.type("Test Woman")
    for _ in range(3):  # record number, date of birth, then weight
        page.keyboard.press("Tab")
    page.keyboard.type("128 kg")
    page.keyboard.press("Tab")
    page.keyboard.type("160")
    page.fill("#f-airway-mallampati", "IV")  # Roman, as written in the notes
    page.select_option("#f-history-intubation", "difficult")
    # A locator's own wait: the page's policy forbids the eval a function wait needs.
    expect(page.locator("#live")).to_contain_text("Airway level 4")
    page.screenshot(path=str(tmp_path / "form.png"), full_page=True)
    _no_serious_accessibility_violation(page)
    page.get_by_role("button", name="Make the plan").click()
    page.wait_for_load_state()
    assert "Airway level 4 of 4" in page.content()
    assert "Test Woman" in page.content()
    page.screenshot(path=str(tmp_path / "plan.png"), full_page=True)
    _no_serious_accessibility_violation(page)
    with page.expect_download() as got:
        page.get_by_role("button", name="Download PDF").click()
    assert Path(got.value.path()).read_bytes().startswith(b"%PDF")
    page.get_by_role("button", name="Save to the plans folder").click()
    page.wait_for_load_state()
    assert "Saved as" in page.content()
    page.goto(f"http://127.0.0.1:{server.port}/board")
    assert "4 of 4" in page.content()
    page.screenshot(path=str(tmp_path / "board.png"), full_page=True)
    _no_serious_accessibility_violation(page)
    shots = Path("/tmp/airway-screens")
    shots.mkdir(exist_ok=True)
    for name in ("form.png", "plan.png", "board.png"):
        shutil.copy(tmp_path / name, shots / name)


def test_the_form_is_filled_from_the_records_bundle_and_downloads_one_back(page, tmp_path) -> None:
    import json

    from ..test_fhir_read import SPEC_BODY_HEIGHT, SPEC_BODY_WEIGHT, _bundle

    record = tmp_path / "record.json"
    record.write_text(json.dumps(_bundle(SPEC_BODY_WEIGHT, SPEC_BODY_HEIGHT)), "utf-8")
    page.set_input_files("#start-file", str(record))
    page.get_by_role("button", name="Fill the form from the file").click()
    page.wait_for_load_state()
    assert page.input_value("#f-patient-weight_kg") == "83.91"
    assert "read as 83.91 kg" in page.content()
    page.screenshot(path=str(tmp_path / "form-from-record.png"), full_page=True)
    _no_serious_accessibility_violation(page)
    page.fill("#f-airway-mallampati", "2")
    page.get_by_role("button", name="Make the plan").click()
    page.wait_for_load_state()
    with page.expect_download() as got:
        page.get_by_role("button", name="Download FHIR (for the record)").click()
    bundle = json.loads(Path(got.value.path()).read_text("utf-8"))
    kinds = {e["resource"]["resourceType"] for e in bundle["entry"]}
    assert {"Observation", "RiskAssessment", "DocumentReference"} <= kinds
    shots = Path("/tmp/airway-screens")
    shots.mkdir(exist_ok=True)
    shutil.copy(tmp_path / "form-from-record.png", shots / "form-from-record.png")


def test_a_coordinator_reassesses_a_saved_plan_and_sees_the_danger_first(server, page) -> None:
    from airway import plan_for
    from airway.render.json import render_json_bytes

    from ..conftest import make

    clinic = make(assessed_on="2026-11-02", airway={"mallampati": 2})
    (server.plans / "C001.json").write_bytes(render_json_bytes(plan_for(clinic)))
    page.get_by_role("link", name="Reassessment").click()
    page.wait_for_load_state()
    _no_serious_accessibility_violation(page)
    page.screenshot(path="/tmp/airway-screens/reassess.png", full_page=True)
    page.get_by_role("button", name="Reassess C001").click()
    page.wait_for_load_state()
    assert page.input_value("#f-airway-mallampati") == "2"
    page.select_option("#f-patient-in_labour", "yes")
    page.get_by_label("voice change").check()
    page.get_by_role("button", name="Make the plan").click()
    page.wait_for_load_state()
    content = page.content()
    assert "more dangerous now" in content
    page.screenshot(path="/tmp/airway-screens/reassessed-plan.png", full_page=True)
    _no_serious_accessibility_violation(page)


def test_a_clinic_list_is_uploaded_and_the_trolley_sheets_downloaded(page) -> None:
    import zipfile

    from ..conftest import ROOT

    page.get_by_role("link", name="Clinic list").click()
    page.wait_for_load_state()
    _no_serious_accessibility_violation(page)
    page.set_input_files("#list", str(ROOT / "examples" / "clinic-list.csv"))
    page.get_by_role("button", name="Plan the list").click()
    page.wait_for_load_state(timeout=120_000)
    first = page.locator("table.board tbody tr").first
    assert "not planned" in first.inner_text()  # bad rows first
    page.screenshot(path="/tmp/airway-screens/clinic.png", full_page=True)
    _no_serious_accessibility_violation(page)
    with page.expect_download() as got:
        page.get_by_role("link", name="Download the plans and the summary (zip)").click()
    names = zipfile.ZipFile(got.value.path()).namelist()
    assert "summary.csv" in names and "C001.json" in names
    page.get_by_role("link", name="Trolley sheets").click()
    page.wait_for_load_state()
    _no_serious_accessibility_violation(page)
    page.screenshot(path="/tmp/airway-screens/sheets.png", full_page=True)
    with page.expect_download() as got:
        page.get_by_role("button", name="Download").first.click()
    assert Path(got.value.path()).read_bytes().startswith(b"%PDF")

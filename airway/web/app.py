"""The web application: pages for the clinic and the ward, and a JSON API, on the
same engine and renderers as the command line."""

import io
import secrets
from datetime import date
from pathlib import Path
from typing import Any

from fastapi import FastAPI, Request
from fastapi.responses import HTMLResponse, JSONResponse, RedirectResponse, Response
from fastapi.staticfiles import StaticFiles
from fastapi.templating import Jinja2Templates
from starlette.datastructures import MutableHeaders
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from ..assessment import Assessment
from ..engine.plan_model import Plan
from ..engine.scoring import level_heading
from ..errors import AirwayError, InputError, OutputExistsError, Problem
from ..loading import MAX_BYTES, assessment_from_bytes, read_assessment
from ..render.json import render_json_bytes
from ..render.markdown import render_markdown
from ..render.pdf.plan import render_plan_pdf
from ..render.text import shown_factors
from ..unit.catalogue import load_catalogue
from ..unit.checklists import load_checklists
from ..unit.config import Unit, UnitPaths
from ..workflows.board import board_rows, load_plans
from ..workflows.planning import plan_for, with_changes_since
from .form import form_values, groups, read_form
from .security import BODY_LIMIT_BYTES, COOKIE, HEADERS, Settings, token_ok

HERE = Path(__file__).parent
PDF = "application/pdf"


def _earlier(plans: Path | None, name: str, data: bytes) -> Assessment:
    """Her earlier assessment: a saved plan of the plans folder chosen by name, or an
    uploaded file (saved plan, assessment or FHIR Bundle)."""
    if name:
        known = {p.stem: p for p in plans.glob("*.json")} if plans is not None else {}
        if name not in known:
            raise InputError("plan", [Problem("plan", "is not a saved plan of the plans folder")])
        return read_assessment(known[name])
    if not data:
        raise InputError("plan", [Problem("plan", "choose a saved plan or a file")])
    return assessment_from_bytes(data, "the earlier file")


def _problems(exc: InputError) -> list[dict[str, str]]:
    return [{"field": p.where, "message": str(p).split(": ", 1)[-1]} for p in exc.problems]


def _html(markdown: str) -> str:
    from markdown_it import MarkdownIt

    return MarkdownIt("commonmark", {"html": False}).enable("table").render(markdown)


def create_app(settings: Settings) -> FastAPI:
    """The application for one start of the server."""
    app = FastAPI(title="airway", docs_url=None, redoc_url=None, openapi_url="/api/openapi.json")
    # The shipped unit files, read once per start (as the command line reads them once
    # per run): a plan is then made in a few milliseconds.
    unit = (load_catalogue(), load_checklists())

    def plan_of(assessment: Assessment) -> Plan:
        return plan_for(assessment, *unit)

    def plan_from_json(body: bytes) -> Plan | JSONResponse:
        made = _assessment_from_json(body)
        return made if isinstance(made, JSONResponse) else plan_of(made)

    pages = Jinja2Templates(directory=HERE / "templates")
    app.mount("/static", StaticFiles(directory=HERE / "static"), name="static")
    app.add_exception_handler(_TooLarge, _too_large)
    app.add_exception_handler(_Forbidden, _forbidden)
    app.add_exception_handler(AirwayError, _bad_input)

    app.add_middleware(_Guard, settings=settings)

    def page(request: Request, name: str, status: int = 200, **context: Any) -> HTMLResponse:
        context |= {"csrf": settings.csrf, "saving": settings.plans is not None}
        return pages.TemplateResponse(request, name, context, status_code=status)

    @app.get("/", response_class=HTMLResponse)
    def form_page(request: Request) -> HTMLResponse:
        today = {"assessed_on": date.today().isoformat()}
        return page(request, "form.html", sections=groups(today, (), {}))

    @app.post("/start", response_class=HTMLResponse)
    async def start_from_file(request: Request) -> HTMLResponse:
        """The form filled from a file: a FHIR Bundle from the record, a saved plan or an
        assessment; every value shown to be checked, the bedside findings still to add."""
        data = await _upload(await _form(request, settings), "file")
        notes: list[str] = []
        try:
            assessment = assessment_from_bytes(data, "the file", None, notes)
        except InputError as exc:
            problems = {p.where: p.message for p in exc.problems}
            empty = groups({}, (), {})
            return page(request, "form.html", 422, sections=empty, file_problems=problems)
        values, signs = form_values(assessment)
        notes = [n.removeprefix("the file: ") for n in notes]
        return page(request, "form.html", sections=groups(values, signs, {}), notes=notes)

    @app.post("/plan", response_class=HTMLResponse)
    async def plan_page(request: Request) -> HTMLResponse:
        """Her plan from the form; with an earlier assessment (a reassessment), what
        changed since it, the dangerous changes first."""
        form = await _form(request, settings)
        values = {k: v for k, v in form.items() if isinstance(v, str)}
        signs = tuple(str(v) for v in form.getlist("preeclampsia.signs"))
        earlier_json = values.pop("earlier", "")
        assessment, errors, converted = read_form(values, signs)
        if assessment is None:
            sections = groups(values, signs, errors)
            return page(
                request, "form.html", 422, sections=sections, errors=errors, earlier=earlier_json
            )
        plan = plan_since_json(assessment, earlier_json)
        if isinstance(plan, JSONResponse):
            text = "Her earlier assessment could not be read: choose it again under Reassessment."
            return page(request, "message.html", 422, text=text)
        return page(
            request,
            "plan.html",
            plan=plan,
            body=_html(render_markdown(plan)),
            assessment=assessment.model_dump_json(exclude_none=True),
            earlier=earlier_json,
            converted=converted,
        )

    def saved_plans() -> list[Any]:
        """The plans folder's plans as board rows, the women on the ward now first."""
        plans = load_plans(settings.plans)[0] if settings.plans is not None else []
        return board_rows(plans, date.today())

    @app.get("/reassess", response_class=HTMLResponse)
    def reassess_page(request: Request) -> HTMLResponse:
        return page(request, "reassess.html", rows=saved_plans())

    @app.post("/reassess", response_class=HTMLResponse)
    async def reassess_start(request: Request) -> HTMLResponse:
        """The form filled with her earlier findings, to be changed to today's."""
        form = await _form(request, settings)
        name, data = str(form.get("plan", "")), await _upload(form, "file")
        try:
            earlier = _earlier(settings.plans, name, data)
        except InputError as exc:
            return page(request, "reassess.html", 422, rows=saved_plans(), problem=str(exc))
        values, signs = form_values(earlier)
        return page(
            request,
            "form.html",
            sections=groups(values, signs, {}),
            earlier=earlier.model_dump_json(exclude_none=True),
        )

    @app.post("/api/level")
    async def live_level(request: Request) -> JSONResponse:
        form = await _form(request, settings, check_csrf=False)
        values = {k: v for k, v in form.items() if isinstance(v, str)}
        signs = tuple(str(v) for v in form.getlist("preeclampsia.signs"))
        assessment, errors, converted = read_form(values, signs)
        if assessment is None:
            return JSONResponse({"heading": "", "problems": len(errors)})
        risk = plan_for(assessment, unit[0], ()).risk
        drivers = [
            f.label for f in shown_factors(risk) if f.contribution > 0 or f.role == "override"
        ]
        return JSONResponse(
            {"heading": level_heading(risk.level), "drivers": drivers[:4], "converted": converted}
        )

    @app.post("/api/plan")
    async def api_plan(request: Request) -> Response:
        plan = plan_from_json(await _body(request, "api"))
        if isinstance(plan, JSONResponse):
            return plan
        return Response(render_json_bytes(plan), media_type="application/json")

    @app.post("/api/plan.pdf")
    async def api_plan_pdf(request: Request) -> Response:
        plan = plan_from_json(await _body(request, "api"))
        if isinstance(plan, JSONResponse):
            return plan
        return Response(render_plan_pdf(plan, "A4"), media_type=PDF)

    @app.post("/api/plan.fhir")
    async def api_plan_fhir(request: Request) -> Response:
        plan = plan_from_json(await _body(request, "api"))
        if isinstance(plan, JSONResponse):
            return plan
        return Response(_fhir_bytes(plan), media_type=FHIR_JSON)

    def plan_since_json(assessment: Assessment, earlier_json: str) -> Plan | JSONResponse:
        plan = plan_of(assessment)
        if not earlier_json:
            return plan
        earlier = _assessment_from_json(earlier_json.encode())
        if isinstance(earlier, JSONResponse):
            return earlier
        return with_changes_since(plan, earlier, Unit(*unit, paths=UnitPaths()))

    @app.post("/download/{fmt}")
    async def download(request: Request, fmt: str) -> Response:
        form = await _form(request, settings)
        later = _assessment_from_json(str(form.get("assessment", "")).encode())
        if isinstance(later, JSONResponse):
            return later
        plan = plan_since_json(later, str(form.get("earlier", "")))
        if isinstance(plan, JSONResponse):
            return plan
        name = f"airway-plan-{plan.input_sha256[:12]}"
        made = {
            "pdf": (lambda: render_plan_pdf(plan, "A4"), PDF, "pdf"),
            "markdown": (lambda: render_markdown(plan).encode(), "text/markdown", "md"),
            "json": (lambda: render_json_bytes(plan), "application/json", "json"),
            "fhir": (
                lambda: _fhir_bytes(plan, render_plan_pdf(plan, "A4")),
                FHIR_JSON,
                "fhir.json",
            ),
        }.get(fmt)
        if made is None:
            return JSONResponse({"problems": [{"field": "format", "message": "unknown"}]}, 404)
        render, media, suffix = made
        disposition = f'attachment; filename="{name}.{suffix}"'
        return Response(render(), media_type=media, headers={"Content-Disposition": disposition})

    @app.post("/save", response_class=HTMLResponse)
    async def save(request: Request) -> HTMLResponse:
        from ..output import write_atomic

        form = await _form(request, settings)
        plan = plan_from_json(str(form.get("assessment", "")).encode())
        if settings.plans is None or isinstance(plan, JSONResponse):
            return page(request, "message.html", 422, text="This plan could not be saved.")
        target = settings.plans / f"plan-{plan.input_sha256[:12]}.json"
        try:
            write_atomic(target, render_json_bytes(plan))
            text = f"Saved as {target.name} in the plans folder."
        except OutputExistsError:
            text = f"Already saved as {target.name}: the same assessment gives the same plan."
        return page(request, "message.html", text=text)

    @app.get("/board", response_class=HTMLResponse)
    def board(request: Request) -> HTMLResponse:
        from ..workflows.board import count_women

        if settings.plans is None:
            return page(
                request,
                "board.html",
                rows=[],
                notes=["No plans folder: start with --plans DIR."],
                women=0,
            )
        plans, notes, edited = load_plans(settings.plans)
        rows = board_rows(plans, date.today(), edited=edited)
        return page(request, "board.html", rows=rows, notes=notes, women=count_women(plans))

    lists: dict[str, bytes] = {}  # the last few clinic lists' zips, in memory only

    @app.get("/clinic", response_class=HTMLResponse)
    def clinic_page(request: Request) -> HTMLResponse:
        return page(request, "clinic.html", rows=None)

    @app.post("/clinic", response_class=HTMLResponse)
    async def clinic(request: Request) -> HTMLResponse:
        form = await _form(request, settings)
        upload = form.get("list")
        data = await upload.read() if hasattr(upload, "read") else b""
        await form.close()  # the upload's temporary file, at once
        try:
            summary, made, encoding = clinic_zip(data, pdf=form.get("pdf") == "yes")
        except AirwayError as exc:
            return page(request, "clinic.html", 422, rows=None, problem=str(exc))
        key = secrets.token_urlsafe(12)
        lists[key] = made
        while len(lists) > CLINIC_LISTS_KEPT:
            lists.pop(next(iter(lists)))
        bad_first = sorted(summary, key=lambda s: (s.level is not None, -(s.level or 0), s.row))
        return page(request, "clinic.html", rows=bad_first, key=key, encoding=encoding)

    @app.get("/clinic/{key}.zip")
    def clinic_download(key: str) -> Response:
        made = lists.get(key)
        if made is None:
            return Response("this list is no longer held: upload it again\n", 404)
        disposition = 'attachment; filename="airway-clinic-plans.zip"'
        return Response(
            made, media_type="application/zip", headers={"Content-Disposition": disposition}
        )

    @app.get("/sheets", response_class=HTMLResponse)
    def sheets_page(request: Request) -> HTMLResponse:
        from ..workflows.sheets import SHEETS

        return page(request, "sheets.html", kinds=SHEETS)

    @app.post("/sheets")
    async def sheet(request: Request) -> Response:
        from ..unit.config import load_unit
        from ..workflows.sheets import SHEETS, sheet_pdf

        form = await _form(request, settings)
        kind, paper = str(form.get("kind", "")), str(form.get("paper", "A4"))
        if kind not in SHEETS or paper not in ("A4", "A3", "letter", "tabloid"):
            return page(request, "message.html", 422, text="Choose a sheet and a paper.")
        try:
            pdf = sheet_pdf(kind, load_unit(None, None, None), None, paper, False)
        except AirwayError as exc:
            return page(request, "message.html", 422, text=str(exc))
        disposition = f'attachment; filename="airway-{kind}-{paper}.pdf"'
        return Response(pdf, media_type=PDF, headers={"Content-Disposition": disposition})

    return app


FHIR_JSON = "application/fhir+json"


def _fhir_bytes(plan: Plan, pdf: bytes | None = None) -> bytes:
    """The plan's FHIR Bundle, as ``airway plan FILE -f fhir`` (with ``--pdf``) writes it."""
    from ..render.fhir import render_fhir  # the FHIR models load on first use

    return render_fhir(plan, pdf).encode("utf-8")


CLINIC_LISTS_KEPT = 5  # zips held in memory for download, newest kept (project rule)


def clinic_zip(data: bytes, pdf: bool) -> tuple[tuple[Any, ...], bytes, str]:
    """A clinic list's summary rows and a zip of its plans and summary, made in a
    temporary folder removed at once: nothing is left on disk."""
    import tempfile
    import zipfile

    from ..unit.catalogue import load_catalogue
    from ..unit.checklists import load_checklists
    from ..workflows.batch import run_batch

    with tempfile.TemporaryDirectory(prefix="airway-") as folder:
        source = Path(folder) / "list.csv"
        source.write_bytes(data)
        out = Path(folder) / "plans"
        result = run_batch(source, out, load_catalogue(), load_checklists(), pdf=pdf)
        buffer = io.BytesIO()
        with zipfile.ZipFile(buffer, "w", zipfile.ZIP_DEFLATED) as made:
            for path in sorted(out.iterdir()):
                if not path.name.startswith("."):
                    made.write(path, path.name)
    return result.summary, buffer.getvalue(), result.encoding


def _assessment_from_json(body: bytes) -> Assessment | JSONResponse:
    """A JSON assessment, or a 422 listing every problem by field."""
    from ..loading import parse_assessment

    try:
        assessment: Assessment = parse_assessment(body.decode("utf-8"), "request", "json")
    except UnicodeDecodeError:
        return JSONResponse({"problems": [{"field": "(body)", "message": "not UTF-8"}]}, 422)
    except InputError as exc:
        return JSONResponse({"problems": _problems(exc)}, 422)
    return assessment


async def _body(request: Request, kind: str) -> bytes:
    body = await request.body()
    if len(body) > BODY_LIMIT_BYTES[kind]:
        raise _TooLarge()
    return body


class _TooLarge(Exception):
    pass


async def _form(request: Request, settings: Settings, check_csrf: bool = True) -> Any:
    form = await request.form()
    if check_csrf and not _same(str(form.get("csrf", "")), settings.csrf):
        await form.close()  # an upload's temporary file goes at once
        raise _Forbidden()
    return form


async def _upload(form: Any, field: str) -> bytes:
    """An uploaded assessment's bytes (one past the limit, so a larger file is refused,
    not cut short); the form's temporary files removed at once."""
    upload = form.get(field)
    data = await upload.read(MAX_BYTES["assessment"] + 1) if hasattr(upload, "read") else b""
    await form.close()
    return bytes(data)


class _Forbidden(Exception):
    pass


def _same(a: str, b: str) -> bool:
    import hmac

    return hmac.compare_digest(a.encode(), b.encode())


class _Guard:
    """Every request passes here first: refused (wrong host, no token, too large a body)
    or handed on, and every answer leaves with the security headers. Plain ASGI, so
    the answer passes through as it is made."""

    def __init__(self, app: ASGIApp, settings: Settings) -> None:
        self.app, self.settings = app, settings

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return

        async def send_with_headers(message: Message) -> None:
            if message["type"] == "http.response.start":
                headers = MutableHeaders(scope=message)
                for name, value in HEADERS.items():
                    if name not in headers:
                        headers[name] = value
            await send(message)

        refusal = _refusal(Request(scope), self.settings)
        await (refusal or self.app)(scope, receive, send_with_headers)


def _refusal(request: Request, settings: Settings) -> Response | None:
    """Host, then token, then body size: the answer that refuses the request, or None."""
    if request.headers.get("host", "") not in settings.allowed_hosts():
        return Response("unknown host\n", 421, media_type="text/plain")
    query_token = request.query_params.get("token")
    if query_token is not None:
        if not token_ok(query_token, settings):
            return Response("wrong or missing token\n", 401, media_type="text/plain")
        redirect = RedirectResponse(request.url.path, 303)
        redirect.set_cookie(COOKIE, settings.token, httponly=True, samesite="strict", path="/")
        return redirect
    bearer = request.headers.get("authorization", "").removeprefix("Bearer ").strip() or None
    if not (token_ok(request.cookies.get(COOKIE), settings) or token_ok(bearer, settings)):
        return Response(
            "open the address airway serve printed (it carries the access token)\n",
            401,
            media_type="text/plain",
        )
    length = request.headers.get("content-length")
    limit = BODY_LIMIT_BYTES[
        "upload" if "multipart" in request.headers.get("content-type", "") else "api"
    ]
    if length is not None and (not length.isdigit() or int(length) > limit):
        return Response(f"request body larger than {limit:,} bytes\n", 413, media_type="text/plain")
    return None


def _too_large(_request: Request, _exc: Exception) -> Response:
    return Response("request body too large\n", 413, media_type="text/plain")


def _bad_input(_request: Request, exc: Exception) -> Response:
    """Input the tool cannot print (a name the font cannot draw, say): 422 with the same
    message the command line gives, never a 500."""
    problem = {"field": "(document)", "message": str(exc)}
    return JSONResponse({"problems": [problem]}, 422)


def _forbidden(_request: Request, _exc: Exception) -> Response:
    return Response("missing or wrong form token: reload the page\n", 403, media_type="text/plain")

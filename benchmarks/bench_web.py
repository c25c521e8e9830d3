"""airway serve: p50 and p95 of POST /api/plan and of the form's POST, at 1 and 8
concurrent clients on kept-alive connections, beside a bare endpoint of the same
framework that validates a small pydantic body; the PDF endpoint's p95 beside them.

Loopback only; bounded: REQUESTS requests per client setting. Target (issue): p95 of
POST /api/plan at most 25 ms and at most 3 x the bare endpoint's, no error.

    python benchmarks/bench_web.py [REQUESTS]
"""

from __future__ import annotations

import json
import socket
import statistics
import subprocess
import sys
import time
from concurrent.futures import ThreadPoolExecutor

import httpx
import uvicorn
from fastapi import FastAPI
from pydantic import BaseModel

from airway.web.app import create_app
from airway.web.security import Settings

REQUESTS = int(sys.argv[1]) if len(sys.argv) > 1 and sys.argv[1].isdigit() else 400
BODY = json.dumps(
    {
        "patient": {"weight_kg": 98, "height_cm": 165, "in_labour": True},
        "airway": {"mallampati": 3, "thyromental_cm": 6.5},
        "context": {"urgency_category": 1},
    }
)


class Small(BaseModel):
    weight_kg: float
    height_cm: float | None = None


def bare_app() -> FastAPI:
    app = FastAPI()

    @app.post("/bare")
    def bare(body: Small) -> dict[str, float]:
        return {"weight_kg": body.weight_kg}

    return app


def _port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _serve(which: str, port: int, token: str, secret: str) -> subprocess.Popen[bytes]:
    """The server in a process of its own, so the clients do not share its interpreter."""
    args = [sys.executable, __file__, "--serve", which, str(port), token, secret]
    proc = subprocess.Popen(args)
    for _ in range(200):
        try:
            socket.create_connection(("127.0.0.1", port), timeout=0.1).close()
            return proc
        except OSError:
            time.sleep(0.05)
    raise SystemExit("the server did not start")


def _run_server(which: str, port: int, token: str, secret: str) -> None:
    settings = Settings(port=port, token=token, secret=bytes.fromhex(secret))
    app = bare_app() if which == "bare" else create_app(settings)
    uvicorn.run(app, host="127.0.0.1", port=port, log_level="error", access_log=False)


def _timed(url: str, clients: int, make: object) -> tuple[float, float, int]:
    """p50 and p95 in ms, and the errors, over REQUESTS requests shared by ``clients``."""
    per = max(1, REQUESTS // clients)

    def one_client(_n: int) -> tuple[list[float], int]:
        times, errors = [], 0
        with httpx.Client(base_url=url, headers=HEADERS, timeout=30) as client:
            for _ in range(per):
                start = time.perf_counter()
                r = make(client)  # type: ignore[operator]
                times.append((time.perf_counter() - start) * 1000)
                errors += r.status_code != 200
        return times, errors

    with ThreadPoolExecutor(clients) as pool:
        done = list(pool.map(one_client, range(clients)))
    times = sorted(t for ts, _ in done for t in ts)
    return statistics.median(times), times[int(0.95 * (len(times) - 1))], sum(e for _, e in done)


HEADERS: dict[str, str] = {}


def main() -> None:
    settings = Settings(port=_port())
    HEADERS.update({"Authorization": f"Bearer {settings.token}"})
    bare_port = _port()
    servers = [
        _serve("airway", settings.port, settings.token, settings.secret.hex()),
        _serve("bare", bare_port, settings.token, settings.secret.hex()),
    ]
    airway_url = f"http://127.0.0.1:{settings.port}"
    json_headers = {"Content-Type": "application/json"}
    form = {
        "patient.weight_kg": "98",
        "patient.height_cm": "165",
        "airway.mallampati": "3",
        "csrf": settings.csrf,
    }
    cases = {
        "bare endpoint": (
            f"http://127.0.0.1:{bare_port}",
            lambda c: c.post("/bare", json={"weight_kg": 98}),
        ),
        "POST /api/plan": (
            airway_url,
            lambda c: c.post("/api/plan", content=BODY, headers=json_headers),
        ),
        "form POST /plan": (airway_url, lambda c: c.post("/plan", data=form)),
        "POST /api/plan.pdf": (
            airway_url,
            lambda c: c.post("/api/plan.pdf", content=BODY, headers=json_headers),
        ),
    }
    for url, make in cases.values():  # warm up
        with httpx.Client(base_url=url, headers=HEADERS) as c:
            for _ in range(5):
                make(c)
    print(f"{REQUESTS} requests per row; ms")
    print(f"{'endpoint':<22}{'clients':>8}{'p50':>9}{'p95':>9}{'errors':>8}")
    results = {}
    for clients in (1, 8):
        for name, (url, make) in cases.items():
            p50, p95, errors = _timed(url, clients, make)
            results[(name, clients)] = p95
            print(f"{name:<22}{clients:>8}{p50:>9.1f}{p95:>9.1f}{errors:>8}")
    for clients in (1, 8):
        api, bare = results[("POST /api/plan", clients)], results[("bare endpoint", clients)]
        met = api <= 25 and api <= 3 * bare
        print(
            f"{clients} client(s): /api/plan p95 {api:.1f} ms = {api / bare:.1f} x bare "
            f"(target <= 25 ms and <= 3 x): {'met' if met else 'NOT met'}"
        )
    for server in servers:
        server.terminate()
        server.wait()


if __name__ == "__main__":
    if sys.argv[1:2] == ["--serve"]:
        _run_server(sys.argv[2], int(sys.argv[3]), sys.argv[4], sys.argv[5])
    else:
        main()

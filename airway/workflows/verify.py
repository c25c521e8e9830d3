"""Does a saved or printed plan still match its assessment and the current rules?

A JSON plan and a PDF plan both carry the tool version, the rules version and
the SHA-256 of the assessment they came from (the PDF in its document
Subject). :func:`verify` recomputes the plan from the assessment and says
whether the saved one was made from that assessment, under the current rules,
and (for JSON) whether every value still agrees. A plan saved by an earlier
version lacks the fields added since (the contract adds fields, never renames
them): that is said, not taken for an edit. Pure: bytes and plan in.
"""

import base64
import json
import re
import zlib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..engine.plan import RULES_VERSION
from ..engine.plan_model import Plan, saved_object
from ..loading import read_bounded

_SUBJECT = re.compile(
    rb"airway (?P<version>[^;)]+); rules (?P<rules>[^;)]+); input sha256 (?P<sha>[0-9a-f]{64})"
)


@dataclass(frozen=True)
class Verdict:
    matches: bool
    findings: tuple[str, ...]


def saved_identity(data: bytes) -> tuple[str, str, str] | None:
    """(tool version, rules version, input digest) of a saved plan, or None."""
    if data.startswith(b"%PDF"):
        m = _SUBJECT.search(data)
        if m is None:
            return None
        return m["version"].decode(), m["rules"].decode(), m["sha"].decode()
    saved = saved_object(data)
    if saved is None:
        return None
    try:
        g = saved["generated_by"]
        return str(g["version"]), str(g["rules_version"]), str(saved["input_sha256"])
    except (KeyError, TypeError):
        return None


def _compare(saved: Any, now: Any, where: str, added: list[str], changed: list[str]) -> None:
    """Walk a saved plan beside the plan made now. A field the saved plan lacks goes in
    ``added`` (a later airway adds fields and never renames one); any other difference,
    a field the plan made now does not have included, goes in ``changed``."""
    if type(saved) is dict and type(now) is dict:
        for key, value in saved.items():
            if key in now:
                _compare(value, now[key], f"{where}{key}.", added, changed)
            else:
                changed.append(f"{where}{key}")
        added += [f"{where}{key}" for key in now if key not in saved]
    elif type(saved) is list and type(now) is list and len(saved) == len(now):
        for n, (old, new) in enumerate(zip(saved, now, strict=True)):
            _compare(old, new, f"{where}{n}.", added, changed)
    elif saved != now:
        changed.append(where.rstrip(".") or "(the whole plan)")


_OBJECT = re.compile(rb"(\d+) 0 obj(.*?)endobj", re.S)
_STREAM = re.compile(rb"stream\r?\n(.*?)\s*endstream", re.S)
PAPER_WIDTHS = {"A4": 595.2756, "letter": 612.0}


def page_contents(pdf: bytes) -> list[bytes]:
    """What each page draws (its content stream, decompressed), in page order: what is
    printed, apart from the metadata. Empty when the file cannot be read this way."""
    objects = {int(n): body for n, body in _OBJECT.findall(pdf)}
    kids = re.search(rb"/Kids\s*\[([^\]]*)\]", pdf)
    if kids is None:
        return []
    out = []
    for page in (int(n) for n in re.findall(rb"(\d+) 0 R", kids[1])):
        ref = re.search(rb"/Contents (\d+) 0 R", objects.get(page, b""))
        body = objects.get(int(ref[1]), b"") if ref else b""
        stream = _STREAM.search(body)
        if stream is None:
            return []
        raw, head = stream[1], body[:200]
        try:
            if b"ASCII85Decode" in head:
                raw = base64.a85decode(raw.strip().removesuffix(b"~>"))
            out.append(zlib.decompress(raw) if b"FlateDecode" in head else raw)
        except (ValueError, zlib.error):
            return []
    return out


def _printed_differences(data: bytes, current: Plan) -> list[str]:
    """Re-render the plan its assessment gives now on the file's paper and compare what
    each page draws: a PDF whose page text was edited does not match its metadata."""
    from ..render.pdf.plan import render_plan_pdf

    width = re.search(rb"/MediaBox \[ 0 0 ([\d.]+)", data)
    paper = next(
        (p for p, w in PAPER_WIDTHS.items() if width and abs(float(width[1]) - w) < 1), "A4"
    )
    printed = page_contents(data)
    expected = page_contents(render_plan_pdf(current, paper))
    if not printed:
        return ["its pages cannot be read: not a plan as airway prints it"]
    if len(printed) != len(expected):
        return [f"has {len(printed)} pages; the plan its assessment gives now has {len(expected)}"]
    differ = [str(n) for n, (a, b) in enumerate(zip(printed, expected, strict=True), 1) if a != b]
    if differ:
        pages = "page " + ", ".join(differ) if len(differ) == 1 else "pages " + ", ".join(differ)
        return [
            f"what is printed on {pages} differs from the plan its assessment gives now "
            "(edited after printing, or printed with other unit files)"
        ]
    return []


def _listed(paths: list[str], most: int = 3) -> str:
    more = f" and {len(paths) - most} more" if len(paths) > most else ""
    return ", ".join(paths[:most]) + more


def verify(data: bytes, current: Plan) -> Verdict:
    """Compare a saved plan (JSON or PDF bytes) with the plan its assessment gives now."""
    found = saved_identity(data)
    if found is None:
        return Verdict(False, ("not a plan made by airway (no version, rules or digest in it)",))
    version, rules, sha = found
    findings = []
    if sha != current.input_sha256:
        findings.append(
            "made from a different assessment (input digest "
            f"{sha[:12]} in the plan, {current.input_sha256[:12]} for this assessment)"
        )
    if rules != RULES_VERSION:
        findings.append(f"made under rules {rules}; the current rules are {RULES_VERSION}: replan")
    notes = []
    if not findings and data.startswith(b"%PDF"):
        findings += _printed_differences(data, current)
    if not findings and not data.startswith(b"%PDF"):
        from ..render.json import render_json

        added: list[str] = []
        changed: list[str] = []
        now = json.loads(render_json(current))
        now["generated_by"]["version"] = version  # which release wrote it is no edit
        _compare(saved_object(data), now, "", added, changed)
        if added and version == current.generated_by.version:
            changed += added  # this very version writes them: taken out after saving
        if changed:
            findings.append(
                "values differ from the plan recomputed now (edited after saving?): "
                + _listed(changed)
            )
        elif added:
            notes.append(
                f"made by airway {version}, which did not yet write {_listed(added)}; "
                "every value it holds agrees"
            )
    if findings:
        return Verdict(False, tuple(findings))
    return Verdict(True, (f"matches: this assessment, rules {RULES_VERSION}", *notes))


def verify_file(path: Path, current: Plan) -> Verdict:
    """:func:`verify` of a saved plan's file.

    Raises:
        InputError: the file cannot be read.
    """
    return verify(read_bounded(path, "PDF"), current)

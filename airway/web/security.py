"""What keeps a server holding patient data safe on a clinician's machine.

Loopback by default; a random token per start, exchanged on the first visit for an
HttpOnly, SameSite=Strict cookie (the API also takes ``Authorization: Bearer``);
the Host header checked against the bound address (DNS rebinding); a CSRF token in
every form; a strict Content-Security-Policy, no framing, nothing cached; request
bodies limited. Conventions of OWASP's secure-headers and CSRF guidance (common
practice).
"""

import hashlib
import hmac
import ipaddress
import secrets
from dataclasses import dataclass, field
from pathlib import Path

COOKIE = "airway_token"
TOKEN_MIN_CHARS = 32  # a token read from a file for a non-loopback bind (project rule)
# Request bodies (project rule): an assessment form or JSON is a few kB, a clinic list
# of a few thousand rows about 1 MB.
BODY_LIMIT_BYTES = {"form": 200_000, "api": 1_000_000, "upload": 5_000_000}

HEADERS = {
    "Content-Security-Policy": (
        "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
        "frame-ancestors 'none'; form-action 'self'; base-uri 'none'; object-src 'none'"
    ),
    "X-Content-Type-Options": "nosniff",
    "X-Frame-Options": "DENY",
    "Referrer-Policy": "no-referrer",
    "Cache-Control": "no-store",
    "Cross-Origin-Opener-Policy": "same-origin",
}


class UnsafeBindError(ValueError):
    """A non-loopback address without a long token from a file."""


def is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False


@dataclass(frozen=True)
class Settings:
    host: str = "127.0.0.1"
    port: int = 8750
    token: str = field(default_factory=lambda: secrets.token_urlsafe(32))
    plans: Path | None = None
    secret: bytes = field(default_factory=lambda: secrets.token_bytes(32))

    @property
    def csrf(self) -> str:
        """The token every form carries; it changes with every start."""
        return hmac.new(self.secret, b"csrf", hashlib.sha256).hexdigest()

    def allowed_hosts(self) -> set[str]:
        names = {self.host, "localhost", "127.0.0.1"} if is_loopback(self.host) else {self.host}
        return {f"{n}:{self.port}" for n in names} | (names if self.port == 80 else set())

    def url(self) -> str:
        return f"http://{self.host}:{self.port}/?token={self.token}"


def settings_for(host: str, port: int, plans: Path | None, token_file: Path | None) -> Settings:
    """The server's settings; a non-loopback bind needs a long token from a file.

    Raises:
        UnsafeBindError: with the reason, for exit 2.
    """
    token = None
    if token_file is not None:
        token = token_file.read_text("utf-8").strip()
        if len(token) < TOKEN_MIN_CHARS:
            raise UnsafeBindError(
                f"{token_file}: the token is {len(token)} characters; at least "
                f"{TOKEN_MIN_CHARS} random characters are needed"
            )
    if not is_loopback(host) and token is None:
        raise UnsafeBindError(
            f"--host {host} would serve patient data beyond this machine: give "
            "--token-file with a long random token (and put TLS in front, at the "
            "hospital's reverse proxy)"
        )
    if token is None:
        return Settings(host=host, port=port, plans=plans)
    return Settings(host=host, port=port, plans=plans, token=token)


def token_ok(given: str | None, settings: Settings) -> bool:
    return given is not None and hmac.compare_digest(given.encode(), settings.token.encode())

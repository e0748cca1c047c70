"""Who may use the station: loopback needs nothing, the network needs a key.

- **Keys.** ``sawplan serve --keys`` makes a station key and an office key,
  shows them once and keeps only their scrypt hashes (with a random salt) in
  ``station-keys.json`` beside the config file (0600).  The same file holds
  the secret that signs session cookies and form tokens; new keys mean a new
  secret, so every device signed in with the old keys is signed out.
- **Roles.** ``station`` may log work at the saws; ``office`` may do that and
  change saws, blades and jobs (``require_office``).  A request from this
  computer (a loopback address, no proxy header) is ``office`` without a key.
  A request a reverse proxy forwarded (``Forwarded``/``X-Forwarded-For``/
  ``X-Real-IP``) counts as a network request even though it comes from
  loopback: the proxy serves the network.  ``sawplan serve --proxied`` goes
  further: every request is a network request (a proxy that sends no such
  header cannot open the office to the whole network).
- **Signing in.** A key is typed once into the ``/key`` form (POST, never in a
  URL) or sent as ``Authorization: Bearer KEY`` by a program; the browser then
  carries a signed, HttpOnly, SameSite=Strict cookie.  Wrong keys are
  throttled per address and overall.  Keys never reach a log: they travel in
  bodies and headers, which uvicorn does not log.
- **Forms.** Every POST must carry the form token ``csrf_field(request)``
  writes (an HMAC of a random per-browser cookie): a form from another site
  cannot.  The guard checks it before any route sees the form.
- **Headers.** Every answer carries a strict Content-Security-Policy (only
  this server's own scripts and styles), no framing, no sniffing, no referrer.
"""

from __future__ import annotations

import base64
import contextlib
import hashlib
import hmac
import ipaddress
import json
import os
import secrets
import threading
import time
from collections import deque
from dataclasses import dataclass, field
from pathlib import Path

from markupsafe import Markup
from starlette.datastructures import MutableHeaders
from starlette.exceptions import HTTPException
from starlette.requests import Request
from starlette.responses import PlainTextResponse, RedirectResponse, Response
from starlette.types import ASGIApp, Message, Receive, Scope, Send

ROLES = ("station", "office")
KEYS_FILE = "station-keys.json"
SESSION_COOKIE = "sawplan_session"
CSRF_COOKIE = "sawplan_form"
CSRF_FIELD = "csrf"
SESSION_DAYS = 90  # a tablet at a saw stays signed in for a season
MAX_FORM_BYTES = 256 * 1024  # station forms are a few hundred bytes
# scrypt parameters (RFC 7914 §2: N=2^14, r=8, p=1 is the interactive-login setting)
SCRYPT = {"n": 2**14, "r": 8, "p": 1}
KEY_ALPHABET = "abcdefghjkmnpqrstuvwxyz23456789"  # no 0/o, 1/l/i: typed with gloves on
KEY_GROUPS = 5  # 5 groups of 4 from 31 letters: about 99 bits
PROXY_HEADERS = (b"forwarded", b"x-forwarded-for", b"x-real-ip")
LOCAL_HOSTS = ("127.0.0.1", "localhost", "[::1]", "::1")
OPEN_PATHS = ("/key", "/static/", "/healthz")

CSP = (
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
    "font-src 'self'; connect-src 'self'; object-src 'none'; base-uri 'none'; "
    "form-action 'self'; frame-ancestors 'none'"
)
SECURITY_HEADERS = (
    (b"x-content-type-options", b"nosniff"),
    (b"x-frame-options", b"DENY"),
    (b"referrer-policy", b"no-referrer"),
    (b"permissions-policy", b"camera=(), microphone=(), geolocation=()"),
    (b"cross-origin-opener-policy", b"same-origin"),
)


# --- keys ------------------------------------------------------------------------------------


def keys_path() -> Path:
    """``station-keys.json`` beside the config file (``$SAWPLAN_HOME`` in tests)."""
    from sawplan.config import config_path

    return config_path().parent / KEYS_FILE


def new_key() -> str:
    """A random key in groups of four letters and digits (``k7mq-x2rp-...``)."""
    letters = "".join(secrets.choice(KEY_ALPHABET) for _ in range(4 * KEY_GROUPS))
    return "-".join(letters[i : i + 4] for i in range(0, len(letters), 4))


def _normal(key: str) -> bytes:
    """A typed key without spaces, dashes or case (what a gloved hand may add)."""
    return "".join(c for c in key.lower() if c.isalnum()).encode()


def _scrypt(key: str, salt: bytes, n: int, r: int, p: int) -> bytes:
    return hashlib.scrypt(_normal(key), salt=salt, n=n, r=r, p=p, dklen=32)


@dataclass(frozen=True)
class KeyHash:
    role: str
    salt: bytes
    digest: bytes
    n: int
    r: int
    p: int

    def matches(self, key: str) -> bool:
        return hmac.compare_digest(_scrypt(key, self.salt, self.n, self.r, self.p), self.digest)


@dataclass
class Keys:
    """The hashed keys and the signing secret (``secret`` only, when no keys were made)."""

    secret: bytes
    hashes: tuple[KeyHash, ...] = ()
    _known: dict[bytes, str] = field(default_factory=dict, repr=False)

    @property
    def any(self) -> bool:
        return bool(self.hashes)

    def role_of(self, key: str) -> str | None:
        """The role a key opens, or None.  A key once verified is remembered by its
        SHA-256 (in memory only), so a program sending it on every request does not
        pay scrypt each time."""
        if not key or len(key) > 200:
            return None
        fast = hashlib.sha256(self.secret + _normal(key)).digest()
        if fast in self._known:
            return self._known[fast]
        for h in self.hashes:
            if h.matches(key):
                self._known[fast] = h.role
                return h.role
        return None


def make_keys(path: Path | None = None) -> dict[str, str]:
    """New keys for both roles, their hashes written to ``path``; returns the keys in clear.

    The file is written beside itself and renamed into place, readable by its owner only.
    """
    path = path or keys_path()
    clear = {role: new_key() for role in ROLES}
    entries = []
    for role, key in clear.items():
        salt = secrets.token_bytes(16)
        entries.append(
            {
                "role": role,
                "salt": salt.hex(),
                "scrypt": _scrypt(key, salt, **SCRYPT).hex(),
                **SCRYPT,
            }
        )
    body = {"secret": secrets.token_hex(32), "keys": entries}
    path.parent.mkdir(parents=True, exist_ok=True)
    partial = path.with_name(path.name + ".partial")
    fd = os.open(partial, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    with os.fdopen(fd, "w", encoding="utf-8") as handle:
        json.dump(body, handle, indent=1)
    os.replace(partial, path)
    return clear


def load_keys(path: Path | None = None) -> Keys:
    """The keys made by ``sawplan serve --keys``; none (and a secret for this run) without."""
    from sawplan.errors import DamagedFileError

    path = path or keys_path()
    if not path.exists():
        return Keys(secrets.token_bytes(32))
    try:
        body = json.loads(path.read_text(encoding="utf-8"))
        hashes = tuple(
            KeyHash(
                e["role"],
                bytes.fromhex(e["salt"]),
                bytes.fromhex(e["scrypt"]),
                int(e["n"]),
                int(e["r"]),
                int(e["p"]),
            )  # fmt: skip
            for e in body["keys"]
            if e["role"] in ROLES
        )
        return Keys(bytes.fromhex(body["secret"]), hashes)
    except (OSError, ValueError, KeyError, TypeError) as err:
        raise DamagedFileError(
            f"{path} is not a station key file ({err})",
            field="keys",
            hint="make new keys: sawplan serve --keys",
        ) from None


# --- throttling ------------------------------------------------------------------------------


class Throttle:
    """Wrong keys per address (5 in 10 minutes) and overall (30 in 10 minutes).

    Beyond that every key attempt is refused, right or wrong, until the window
    has moved on: guessing a 99-bit key at 30 tries per 10 minutes is hopeless.
    """

    def __init__(self, per_address: int = 5, overall: int = 30, window_s: float = 600.0):
        self.per_address = per_address
        self.overall = overall
        self.window_s = window_s
        self._by_address: dict[str, deque[float]] = {}
        self._all: deque[float] = deque()
        self._lock = threading.Lock()

    def _trim(self, q: deque[float], now: float) -> None:
        while q and now - q[0] > self.window_s:
            q.popleft()

    def wait_s(self, address: str, now: float | None = None) -> float:
        """Seconds until this address may try a key again (0: now)."""
        now = time.monotonic() if now is None else now
        with self._lock:
            q = self._by_address.get(address, deque())
            self._trim(q, now)
            self._trim(self._all, now)
            waits = []
            if len(q) >= self.per_address:
                waits.append(self.window_s - (now - q[0]))
            if len(self._all) >= self.overall:
                waits.append(self.window_s - (now - self._all[0]))
            return max(waits, default=0.0)

    def failed(self, address: str, now: float | None = None) -> None:
        now = time.monotonic() if now is None else now
        with self._lock:
            self._by_address.setdefault(address, deque()).append(now)
            self._all.append(now)
            if len(self._by_address) > 10_000:  # bounded memory under a flood
                self._by_address.clear()


class Throttled(Exception):
    def __init__(self, wait_s: float):
        self.wait_s = wait_s
        super().__init__(f"too many wrong keys: try again in {max(1, round(wait_s / 60))} min")


# --- signed values ---------------------------------------------------------------------------


def _sign(secret: bytes, purpose: str, value: str) -> str:
    mac = hmac.new(secret, f"{purpose}|{value}".encode(), hashlib.sha256).digest()
    return base64.urlsafe_b64encode(mac).decode().rstrip("=")


def session_value(secret: bytes, role: str, now: float | None = None) -> str:
    issued = int(time.time() if now is None else now)
    body = f"{role}.{issued}.{secrets.token_hex(8)}"
    return f"{body}.{_sign(secret, 'session', body)}"


def session_role(secret: bytes, cookie: str | None, now: float | None = None) -> str | None:
    """The role a session cookie carries, if it is ours and not too old."""
    if not cookie or cookie.count(".") != 3:
        return None
    body, _, mac = cookie.rpartition(".")
    if not hmac.compare_digest(mac, _sign(secret, "session", body)):
        return None
    role, issued, _nonce = body.split(".")
    current = time.time() if now is None else now
    if role not in ROLES or not issued.isdigit() or current - int(issued) > SESSION_DAYS * 86400:
        return None
    return role


def csrf_token(secret: bytes, cookie: str) -> str:
    return _sign(secret, "form", cookie)


# --- the request's side ----------------------------------------------------------------------


@dataclass(frozen=True)
class Access:
    """What the guard needs: the keys, the throttle, the host names served."""

    keys: Keys
    throttle: Throttle
    served_host: str = "127.0.0.1"
    secure_cookies: bool = False
    proxied: bool = False  # every request came through a reverse proxy: none is local


def is_local(scope: Scope) -> bool:
    """A request from this computer that no proxy forwarded."""
    client = scope.get("client")
    if not client:
        return False
    try:
        loopback = ipaddress.ip_address(client[0]).is_loopback
    except ValueError:
        return False
    if not loopback:
        return False
    return not any(name in PROXY_HEADERS for name, _ in scope.get("headers", ()))


def client_address(scope: Scope) -> str:
    """The address key attempts are counted against: the proxy's last hop when forwarded."""
    headers = dict(scope.get("headers", ()))
    forwarded = headers.get(b"x-forwarded-for") or headers.get(b"x-real-ip")
    if forwarded:
        return forwarded.decode("latin-1").split(",")[-1].strip()[:64]
    client = scope.get("client")
    return client[0] if client else "unknown"


def _host_allowed(scope: Scope, served: str) -> bool:
    """A local request must name this computer (no DNS-rebinding page can reach it)."""
    host = dict(scope.get("headers", ())).get(b"host", b"").decode("latin-1").lower()
    name = host.rsplit(":", 1)[0] if not host.endswith("]") else host
    return name in LOCAL_HOSTS or name == served.lower()


def role_of(request: Request) -> str | None:
    """``station``, ``office``, or None (not signed in)."""
    return getattr(request.state, "role", None)


def require_office(request: Request) -> None:
    """Refuse (403) unless the request may do office work: call first in office actions."""
    if role_of(request) != "office":
        raise HTTPException(403, "this needs the office key")


def require_role(request: Request) -> str:
    role = role_of(request)
    if role not in ROLES:
        raise HTTPException(401, "sign in with a key first")
    return role


def csrf_field(request: Request) -> Markup:
    """The hidden form-token input every POST form must carry."""
    token = getattr(request.state, "csrf", "")
    return Markup('<input type="hidden" name="{}" value="{}">').format(CSRF_FIELD, token)


def check_key(access: Access, scope: Scope, key: str) -> str | None:
    """The role ``key`` opens, counting wrong keys; raises ``Throttled`` when over the limit."""
    address = client_address(scope)
    wait = access.throttle.wait_s(address)
    if wait > 0:
        raise Throttled(wait)
    role = access.keys.role_of(key)
    if role is None:
        access.throttle.failed(address)
    return role


def over_tls(access: Access, scope: Scope) -> bool:
    """Cookies only over TLS: always when told, else when a proxy says it took HTTPS."""
    if access.secure_cookies or scope.get("scheme") == "https":
        return True
    proto = dict(scope.get("headers", ())).get(b"x-forwarded-proto", b"")
    return proto.decode("latin-1").strip().lower() == "https"


def sign_in(response: Response, access: Access, role: str, scope: Scope) -> None:
    response.set_cookie(
        SESSION_COOKIE,
        session_value(access.keys.secret, role),
        max_age=SESSION_DAYS * 86400,
        httponly=True,
        samesite="strict",
        secure=over_tls(access, scope),
        path="/",
    )


def sign_out(response: Response) -> None:
    response.delete_cookie(SESSION_COOKIE, path="/")


class Guard:
    """The ASGI middleware in front of every route: roles, form tokens, headers."""

    def __init__(self, app: ASGIApp, access: Access) -> None:
        self.app = app
        self.access = access

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        send = self._with_headers(scope, send)
        local = not self.access.proxied and is_local(scope)
        if local and not _host_allowed(scope, self.access.served_host):
            await PlainTextResponse("unknown host name", 403)(scope, receive, send)
            return
        request = Request(scope)
        state = scope.setdefault("state", {})
        try:
            role = "office" if local else self._network_role(scope, request)
        except Throttled as err:
            await PlainTextResponse(str(err), 429, {"Retry-After": str(int(err.wait_s) + 1)})(
                scope, receive, send
            )
            return
        state["role"] = role
        path = scope.get("path", "")
        if role is None and not path.startswith(OPEN_PATHS):
            if scope["method"] in ("GET", "HEAD"):
                await RedirectResponse("/key", 303)(scope, receive, send)
            else:
                await PlainTextResponse("sign in with a key first", 401)(scope, receive, send)
            return
        cookie = request.cookies.get(CSRF_COOKIE)
        fresh = not cookie or len(cookie) != 32
        if fresh:
            cookie = secrets.token_hex(16)
        state["csrf"] = csrf_token(self.access.keys.secret, cookie)
        if scope["method"] not in ("GET", "HEAD", "OPTIONS"):
            receive = await self._checked_form(scope, receive, send, cookie, fresh)
            if receive is None:
                return
        if fresh:
            send = self._with_cookie(send, cookie, over_tls(self.access, scope))
        await self.app(scope, receive, send)

    def _network_role(self, scope: Scope, request: Request) -> str | None:
        role = session_role(self.access.keys.secret, request.cookies.get(SESSION_COOKIE))
        if role is not None:
            return role
        auth = request.headers.get("authorization", "")
        if auth[:7].lower() == "bearer " and self.access.keys.any:
            return check_key(self.access, scope, auth[7:].strip())
        return None

    async def _checked_form(
        self, scope: Scope, receive: Receive, send: Send, cookie: str, fresh: bool
    ) -> Receive | None:
        """Read the body (bounded), check its form token, and hand the body on."""
        chunks: list[bytes] = []
        size = 0
        more = True
        while more:
            message = await receive()
            if message["type"] == "http.disconnect":
                return None
            chunk = message.get("body", b"")
            size += len(chunk)
            if size > MAX_FORM_BYTES:
                await PlainTextResponse("form too large", 413)(scope, receive, send)
                return None
            chunks.append(chunk)
            more = message.get("more_body", False)
        body = b"".join(chunks)
        sent = False

        async def replay() -> Message:
            nonlocal sent
            if not sent:
                sent = True
                return {"type": "http.request", "body": body, "more_body": False}
            return await receive()

        token = ""
        if not fresh:
            with contextlib.suppress(Exception):
                form = await Request(scope, replay).form()
                token = str(form.get(CSRF_FIELD, ""))
                await form.close()
            sent = False
        expected = csrf_token(self.access.keys.secret, cookie)
        if fresh or not hmac.compare_digest(token, expected):
            from sawplan.station.web import stale_form

            await stale_form(scope)(scope, replay, send)
            return None
        return replay

    def _with_headers(self, scope: Scope, send: Send) -> Send:
        async def wrapped(message: Message) -> None:
            if message["type"] == "http.response.start":
                headers = MutableHeaders(scope=message)
                for name, value in SECURITY_HEADERS:
                    headers.setdefault(name.decode(), value.decode())
                headers.setdefault("content-security-policy", CSP)
                headers.setdefault("cache-control", "no-store")
            await send(message)

        return wrapped

    def _with_cookie(self, send: Send, cookie: str, tls: bool) -> Send:
        secure = "; Secure" if tls else ""
        age = SESSION_DAYS * 86400  # kept as long as a session: a tablet's open page stays valid
        value = f"{CSRF_COOKIE}={cookie}; Path=/; Max-Age={age}; HttpOnly; SameSite=Strict{secure}"

        async def wrapped(message: Message) -> None:
            if message["type"] == "http.response.start":
                MutableHeaders(scope=message).append("set-cookie", value)
            await send(message)

        return wrapped


def key_form_answer(request: Request, key: str) -> tuple[str | None, str | None]:
    """(role, error) for a key typed into the ``/key`` form."""
    access: Access = request.app.state.access
    if not access.keys.any:
        return None, "no keys are set on this server: make them with sawplan serve --keys"
    try:
        role = check_key(access, request.scope, key)
    except Throttled as err:
        return None, str(err)
    if role is None:
        return None, "that key is not right"
    return role, None

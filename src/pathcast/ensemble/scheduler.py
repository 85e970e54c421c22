"""The address of an existing dask scheduler (``pathcast ensemble --scheduler ADDRESS``): checked before anything is
solved or written.

1. :func:`parse_scheduler_address` refuses a malformed address (no ``tcp://`` or ``tls://`` scheme, no host, a port
   that is not a whole number in 1-65535) with a :class:`~pathcast.errors.ScenarioError` (exit 2): the command line
   has to change.
2. :func:`check_scheduler` opens a TCP connection and asks the scheduler who it is (the dask ``identity`` message),
   all within ``timeout_s`` seconds (default :data:`DEFAULT_CONNECT_TIMEOUT_S`). A refused connection, no answer, a
   web server or another program on that port, or a dask worker instead of a scheduler is a
   :class:`SchedulerUnreachableError`: exit 4 (:data:`~pathcast.errors.EXIT_SOLVER_FAILURE`), the code of "the
   input is valid but the computation could not be carried out", because the same command works once the scheduler
   answers (it may not have started yet, or a network path is down) and nothing about the ensemble file is wrong.

The check runs in a daemon thread joined with a deadline, so even a host name whose lookup hangs cannot hold the
command past the timeout (plus a second of grace).
"""

from __future__ import annotations

import asyncio
import ipaddress
import math
import re
import socket
import threading
import time
from dataclasses import dataclass
from typing import Any

from ..errors import ScenarioError, SolverError

__all__ = [
    "DEFAULT_CONNECT_TIMEOUT_S",
    "SCHEMES",
    "SchedulerAddress",
    "SchedulerUnreachableError",
    "check_scheduler",
    "parse_connect_timeout",
    "parse_scheduler_address",
]

DEFAULT_CONNECT_TIMEOUT_S = (
    10.0  # a scheduler on a reachable network answers in well under a second; no source
)
SCHEMES = ("tcp", "tls")
_GRACE_S = 1.0  # extra time the caller waits for the checking thread to report [s]
_ADDRESS = re.compile(
    r"^(?P<scheme>[A-Za-z][A-Za-z0-9+.-]*)://(?P<host>\[[^\]]*\]|[^:/\[\]]*)(?::(?P<port>[^/]*))?/?$"
)


class SchedulerUnreachableError(SolverError):
    """A well-formed ``--scheduler`` address did not answer as a dask scheduler within the connect timeout (exit 4:
    the input is valid; the computing infrastructure is not there)."""


@dataclass(frozen=True)
class SchedulerAddress:
    scheme: str
    host: str  # without IPv6 brackets
    port: int

    @property
    def address(self) -> str:
        host = f"[{self.host}]" if ":" in self.host else self.host
        return f"{self.scheme}://{host}:{self.port}"


def _expected(timeout_s: float | None = None) -> str:
    within = f" that answers within {timeout_s:g} s" if timeout_s is not None else ""
    return f"a dask scheduler address such as tcp://host:8786{within}"


def parse_scheduler_address(text: str) -> SchedulerAddress:
    """``scheme://host:port`` with scheme tcp or tls and a port in 1-65535; anything else is a ScenarioError."""

    def refuse(why: str) -> ScenarioError:
        return ScenarioError(
            f"--scheduler: got {text!r}; expected {_expected()} ({why}).", field="--scheduler"
        )

    text = str(text)
    match = _ADDRESS.match(text.strip())
    if match is None:
        if "://" not in text:
            raise refuse("the scheme tcp:// or tls:// is missing")
        raise refuse("scheme://host:port with nothing after the port")
    scheme = match["scheme"].lower()
    if scheme not in SCHEMES:
        why = f"the scheme is tcp:// or tls://, not {scheme}://"
        if scheme in ("http", "https"):
            why += " (an http:// address is the dashboard's, not the scheduler's)"
        raise refuse(why)
    host = match["host"]
    if host.startswith("["):
        host = host[1:-1]
        try:
            ipaddress.IPv6Address(host)
        except ValueError:
            raise refuse(f"{host!r} between brackets is not an IPv6 address") from None
    if not host:
        raise refuse("the host is missing")
    port = match["port"]
    if port is None or port == "":
        raise refuse("the port is missing")
    if not re.fullmatch(r"\d{1,5}", port) or not 1 <= int(port) <= 65535:
        raise refuse(f"the port is a whole number from 1 to 65535, not {port!r}")
    return SchedulerAddress(scheme, host, int(port))


def parse_connect_timeout(value: Any) -> float:
    """A connect timeout in seconds: a finite number above 0 (ScenarioError otherwise)."""
    try:
        seconds = float(value)
    except (TypeError, ValueError):
        seconds = math.nan
    if not (math.isfinite(seconds) and seconds > 0):
        raise ScenarioError(
            f"--connect-timeout: got {value!r}; expected a number of seconds above 0 such as 10.",
            field="--connect-timeout",
        )
    return seconds


async def _identity(address: str, timeout_s: float) -> dict:
    from distributed.comm import connect
    from distributed.security import Security

    args = Security().get_connection_args("client")
    comm = await connect(address, timeout=timeout_s, **args)
    try:
        await comm.write({"op": "identity", "reply": True})
        return await comm.read()
    finally:
        comm.abort()


def _probe(parsed: SchedulerAddress, timeout_s: float) -> tuple[str, dict | None]:
    """("ok", identity) or (reason it failed, None); never raises."""
    started = time.monotonic()
    try:
        with socket.create_connection((parsed.host, parsed.port), timeout=timeout_s):
            pass
    except ConnectionRefusedError:
        return "a refused connection (nothing listens on that port)", None
    except socket.gaierror:
        return f"a host name that does not resolve ({parsed.host!r})", None
    except TimeoutError:
        return f"no TCP connection within {timeout_s:g} s", None
    except OSError as error:
        return f"no TCP connection ({error.strerror or error})", None
    left = max(0.1, timeout_s - (time.monotonic() - started))
    try:
        reply = asyncio.run(asyncio.wait_for(_identity(parsed.address, left), left))
    except TimeoutError:
        return (
            f"a TCP connection but no dask scheduler reply within {timeout_s:g} s "
            "(another program, such as a web server, listens on that port)"
        ), None
    except Exception as error:  # closed, garbled or refused handshakes all mean: not a dask scheduler
        name = type(error).__name__
        return (
            f"a TCP connection but no dask scheduler reply ({name}: another program listens on that port)",
            None,
        )
    if not isinstance(reply, dict) or reply.get("type") != "Scheduler":
        kind = reply.get("type") if isinstance(reply, dict) else type(reply).__name__
        return f"a dask {kind} rather than a scheduler", None
    return "ok", reply


def check_scheduler(address: str | SchedulerAddress, timeout_s: float = DEFAULT_CONNECT_TIMEOUT_S) -> dict:
    """Parse ``address`` and make sure a dask scheduler answers there within ``timeout_s`` seconds; return its
    identity (type, id, address, n_workers, ...). ScenarioError for a malformed address, SchedulerUnreachableError
    when it does not answer as a scheduler."""
    parsed = address if isinstance(address, SchedulerAddress) else parse_scheduler_address(address)
    timeout_s = parse_connect_timeout(timeout_s)
    outcome: list[tuple[str, dict | None]] = []
    thread = threading.Thread(
        target=lambda: outcome.append(_probe(parsed, timeout_s)), name="pathcast-scheduler-check", daemon=True
    )
    thread.start()
    thread.join(timeout_s + _GRACE_S)
    reason, reply = outcome[0] if outcome else (f"no answer within {timeout_s:g} s", None)
    if reply is None:
        raise SchedulerUnreachableError(
            f"--scheduler: got {reason} at {parsed.address}; expected {_expected(timeout_s)} "
            "(start the scheduler, check the address, or raise --connect-timeout)."
        )
    return reply

"""`pathcast ensemble --scheduler ADDRESS`: a malformed address is refused before anything is tried (exit 2); a
closed port, a plain HTTP server and a server that accepts and says nothing are refused within --connect-timeout
(exit 4) in one sentence naming the address; and the output folder is not created in any of these cases.

Only loopback addresses. Each refusal is waited for in a thread with a guard of 60 s (thirty times the 2 s timeout
asked for): the test checks that the command returns at all -- the bug was a hang of more than 5 minutes on an HTTP
port -- and measures no speed.
"""

from __future__ import annotations

import http.server
import socket
import threading

import pytest

from pathcast.cli import main
from pathcast.ensemble.scheduler import (
    SchedulerUnreachableError,
    check_scheduler,
    parse_scheduler_address,
)
from pathcast.errors import EXIT_BAD_INPUT, EXIT_SOLVER_FAILURE, ScenarioError

GUARD_S = 60.0


def run_cli(argv: list[str]) -> int:
    """pathcast.cli.main(argv) in a thread; fails the test if it has not returned within GUARD_S."""
    outcome: list[int] = []
    thread = threading.Thread(target=lambda: outcome.append(main(argv)), daemon=True)
    thread.start()
    thread.join(GUARD_S)
    assert outcome, f"pathcast {' '.join(argv)} did not return within {GUARD_S:g} s"
    return outcome[0]


@pytest.fixture
def http_port():
    """A plain HTTP server on 127.0.0.1 (answers requests, knows nothing of dask)."""

    class Quiet(http.server.SimpleHTTPRequestHandler):
        def log_message(self, *args):
            pass

    server = http.server.ThreadingHTTPServer(("127.0.0.1", 0), Quiet)
    thread = threading.Thread(target=server.serve_forever, daemon=True)
    thread.start()
    yield server.server_address[1]
    server.shutdown()
    server.server_close()


@pytest.fixture
def silent_port():
    """A TCP server on 127.0.0.1 that accepts connections and never sends a byte."""
    listener = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    listener.bind(("127.0.0.1", 0))
    listener.listen()
    held: list[socket.socket] = []
    stop = threading.Event()

    def accept() -> None:
        listener.settimeout(0.2)
        while not stop.is_set():
            try:
                connection, _ = listener.accept()
            except (TimeoutError, OSError):
                continue
            held.append(connection)

    thread = threading.Thread(target=accept, daemon=True)
    thread.start()
    yield listener.getsockname()[1]
    stop.set()
    thread.join(5)
    for connection in held:
        connection.close()
    listener.close()


@pytest.fixture
def closed_port() -> int:
    """A port on 127.0.0.1 that nothing listens on (bound, then released)."""
    probe = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    probe.bind(("127.0.0.1", 0))
    port = probe.getsockname()[1]
    probe.close()
    return port


def ensemble_argv(data_dir, out, address: str, timeout: str = "2") -> list[str]:
    return [
        "ensemble",
        str(data_dir / "ensemble_fail.yaml"),
        "--scheduler",
        address,
        "--connect-timeout",
        timeout,
        "--out",
        str(out),
        "--quiet",
        "--no-figures",
    ]


def one_line(err: str) -> str:
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in err, err
    return lines[0]


@pytest.mark.parametrize(
    ("address", "why"),
    [
        ("127.0.0.1:8786", r"the scheme tcp:// or tls:// is missing"),
        ("tcp://127.0.0.1:99999", r"the port is a whole number from 1 to 65535, not '99999'"),
        ("tcp://127.0.0.1:87x6", r"the port is a whole number from 1 to 65535, not '87x6'"),
        ("tcp://127.0.0.1", r"the port is missing"),
        ("tcp://:8786", r"the host is missing"),
        (
            "http://127.0.0.1:8787",
            r"the scheme is tcp:// or tls://, not http:// \(an http:// address is the dashboard's, not the "
            r"scheduler's\)",
        ),
    ],
)
def test_malformed_address_is_refused_before_trying(address, why):
    with pytest.raises(
        ScenarioError,
        match=rf"^--scheduler: got '{address}'; expected a dask scheduler address such as tcp://host:8786 \({why}\)\.$",
    ):
        parse_scheduler_address(address)


def test_cli_malformed_address_exits_2_and_writes_nothing(data_dir, tmp_path, capsys):
    out = tmp_path / "never"
    assert run_cli(ensemble_argv(data_dir, out, "127.0.0.1:8786")) == EXIT_BAD_INPUT
    assert one_line(capsys.readouterr().err) == (
        "pathcast: --scheduler: got '127.0.0.1:8786'; expected a dask scheduler address such as tcp://host:8786 "
        "(the scheme tcp:// or tls:// is missing)."
    )
    assert not out.exists()


@pytest.mark.parametrize("timeout", ["0", "-1", "nan", "inf"])
def test_connect_timeout_must_be_a_positive_number(data_dir, tmp_path, capsys, timeout):
    out = tmp_path / "never"
    assert run_cli(ensemble_argv(data_dir, out, "tcp://127.0.0.1:8786", timeout)) == EXIT_BAD_INPUT
    assert one_line(capsys.readouterr().err).startswith(
        f"pathcast: --connect-timeout: got {float(timeout)!r}; expected a number of seconds above 0"
    )
    assert not out.exists()


def test_closed_port_is_refused_with_one_sentence(data_dir, tmp_path, capsys, closed_port):
    out = tmp_path / "never"
    address = f"tcp://127.0.0.1:{closed_port}"
    assert run_cli(ensemble_argv(data_dir, out, address)) == EXIT_SOLVER_FAILURE
    assert one_line(capsys.readouterr().err) == (
        f"pathcast: --scheduler: got a refused connection (nothing listens on that port) at {address}; expected "
        "a dask scheduler address such as tcp://host:8786 that answers within 2 s (start the scheduler, check "
        "the address, or raise --connect-timeout)."
    )
    assert not out.exists()


def test_http_server_is_refused_within_the_timeout(data_dir, tmp_path, capsys, http_port):
    out = tmp_path / "never"
    address = f"tcp://127.0.0.1:{http_port}"
    assert run_cli(ensemble_argv(data_dir, out, address)) == EXIT_SOLVER_FAILURE
    line = one_line(capsys.readouterr().err)
    assert line.startswith("pathcast: --scheduler: got a TCP connection but no dask scheduler reply")
    assert line.endswith(
        f"at {address}; expected a dask scheduler address such as tcp://host:8786 that answers within 2 s "
        "(start the scheduler, check the address, or raise --connect-timeout)."
    )
    assert not out.exists()


def test_silent_server_is_refused_within_the_timeout(data_dir, tmp_path, capsys, silent_port):
    out = tmp_path / "never"
    address = f"tcp://127.0.0.1:{silent_port}"
    assert run_cli(ensemble_argv(data_dir, out, address, timeout="1.5")) == EXIT_SOLVER_FAILURE
    assert one_line(capsys.readouterr().err) == (
        f"pathcast: --scheduler: got a TCP connection but no dask scheduler reply within 1.5 s (another program, "
        f"such as a web server, listens on that port) at {address}; expected a dask scheduler address such as "
        "tcp://host:8786 that answers within 1.5 s (start the scheduler, check the address, or raise "
        "--connect-timeout)."
    )
    assert not out.exists()


def snapshot(folder) -> dict:
    return {str(p.relative_to(folder)): (p.stat().st_size, p.stat().st_mtime_ns) for p in folder.rglob("*")}


def test_an_earlier_ensemble_folder_is_left_as_it_was(data_dir, tmp_path, capsys, closed_port):
    out = tmp_path / "earlier"
    argv = ["ensemble", str(data_dir / "ensemble_fail.yaml"), "--serial", "--out", str(out), "--quiet"]
    assert main([*argv, "--no-figures"]) == 0
    before = snapshot(out)
    # --retry-failed makes the invalid member due again, so the run needs the scheduler
    retry = [*ensemble_argv(data_dir, out, f"tcp://127.0.0.1:{closed_port}"), "--retry-failed"]
    assert run_cli(retry) == EXIT_SOLVER_FAILURE
    capsys.readouterr()
    assert snapshot(out) == before


def test_a_dask_scheduler_answers_the_check():
    from distributed import LocalCluster

    with LocalCluster(n_workers=0, processes=False, protocol="tcp", dashboard_address=None) as cluster:
        identity = check_scheduler(cluster.scheduler_address, 5)
    assert identity["type"] == "Scheduler" and identity["address"] == cluster.scheduler_address


def test_unreachable_error_is_a_solver_failure():
    # exit 4: the input is valid; the computing infrastructure did not answer
    assert issubclass(SchedulerUnreachableError, ScenarioError) is False
    assert SchedulerUnreachableError("x").exit_code == EXIT_SOLVER_FAILURE

"""Several machines share one study through a database server: here a PostgreSQL server the test starts itself.

Skips with a message where no PostgreSQL server binaries are installed; .ci/run installs them.
"""

from __future__ import annotations

import glob
import json
import os
import shutil
import socket
import subprocess
import sys
from pathlib import Path

import pytest
from test_search import RIB, write


def _pg_bin() -> Path | None:
    for d in sorted(glob.glob("/usr/lib/postgresql/*/bin"), reverse=True):
        if os.path.exists(os.path.join(d, "initdb")):
            return Path(d)
    return None


@pytest.fixture(scope="module")
def postgres_url():
    bindir = _pg_bin()
    if bindir is None:
        pytest.skip("no PostgreSQL server installed (apt-get install postgresql)")
    try:
        import psycopg  # noqa: F401
    except ImportError:
        pytest.skip("psycopg is not installed (pip install 'psycopg[binary]')")
    import tempfile

    # not under pytest's own temporary folder: the server's user must be able to reach it
    root = Path(tempfile.mkdtemp(prefix="holeshape-pg-"))
    data = root / "data"
    as_user: list[str] = []
    if os.geteuid() == 0:  # the server refuses to run as root
        shutil.chown(root, "postgres")
        as_user = ["runuser", "-u", "postgres", "--"]
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    subprocess.run(as_user + [str(bindir / "initdb"), "-D", str(data), "-U", "postgres", "-A", "trust"],
                   check=True, capture_output=True)
    log = root / "server.log"
    subprocess.run(as_user + [str(bindir / "pg_ctl"), "-D", str(data), "-l", str(log), "-w", "-o",
                              f"-p {port} -k {root} -c listen_addresses=127.0.0.1", "start"],
                   check=True, capture_output=True)
    try:
        url = f"postgresql://postgres@127.0.0.1:{port}/postgres"  # as a user writes it
        yield url
    finally:
        subprocess.run(as_user + [str(bindir / "pg_ctl"), "-D", str(data), "-m", "fast", "stop"],
                       capture_output=True)
        shutil.rmtree(root, ignore_errors=True)


@pytest.mark.slow
def test_two_machines_share_one_study(tmp_path, postgres_url):
    """Two separate commands (standing for two machines, each with its own --out) on one database study: every
    trial is recorded once, the total is the budget, and both report the same best design."""
    study = write(tmp_path, RIB, TRIALS=20, CONSTRAINTS="min_area = 6000.0")
    # the two "machines" start together: creating the one study at the same moment must be safe too
    cmd = [sys.executable, "-m", "holeshape.cli", "optimise", str(study), "--storage", postgres_url, "-q", "--json"]
    procs = [subprocess.Popen(cmd + ["--out", str(tmp_path / f"machine-{i}")], stdout=subprocess.PIPE,
                              stderr=subprocess.PIPE, text=True) for i in range(2)]
    outs = []
    for p in procs:
        out, err = p.communicate(timeout=300)
        assert p.returncode == 0, err
        outs.append(json.loads(out))
    import optuna

    from holeshape.search.runner import finished, storage_for

    storage, url = storage_for(tmp_path, postgres_url)
    st = optuna.load_study(study_name="holeshape", storage=storage)
    trials = finished(st)
    numbers = [t.number for t in trials]
    assert len(numbers) == len(set(numbers))  # nothing recorded twice
    params = [tuple(sorted(t.params.items())) for t in trials]
    assert len(params) == len(set(params)), "the standard shapes are seeded by one machine only"
    # within a machine a file lock makes the count exact; between machines two may record the last trial at the
    # same moment, so the total is the budget or at most one more per extra machine
    assert 20 <= len(trials) <= 21
    assert outs[0]["storage"] == url
    assert max(o["trials_completed"] + o["trials_failed"] for o in outs) in (20, 21)

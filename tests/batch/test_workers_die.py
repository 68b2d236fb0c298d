"""Workers die with their coordinator: a SIGKILLed batch leaves no worker computing."""

import os
import signal
import subprocess
import sys
import time

import pytest

SCRIPT = """
import time
from certify.batch.execute import ProcessExecutor
ex = ProcessExecutor(2)
futs = [ex.submit(time.sleep, 300) for _ in range(2)]
time.sleep(4)
print(" ".join(map(str, ex.pool._processes)), flush=True)
time.sleep(300)
"""


def _alive(pid: int) -> bool:
    try:
        with open(f"/proc/{pid}/status") as fh:
            state = next(ln for ln in fh if ln.startswith("State:"))
        return " Z " not in state and "(zombie)" not in state
    except (FileNotFoundError, StopIteration, ProcessLookupError):
        return False


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="uses /proc")
def test_workers_end_when_the_coordinator_is_killed():
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(sys.path))
    coord = subprocess.Popen([sys.executable, "-c", SCRIPT], stdout=subprocess.PIPE, text=True, env=env)
    try:
        line = coord.stdout.readline()
        pids = [int(x) for x in line.split()]
        assert len(pids) == 2 and all(_alive(p) for p in pids)
        coord.send_signal(signal.SIGKILL)
        coord.wait(timeout=30)
        deadline = time.time() + 10
        while time.time() < deadline and any(_alive(p) for p in pids):
            time.sleep(0.2)
        assert not any(_alive(p) for p in pids), "a worker outlived its coordinator"
    finally:
        if coord.poll() is None:
            coord.kill()

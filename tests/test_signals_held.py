"""A stop signal during a library's netCDF write is handed over after the write, not inside it
(xarray's write lock is not reentrant: an exception inside ``to_netcdf`` hung ``torrid run``
on about one SIGTERM in seven)."""

import os
import signal

from torrid.io.atomic import signals_held


def test_a_signal_in_the_block_reaches_its_handler_at_the_end():
    calls = []

    def handler(signum, frame):
        calls.append(signum)

    previous = signal.signal(signal.SIGTERM, handler)
    try:
        with signals_held():
            os.kill(os.getpid(), signal.SIGTERM)
            for _ in range(1000):  # give the interpreter every chance to run a handler
                pass
            assert calls == []
        assert calls == [signal.SIGTERM]
        assert signal.getsignal(signal.SIGTERM) is handler  # restored
    finally:
        signal.signal(signal.SIGTERM, previous)

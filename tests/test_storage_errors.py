"""Operating-system errors as one line at the moment they happen (issue 12): the path, the
cause in plain words and what recovers the work; and the checks made before a run starts.

Before issue 12 these were 15-52-line tracebacks, several only after the whole run: a full
disk (``RuntimeError: NetCDF: HDF error``), a folder made read-only mid-run, a 244-character
file name (``Errno 36``) and an output name that is a directory (first advising --overwrite,
which then ran the model and failed with ``IsADirectoryError``).

A full disk and a folder made read-only mid-run are simulated by making the restart data's
writes fail as the operating system makes them fail (the tests run as root here, where
permissions do not bite, and without a small file system to fill).
"""

import errno
import time

import pytest

import torrid
from torrid.interface.cli import main
from torrid.io import runstream, storage
from torrid.io.storage import StorageError

SETS = ["--set", "numerics.truncation=21", "--set", "run.days=2", "--set",
        "run.output_interval_days=0.25", "--set", "run.restart_interval_days=0.5",
        "--set", "run.stop_at_steady_state=false", "-q", "--no-plot"]


def _one_line(capsys) -> str:
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "Traceback" not in err, err
    return err


def test_an_output_that_is_a_directory_is_refused_before_any_work(tmp_path, capsys):
    (tmp_path / "out.nc").mkdir()
    started = time.perf_counter()
    for extra in ([], ["--overwrite"]):
        assert main(["run", "-o", str(tmp_path / "out.nc"), *SETS, *extra]) == 2
        err = _one_line(capsys)
        assert "it is a directory" in err and "--overwrite" not in err
    assert time.perf_counter() - started < 10


def test_a_file_name_too_long_is_refused_before_any_work(tmp_path, capsys):
    name = "x" * 240 + ".nc"  # 243 bytes: the restart folder's name would pass 255
    assert main(["run", "-o", str(tmp_path / name), *SETS]) == 2
    err = _one_line(capsys)
    assert "the file name is 243 bytes long; at most" in err
    assert list(tmp_path.iterdir()) == []


def test_a_folder_that_cannot_be_written_is_refused_at_start(tmp_path, capsys, monkeypatch):
    real = storage.os.access
    monkeypatch.setattr(storage.os, "access",
                        lambda path, mode: False if str(path) == str(tmp_path) else
                        real(path, mode))
    assert main(["run", "-o", str(tmp_path / "r.nc"), *SETS]) == 2
    assert "permission denied: the folder" in _one_line(capsys)


def test_too_little_free_space_is_refused_at_start(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(storage, "free_bytes", lambda path: 1000)
    assert main(["run", "-o", str(tmp_path / "r.nc"), *SETS]) == 2
    err = _one_line(capsys)
    assert "the run file and its restart data need about" in err and "1 kB are free" in err


def _failing_after(monkeypatch, records, error):
    real = runstream.append_record
    count = {"n": 0}

    def append(handle, index, time_days, values):
        count["n"] += 1
        if count["n"] > records:
            raise error
        real(handle, index, time_days, values)

    from torrid.workflow import restart

    monkeypatch.setattr(restart, "append_record", append)


def test_a_full_disk_mid_run_is_one_line_with_the_way_back(tmp_path, capsys, monkeypatch):
    _failing_after(monkeypatch, 3, RuntimeError("NetCDF: HDF error"))
    monkeypatch.setattr(storage, "free_bytes", lambda path: 0 if ".restart" in str(path)
                        else 10**12)
    assert main(["run", "-o", str(tmp_path / "r.nc"), *SETS]) == 2
    err = _one_line(capsys)
    assert f"{tmp_path / '.r.nc.restart'}: the disk is full; the run is kept in its restart " \
           "data up to day 1 (" in err and err.endswith("rerun with --resume")
    monkeypatch.undo()
    assert main(["run", "-o", str(tmp_path / "r.nc"), "--resume", *SETS]) == 0
    straight = torrid.ModelConfig()
    for assignment in SETS[1::2][:5]:
        straight = straight.with_override(assignment)
    a, b = torrid.run(straight), torrid.io.runfile.read_run(tmp_path / "r.nc")
    assert (a.h.values == b.h.values).all()


def test_a_folder_made_read_only_mid_run(tmp_path, capsys, monkeypatch):
    _failing_after(monkeypatch, 2, PermissionError(errno.EACCES, "Permission denied"))
    assert main(["run", "-o", str(tmp_path / "r.nc"), *SETS]) == 2
    err = _one_line(capsys)
    assert "permission denied; the run is kept in its restart data up to day" in err


def test_the_cause_in_plain_words():
    assert storage.cause(OSError(errno.ENOSPC, "x"), "/") == "the disk is full"
    assert storage.cause(OSError(errno.ENAMETOOLONG, "x"), "/") == "the file name is too long"
    assert storage.cause(IsADirectoryError(errno.EISDIR, "x"), "/") == "it is a directory"
    with pytest.raises(StorageError, match="^p: the disk is full; rerun$"):
        with storage.storage("p", "rerun"):
            raise OSError(errno.ENOSPC, "No space left on device")

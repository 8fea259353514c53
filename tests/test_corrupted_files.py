"""Truncated or corrupted files given to the post-processors get a clear one-line error naming
the file (torrid phase), or are named and shown as missing (torrid collect)."""

import torrid
from torrid.interface.cli import main

SWEEP = """\
[numerics]
truncation = 10
[run]
days = 1.0
stop_at_steady_state = false
[sweep]
name = "tiny"
[[sweep.axis]]
key = "atmosphere.radiative_timescale_days"
values = [0.5, 1.0]
"""


def _truncate(path, fraction=0.5):
    data = path.read_bytes()
    path.write_bytes(data[: int(len(data) * fraction)])


def test_truncated_run_file_given_to_phase(tmp_path, capsys):
    run_file = tmp_path / "run.nc"
    torrid.run(torrid.ModelConfig().replace(numerics={"truncation": 10}, run={"days": 1.0}),
               run_file)
    _truncate(run_file)
    assert main(["phase", str(run_file), "-o", str(tmp_path / "pc.nc")]) == 2
    err = capsys.readouterr().err
    assert err.startswith("torrid: error:") and "run.nc" in err and len(err.splitlines()) == 1
    garbage = tmp_path / "garbage.nc"
    garbage.write_bytes(b"\x89HDF\r\n\x1a\n" + bytes(200))
    assert main(["phase", str(garbage)]) == 2
    assert "garbage.nc" in capsys.readouterr().err


def test_corrupted_point_file_given_to_collect(tmp_path, capsys):
    sweep = tmp_path / "tiny.toml"
    sweep.write_text(SWEEP)
    folder = tmp_path / "tiny"
    assert main(["sweep", str(sweep), "--folder", str(folder), "--workers", "1", "-q"]) == 0
    capsys.readouterr()
    victim = sorted(folder.glob("point-*.nc"))[0]
    _truncate(victim)
    assert main(["collect", str(folder), "-o", str(tmp_path / "table.nc")]) == 0
    captured = capsys.readouterr()
    assert victim.name in captured.err and "missing" in captured.err
    assert "1 missing" in captured.out
    assert main(["collect", str(tmp_path / "nowhere")]) == 2
    assert "nowhere" in capsys.readouterr().err

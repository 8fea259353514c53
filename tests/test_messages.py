"""Messages a researcher reads (issue 11): what the run summary's budgets include, the right
command for a sweep file, the inf hint, the README's sections, no lock file left behind."""

import re
from pathlib import Path

import pytest

import torrid
from torrid.interface.cli import main
from torrid.io.config import ConfigError, ModelConfig
from torrid.io.settings import SECTIONS
from torrid.io.sweepfile import load_sweep
from torrid.workflow.sweep import LOCK_NAME, _folder_lock, run_sweep

README = Path(__file__).parents[1] / "README.md"


def test_the_forced_summary_says_what_its_changes_include():
    config = ModelConfig().replace(numerics={"truncation": 10},
                                   run={"days": 0.1, "output_interval_days": 0.1})
    line = torrid.run(config).attrs["summary"]
    assert re.search(r"mass change \+\d\.\d\de-\d\d, energy change [+-]\d\.\d\de[+-]\d\d", line)
    assert "including what the forcing adds" in line and "relaxation adds and removes mass" in line


def test_a_case_summary_says_its_mass_is_conserved(small_w6_run):
    line = small_w6_run.attrs["summary"]
    assert "no forcing, so the mass is conserved to round-off" in line
    assert "hyperdiffusion" in line  # what changes the energy there


def test_torrid_run_on_a_sweep_file_points_to_torrid_sweep(tmp_path, capsys):
    sweep_file = tmp_path / "grid.toml"
    sweep_file.write_text('[sweep]\nname = "grid"\n[[sweep.axis]]\n'
                          'key = "atmosphere.drag_timescale_days"\nvalues = [1.0, 10.0]\n')
    assert main(["run", str(sweep_file), "-q"]) == 2
    err = capsys.readouterr().err.strip()
    assert "torrid sweep" in err and "unknown section" not in err and len(err.splitlines()) == 1
    with pytest.raises(ConfigError, match=r"\[sweep\] is the section of a sweep file"):
        ModelConfig.from_dict({"sweep": {}})


def test_none_hints_at_inf():
    with pytest.raises(ConfigError, match=r"drag_timescale_days = 'none': must be a number "
                                          r"\(inf for none\)"):
        ModelConfig.from_dict({"atmosphere": {"drag_timescale_days": "none"}})


def test_the_readme_names_every_section():
    text = README.read_text()
    sentence = re.search(r"A planet configuration is a TOML file with the sections (.*?)\(see",
                         text, flags=re.S).group(1)
    for section in SECTIONS:
        assert f"`[{section}]`" in sentence, section


def test_no_lock_file_is_left_behind_and_the_lock_still_excludes(tmp_path):
    (tmp_path / "l.toml").write_text('[numerics]\ntruncation = 10\n[run]\ndays = 0.05\n'
                                     'output_interval_days = 0.05\n[sweep]\nname = "l"\n'
                                     '[[sweep.axis]]\nkey = "atmosphere.drag_timescale_days"\n'
                                     'values = [1.0]\n')
    folder = tmp_path / "l"
    run_sweep(load_sweep(tmp_path / "l.toml", folder=folder), workers=1, progress=False)
    assert not (folder / LOCK_NAME).exists()
    with _folder_lock(folder):
        assert (folder / LOCK_NAME).exists()
        from torrid.workflow.sweep import SweepError

        with pytest.raises(SweepError, match="another torrid sweep"):
            with _folder_lock(folder):
                pass
        assert (folder / LOCK_NAME).exists()  # the refused second sweep leaves it alone
    assert not (folder / LOCK_NAME).exists()

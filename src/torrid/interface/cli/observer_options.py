"""The observer options shared by ``torrid phase`` and ``torrid fit`` (star, geometry, band)."""

from __future__ import annotations

import argparse
from pathlib import Path

from torrid.io.observer import DEFAULT_BAND_UM, KEYS, ObserverError, ObserverSettings

#: settings keys -> the option that sets them (error messages name what the user typed)
OPTION_FOR_KEY = {key: "--" + key.replace("_", "-") for key in KEYS}
OPTION_FOR_KEY.update(weighting="--photon/--energy")

_D = ObserverSettings()


def add_observer_options(p: argparse.ArgumentParser) -> None:
    """Add the observer options (names fixed: other tools call them) and ``--config``."""
    p.add_argument("--config", type=Path, default=None, metavar="FILE.toml",
                   help="read the settings from the [observer] section of this TOML file")
    num = dict(type=float, default=None)
    p.add_argument("--star-temperature", metavar="K", **num,
                   help=f"stellar effective temperature, K (default {_D.star_temperature:g})")
    p.add_argument("--star-radius", metavar="RSUN", **num,
                   help=f"stellar radius, solar radii (default {_D.star_radius:g})")
    p.add_argument("--radius-ratio", metavar="RP/RS", **num,
                   help=f"planet-to-star radius ratio (default {_D.radius_ratio:g})")
    p.add_argument("--semi-major-axis", metavar="AU", **num,
                   help=f"semi-major axis, AU (default {_D.semi_major_axis:g})")
    p.add_argument("--inclination", metavar="DEG", **num,
                   help=f"orbital inclination, degrees (default {_D.inclination:g}: edge-on)")
    band = p.add_mutually_exclusive_group()
    band.add_argument("--band", default=None, metavar="LO-HI",
                      help=f"top-hat band, micron (default {DEFAULT_BAND_UM[0]:g}-"
                           f"{DEFAULT_BAND_UM[1]:g})")
    band.add_argument("--response", default=None, metavar="FILE.csv",
                      help="band response: two-column CSV, wavelength (micron), response")
    p.add_argument("--night-temperature", metavar="K", **num,
                   help="temperature of the nightside equilibrium thickness H, K "
                        "(default: derived from the star)")
    p.add_argument("--day-temperature", metavar="K", **num,
                   help="temperature of the substellar equilibrium thickness H (1 + dH/H), K "
                        "(default: derived from the star)")
    p.add_argument("--albedo", metavar="A_B", **num,
                   help=f"Bond albedo of the derived temperatures (default {_D.albedo:g})")
    p.add_argument("--redistribution", metavar="EPSILON", **num,
                   help="heat redistribution efficiency of the derived temperatures, 0-1 "
                        f"(default {_D.redistribution:g})")
    weight = p.add_mutually_exclusive_group()
    weight.add_argument("--photon", dest="weighting", action="store_const", const="photon",
                        default=None, help="photon-counting band integral (the default)")
    weight.add_argument("--energy", dest="weighting", action="store_const", const="energy",
                        help="energy-weighted band integral")
    p.add_argument("--argument-of-periastron", metavar="DEG", **num,
                   help=f"eccentric orbits: argument of periastron, degrees (default "
                        f"{_D.argument_of_periastron:g}: transit at periastron)")
    p.add_argument("--phases", type=int, default=None, metavar="N",
                   help=f"number of orbital phases sampled (default {_D.phases})")


def build_settings(args: argparse.Namespace) -> ObserverSettings:
    """The settings of the TOML file (if any) with the command-line options on top."""
    from torrid.io.observer import read_observer_toml

    values = read_observer_toml(args.config) if args.config else {}
    given = {key: getattr(args, key) for key in KEYS if getattr(args, key, None) is not None}
    if "band" in given or "response" in given:  # the command line's choice wins over the file's
        values.pop("band", None)
        values.pop("response", None)
    values.update(given)
    try:
        return ObserverSettings(**values)
    except ObserverError as err:
        message = str(err)
        for key in sorted(KEYS, key=len, reverse=True):
            if message.startswith(key + " ") and key in given:
                message = OPTION_FOR_KEY[key] + message[len(key):]
                break
        raise ObserverError(message) from None



"""Plan files: JSON with a schema version, the keys and units of the parameter table, read strictly.

A plan file names every model and policy it was made with, so an old file gives the numbers it gave
when it was written: :func:`migrate` brings an older file up to :data:`SCHEMA_VERSION`, writing out
explicitly what that version did (a one-soak plan of schema 1–3 counted the soak at temperature
alone; a nitriding plan of schema 3 grew its compound layer by the first release's rate law) and
noting the newer choice as an offer the window shows, never applying it.

Unknown keys, wrong types and choices not in their table are refused with a message naming the key
(:class:`PlanFileError`). Saving goes through :func:`casedepth.files.atomic_write`.
"""

from __future__ import annotations

import json
import math
import os
from pathlib import Path
from typing import Any

from ..errors import InputError
from ..files import atomic_write, remove_stale_temporaries
from ..outcome import Offer
from ..parameters import PARAMETERS
from .state import Plan

SCHEMA_VERSION = 11
FILE_KIND = "casedepth plan"
LARGEST_FILE = 5_000_000  # bytes: a plan with 100 stages and long notes is under 100 kB
HEADER_KEYS = ("kind", "schema_version")


class PlanFileError(InputError):
    """A plan file that cannot be read; ``field`` is ``plan file``, the message names the file's key."""

    def __init__(self, message: str):
        super().__init__("plan file", message)


def to_dict(plan: Plan) -> dict:
    """A plan as its file holds it (units in the key names)."""
    values = plan.values()
    out: dict[str, Any] = {"kind": FILE_KIND, "schema_version": SCHEMA_VERSION}
    for key, row in PARAMETERS.items():
        out[row.file_key] = row.kind.to_file(values[key])
    return out


# -- migrations: one step per past schema ---------------------------------------------------------------------------
def _to_2(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 2 adds whole cycles; a schema-1 plan planned one isothermal soak
    data.update(process="single", stages=[], shop={})


def _to_3(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 3 adds gas nitriding; every earlier plan is a carburizing plan
    data.update(treatment="carburizing")


def _to_4(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 4 adds two-stage nitriding; earlier nitriding plans ran one stage
    data.update(two_stage_nitriding=False, second_nitriding_potential=None)


def _to_5(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 5 names the models and policies a plan was made with (they were implied before)
    single = data.get("process", "single") == "single"
    counted = not (single and made_with <= 3)  # one-soak plans counted the shop's heat-up and drop from schema 4
    data["shop_stages_counted"] = counted
    if not counted:
        offers.append(Offer("count_shop_stages", True,
                            "Plans made since schema 4 count the carbon that the shop's heat-up, drop and equalize "
                            "move in the case; this plan counts the soak at temperature alone, as it did when it "
                            "was made."))
    nitriding = data.get("treatment") == "nitriding"
    data["compound_layer_model"] = ("rate-law-2026" if nitriding and made_with <= 3 else
                                    PARAMETERS["layer_model"].default)


def _to_6(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 6 adds the diffusion-zone model (nitride precipitation), the choice of nitrogen diffusivity and the
    # hardness limit of the nitrided depth; earlier nitriding plans used the sharp front with Bohnenkamp's
    # diffusivity at core + 50 HV (the newer model is offered as a superseded choice, never applied)
    if data.get("treatment") == "nitriding":
        data.update(diffusion_zone_model="sharp-front-2026", nitrogen_diffusivity_model="bohnenkamp-1967",
                    nitrided_hardness_limit_hv=None)
    # the temper moves from the shop's standard times to the plan (the part's own); a file's shop temper is kept
    shop = data.get("shop") if isinstance(data.get("shop"), dict) else {}
    low, high = (v - 273.15 for v in PARAMETERS["temper_temperature"].range)
    if isinstance(shop.get("temper_temperature_c"), (int, float)) and low <= shop["temper_temperature_c"] <= high:
        data["temper_temperature_c"] = shop["temper_temperature_c"]
    if isinstance(shop.get("temper_h"), (int, float)) and 0.25 <= shop["temper_h"] <= 24:
        data["temper_time_h"] = shop["temper_h"]


def _to_7(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 7 adds how a load's parts spread (the Load spread settings); an older plan gets the defaults, which
    # are what `casedepth capability` and the window used before they were a plan's (written here, not filled in as
    # a guess: the spread of its load does not change)
    data.update(spread_distribution="uniform", spread_composition="nominal", spread_beta_factor=2.0, spread_parts=256,
                spread_section_mm=0.0)


def _to_8(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 8 adds low-pressure carburizing; its settings play no part in an older (gas carburizing or nitriding)
    # plan, which gets a new plan's values for them, written here
    data.update(hydrocarbon="acetylene", carbon_flux_g_per_m2_h=150.0, surface_limit_pct=None, pulses=None,
                max_hold_at_limit_s=180.0, hardening_temperature_c=None, load_area_m2=2.5, pulse_schedule="")


def _to_9(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 9 names the carrier gas (its CO moves from the shop's table to the plan, with the nominal 40 % H2 of
    # endothermic gas), takes β from the gas by default and names the Gibbs energies the readings are worked out
    # with. An older plan keeps its one β and the first releases' Gibbs energy of C + ½O2 = CO, so its soak and its
    # probe set points read as they did; the gas β is offered, the newer Gibbs energies too (a superseded choice)
    shop = data.get("shop") if isinstance(data.get("shop"), dict) else {}
    co = shop.get("carrier_co_pct", 20.0)
    if not (isinstance(co, (int, float)) and not isinstance(co, bool) and 5.0 <= co <= 50.0):
        co = 20.0  # the shop table's own check names a bad value when the plan is read
    data.update(carrier_gas="natural-gas-endo" if co == 20.0 else "own", carrier_co_pct=float(co), carrier_h2_pct=40.0)
    if data.get("treatment", "carburizing") != "carburizing":  # none of it plays a part: a new plan's values
        data.update(mass_transfer_model="gas-2026", gas_thermochemistry="nasa-glenn-2002")
        return
    data.update(mass_transfer_model="constant", gas_thermochemistry="linear-first-release")
    if not data.get("surface_held_at_equilibrium"):
        offers.append(Offer("beta_model", "gas-2026",
                            "Plans made since schema 9 take β from the carrier gas and the temperature (1.5e-5 cm/s "
                            "at 925 °C in endothermic gas, rising with CO·H2 and with temperature); this plan keeps "
                            "its one β at every temperature, as it did when it was made."))


def _to_10(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 10 names the furnace-record fit a plan's multipliers came from; an older plan's came from none
    data.update(calibration="")


def _to_11(data: dict, offers: list[Offer], made_with: int) -> None:
    # schema 11 adds the nitrides' hardness multiplier and the load spread's diffusivity factor, both filled with
    # what an older plan had without them (1: no calibration, no spread of D)
    pass


MIGRATIONS = {1: _to_2, 2: _to_3, 3: _to_4, 4: _to_5, 5: _to_6, 6: _to_7, 7: _to_8, 8: _to_9, 9: _to_10, 10: _to_11}


def migrate(data: dict) -> tuple[dict, list[Offer], list[str]]:
    """Bring a plan file's contents up to :data:`SCHEMA_VERSION` (one step per past version); returns them, the
    newer choices the migration noted but did not apply, and the file keys it filled with the table's default
    (values a version added, or that came within a version before it was numbered anew)."""
    data = dict(data)
    made_with = data["schema_version"]
    offers: list[Offer] = []
    filled: list[str] = []
    while data["schema_version"] < SCHEMA_VERSION:
        version = data["schema_version"] + 1
        MIGRATIONS[version - 1](data, offers, made_with)
        for row in PARAMETERS.values():  # the rest of what this version holds: as a new plan has it
            if row.since == version and row.file_key not in data:
                data[row.file_key] = row.kind.to_file(row.default)
                filled.append(row.key)
        data["schema_version"] = version
    return data, offers, filled


# -- reading ---------------------------------------------------------------------------------------------------------
def from_dict(data: Any) -> Plan:
    """The plan a file's contents describe; :class:`PlanFileError` naming the key at fault."""
    if not isinstance(data, dict) or data.get("kind") != FILE_KIND:
        raise PlanFileError("this is not a casedepth plan file")
    version = data.get("schema_version")
    if isinstance(version, bool) or not isinstance(version, int) or version < 1:
        raise PlanFileError(f"schema_version: unknown schema version {version!r}")
    if version > SCHEMA_VERSION:
        raise PlanFileError(f"written by a newer casedepth (schema {version}; this one reads up to {SCHEMA_VERSION}); "
                            f"update casedepth to open it")
    by_file_key = {row.file_key: row for row in PARAMETERS.values()}
    unknown = sorted(set(data) - set(by_file_key) - set(HEADER_KEYS))
    if unknown:
        raise PlanFileError(f"unknown key{'s' if len(unknown) > 1 else ''} {', '.join(unknown)}")
    missing = [row.file_key for row in by_file_key.values() if row.since <= version and row.file_key not in data]
    if missing:
        raise PlanFileError(f"{missing[0]}: missing (every plan file of schema {version} holds it)")
    data, offers, filled = migrate(data)
    values = {}
    for file_key, row in by_file_key.items():
        try:
            values[row.key] = row.kind.from_file(row.key, data[file_key])
        except InputError as error:
            raise PlanFileError(f"{file_key}: {error.message} (expected {row.kind.describe()})") from None
    treatment = values.pop("treatment", "carburizing")
    try:
        plan = Plan(treatment, **values)
    except InputError as error:
        raise PlanFileError(f"{PARAMETERS[error.field].file_key if error.field in PARAMETERS else error.field}: "
                            f"{error.message}") from None
    plan.file_offers = offers
    plan.file_notes = [f"{PARAMETERS[key].file_key}: not in this file of schema {version}; "
                       f"{PARAMETERS[key].kind.to_file(PARAMETERS[key].default)!r} taken, as for a new plan"
                       for key in filled if PARAMETERS[key].used_by(plan.values())]
    return plan


def _integer(digits: str) -> int | float:
    """An integer of the file; one too long for a float is read as infinity, which every check then refuses."""
    return int(digits) if len(digits) <= 300 else math.inf


def load(path: str | os.PathLike) -> Plan:
    """Read a plan file."""
    path = Path(path)
    remove_stale_temporaries(path)
    try:
        if path.stat().st_size > LARGEST_FILE:
            raise PlanFileError(f"{path} is {path.stat().st_size / 1e6:.0f} MB, far more than any plan file")
        data = json.loads(path.read_text(encoding="utf-8"), parse_int=_integer)
    except (OSError, UnicodeDecodeError) as error:
        raise PlanFileError(f"cannot read {path}: {getattr(error, 'strerror', None) or error}") from None
    except json.JSONDecodeError as error:
        raise PlanFileError(f"{path} is not valid JSON (line {error.lineno}): {error.msg}") from None
    except ValueError as error:  # a number JSON allows but Python will not read (an integer of 5,000 digits)
        raise PlanFileError(f"{path} holds a number too long to read: {error}") from None
    except RecursionError:
        raise PlanFileError(f"{path} is nested too deeply to be a plan file") from None
    return from_dict(data)


def save(plan: Plan, path: str | os.PathLike) -> None:
    """Write the plan as JSON atomically (a failed save never loses the previous file); the plan is then unmodified."""
    try:
        text = json.dumps(to_dict(plan), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    except ValueError:  # the plan's setters refuse NaN and inf, so this is a bug; never write it into a file
        raise InputError("plan", "holds a value that is not a finite number; nothing was saved") from None
    atomic_write(path, text)
    plan.modified = False

"""Command line: ``casedepth carburize …`` and friends.

``main(argv)`` returns the exit code (0 fine, 2 bad input) so it can run in-process. Bad input
prints one line naming the argument and the allowed range; never a traceback.
"""

from __future__ import annotations

import argparse
import json
import os
import math
import sys

from . import __version__, api
from .carburizing import CarburizingSetup, carburize, soak_time_for_case_depth
from .plan import Plan, evaluate, stage_to_dict
from .nitriding import (PHASE_NAMES, NitridingSetup, compound_layer_advice, dissociation_for_potential, nitride,
                        nitriding_potential, nitriding_potential_from_dissociation, nitriding_time)
from .recipe import plan_boost_diffuse, temperature_tradeoff
from .steels import steel_from_text
from .diffusivity import METHODS as DIFFUSIVITY_METHODS
from .errors import InputError, SolverError
from .geometry import SHAPES
from .hardness import HARDNESS_RELATIONS
from .steels import library
from .surface import DEFAULT_BETA
from .units import (ZERO_CELSIUS, DisplayUnits, format_duration, parse_length, parse_number, parse_temperature, parse_time,
                    parse_velocity)
from .atmosphere import carbon_potential_from_probe, probe_voltage_for_potential


class _UsageError(Exception):
    pass


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # argparse would print usage and exit; we want one line and exit code 2
        raise _UsageError(message)


def _printing(parser, units: bool = True, as_json: bool = True) -> None:
    """The options that say how a result is printed: --units and --json."""
    if units:
        parser.add_argument("--units", default="metric", choices=["metric", "imperial"], help="units of the printed result")
    if as_json:
        parser.add_argument("--json", action="store_true", help="print one JSON object instead of text")


def _document_outputs(parser, what: str) -> None:
    """Where and how a printed document is written: --pdf/--svg/--png FILE, --paper, --units."""
    for flag in ("--pdf", "--svg", "--png"):
        parser.add_argument(flag, metavar="FILE", help=f"write the {what} as {flag[2:].upper()}")
    parser.add_argument("--paper", default="a4", choices=["a4", "letter"], help="paper size")
    parser.add_argument("--units", default="metric", choices=["metric", "imperial"], help=f"units on the {what}")


def _build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="casedepth", description="Turn a case-depth callout into a furnace cycle.")
    parser.add_argument("--version", action="version", version=f"casedepth {__version__}")
    commands = parser.add_subparsers(dest="command", parser_class=_Parser)

    c = commands.add_parser("carburize", help="soak time for a target effective case depth, or the case a soak gives",
                            description="Soak time at temperature for a target effective case depth (--target), "
                                        "or the case depth a soak of given length gives (--time).")
    c.add_argument("--steel", required=True, help='grade from the library (8620, 16MnCr5, …) or "C=0.20 Mn=0.80 Cr=0.50" (wt %%)')
    c.add_argument("--temperature", required=True, help="furnace temperature: 925C, 1700F or 1198K")
    c.add_argument("--potential", help="carbon potential of the atmosphere, wt %% C (e.g. 1.00); "
                                       "not used with --surface-target")
    goal = c.add_mutually_exclusive_group(required=True)
    goal.add_argument("--target", help="effective case depth wanted: 1.0mm, 0.040in")
    goal.add_argument("--time", help="soak length instead of a target: 6h, 90min, 5h30min")
    c.add_argument("--at", default="0.40%C", help="threshold: 0.40%%C, 550HV, 50HRC, or total (core + 0.04 %%C, "
                                                  "SAE J423) (default 0.40%%C)")
    c.add_argument("--carbon-at", help="with --time: also report the carbon at this depth (0.5mm)")
    c.add_argument("--diffusivity", default="tibbetts", choices=list(DIFFUSIVITY_METHODS), help="carbon diffusivity model")
    c.add_argument("--d0", help="arrhenius only: D0 in m2/s (default 2.3e-5)")
    c.add_argument("--q", help="arrhenius only: activation energy in kJ/mol (default 148)")
    c.add_argument("--d-multiplier", default="1", help="calibration factor on D (default 1)")
    c.add_argument("--beta", default=f"{DEFAULT_BETA * 100:g}cm/s", help="mass-transfer coefficient: 1.5e-5cm/s, or inf for a surface held at equilibrium")
    c.add_argument("--alloy-factor", default="on", choices=["on", "off"], help="apply the Gunnarson alloy factor (default on)")
    c.add_argument("--hardness-relation", default="tempered", choices=list(HARDNESS_RELATIONS),
                   help="carbon-to-hardness relation for HV/HRC thresholds (default tempered)")
    c.add_argument("--geometry", default="plate", choices=list(SHAPES), help="plate (default), cylinder, bore or sphere")
    c.add_argument("--diameter", help="cylinder, sphere or bore diameter: 40mm")
    c.add_argument("--thickness", help="plate thickness, carburized from both faces: 10mm (default: thick section)")
    _printing(c, as_json=False)
    c.add_argument("--compare-temperatures", metavar="900C,925C,950C",
                   help="with --target: also the soak time at each of these temperatures (furnace time against "
                        "grain growth and distortion)")
    c.add_argument("--surface-target", help="plan boost and diffuse for a final surface carbon: 0.80 (±0.05) or 0.75-0.85")
    c.add_argument("--boost-potential", help="with --surface-target: carbon potential of the boost, wt %% C")
    c.add_argument("--diffuse-potential", help="with --surface-target: carbon potential of the diffuse, wt %% C")
    _printing(c, units=False)

    n = commands.add_parser("nitride", help="gas nitriding: time for a nitrided hardness depth, compound layer",
                            description="Gas nitriding: the soak for a nitrided hardness depth (core + 50 HV), the "
                                        "compound layer it gives, the surface phase; or the K_N for a compound-layer window.")
    n.add_argument("--steel", required=True, help='nitriding grade (4140, 4340, 31CrMoV9, 41CrAlMo7-10, H13) or a composition')
    n.add_argument("--temperature", required=True, help="nitriding temperature: 520C (480–590 °C)")
    potential = n.add_mutually_exclusive_group()
    potential.add_argument("--kn", help="nitriding potential K_N, atm^-1/2 (e.g. 3)")
    potential.add_argument("--dissociation", help="ammonia dissociation of the exhaust, %% (e.g. 30)")
    potential.add_argument("--exhaust", help="measured exhaust gas, volume %%: NH3=40,H2=45 (K_N = pNH3/pH2^1.5)")
    goal = n.add_mutually_exclusive_group(required=True)
    goal.add_argument("--target", help="nitrided hardness depth (core + 50 HV): 0.4mm")
    goal.add_argument("--time", help="soak length instead of a target: 20h")
    n.add_argument("--compound", help="compound-layer window, e.g. 5-10um: prints the K_N that keeps the layer in it")
    n.add_argument("--core-hardness", help="core hardness after quench and temper, HV (default: the grade's typical value)")
    n.add_argument("--surface-hardness", help="nitrided surface hardness, HV (default: the grade's typical value)")
    n.add_argument("--d-multiplier", default="1", help="calibration factor on the nitrogen diffusivity (default 1)")
    _printing(n)

    ch = commands.add_parser("chart", help="print a case-depth chart (PDF, SVG or PNG)",
                             description="A case-depth chart: effective case depth (or, for nitriding, nitrided "
                                         "hardness depth and compound layer) against time at several temperatures "
                                         "(or potentials), with a table of times for standard depths.")
    ch.add_argument("--steel", required=True, help="grade or composition, as for carburize (or nitride)")
    ch.add_argument("--treatment", default="carburizing", choices=["carburizing", "nitriding"],
                    help="carburizing (default) or gas nitriding")
    vary = ch.add_mutually_exclusive_group(required=True)
    vary.add_argument("--temperatures", help="900,925,950 (°C unless a unit is given: 1650F,1700F)")
    vary.add_argument("--potentials", help="0.9,1.0,1.1 (wt %% C; for nitriding K_N: 1,3,6), at --temperature")
    ch.add_argument("--temperature", help="with --potentials: the furnace temperature")
    ch.add_argument("--potential", help="with --temperatures: the carbon potential (wt %% C), default 1.0")
    ch.add_argument("--kn", help="nitriding, with --temperatures: the nitriding potential K_N (default 3)")
    ch.add_argument("--at", default="0.40%C", help="threshold: 0.40%%C, 550HV, 50HRC or total")
    ch.add_argument("--hours", help="length of the time axis, h (default: long enough for the table, up to 96 h; "
                                    "200 h for nitriding)")
    _document_outputs(ch, "chart")

    sh = commands.add_parser("sheet", help="print the process sheet of a saved plan (PDF, SVG or PNG)")
    sh.add_argument("plan", help="the plan file")
    _document_outputs(sh, "sheet")
    sh.add_argument("--shop", default="", help="shop name for the title block")
    sh.add_argument("--logo", help="logo image (PNG) for the title block")
    sh.add_argument("--revision", help="revision (default: the plan's)")

    r = commands.add_parser("run", help="run a saved plan and print its results and the cycle quote",
                            description="Run a saved plan (*.cdplan.json) and print its results and the cycle quote.")
    r.add_argument("plan", help="the plan file")
    _printing(r)

    cb = commands.add_parser("calibrate", help="the diffusivity multiplier that reproduces a measured section",
                             description="From a plan, the soak a load actually had and the depth measured on its "
                                         "section, the diffusivity multiplier with which the plan's models give that "
                                         "depth (carburizing: effective case depth at the plan's threshold; nitriding: "
                                         "nitrided hardness depth).")
    cb.add_argument("plan", metavar="PLAN", help="the plan file (one soak, or one nitriding stage)")
    cb.add_argument("--soak", required=True, help="the soak the load had at temperature: 6h, 6h30min, 390min")
    cb.add_argument("--measured", required=True, help="the depth measured on the section: 0.95mm, 0.037in")
    cb.add_argument("--write", action="store_true", help="store the multiplier in the plan file")
    _printing(cb, units=False)

    ld = commands.add_parser("load", help="one soak for several parts in one furnace load",
                             description="Combine saved one-soak plans that share the furnace step into one load: the "
                                         "soak every part's drawing window allows, and each part's case at it.")
    ld.add_argument("plans", nargs="+", metavar="PLAN", help="plan files (*.cdplan.json)")
    _printing(ld)

    pr = commands.add_parser("probe", help="oxygen-probe millivolts <-> carbon potential in endothermic gas",
                             description="Convert between an oxygen probe's voltage (air reference) and the carbon "
                                         "potential it means, at a temperature and CO content (ideal probe; trim "
                                         "with the controller's CO or process factor as the shop does).")
    pr.add_argument("--temperature", required=True, help="furnace temperature: 925C (800–1100 °C)")
    reading = pr.add_mutually_exclusive_group(required=True)
    reading.add_argument("--potential", help="carbon potential, wt %% C: prints the probe voltage")
    reading.add_argument("--mv", help="probe voltage, mV: prints the carbon potential")
    pr.add_argument("--carrier-co", default="20", help="CO in the carrier gas, vol %% (default 20)")
    _printing(pr, units=False)

    commands.add_parser("steels", help="list the steel library")
    commands.add_parser("gui", help="open the window: casedepth gui [PLAN.json] [--screenshot OUT.png]", add_help=False)
    return parser


# library field name -> the flag a command-line user typed
FLAGS = {
    "steel": "--steel", "temperature": "--temperature", "carbon potential": "--potential", "target": "--target",
    "time": "--time", "threshold": "--at", "carbon at": "--carbon-at", "diffusivity": "--diffusivity",
    "D0": "--d0", "Q": "--q", "diffusivity multiplier": "--d-multiplier", "beta": "--beta",
    "hardness relation": "--hardness-relation", "geometry": "--geometry", "diameter": "--diameter",
    "thickness": "--thickness", "surface target": "--surface-target", "boost potential": "--boost-potential",
    "diffuse potential": "--diffuse-potential", "plan file": "PLAN", "compare temperatures": "--compare-temperatures",
    "nitriding potential": "--kn", "dissociation": "--dissociation", "compound layer": "--compound",
    "nitriding atmosphere": "--exhaust",
    "core hardness": "--core-hardness", "nitrided surface hardness": "--surface-hardness",
    "second stage K_N": "--compound", "temperatures": "--temperatures", "potentials": "--potentials", "hours": "--hours", "output": "--pdf/--svg/--png",
    "paper": "--paper", "CO": "--carrier-co", "probe": "--mv", "plan": "PLAN", "soak": "--soak",
    "measured": "--measured",
}


def setup_from_args(args) -> CarburizingSetup:
    """The :class:`CarburizingSetup` the ``carburize`` arguments describe."""
    potential = args.potential
    if args.surface_target is not None:
        if potential is not None:
            raise InputError("carbon potential", "not used with --surface-target; give --boost-potential and --diffuse-potential")
        potential = parse_number(args.diffuse_potential, "diffuse potential") if args.diffuse_potential else None
    if potential is None:
        raise InputError("carbon potential" if args.surface_target is None else "diffuse potential",
                         "required (wt % C, 0.05–2)")
    return api.setup(
        args.steel, args.temperature, potential, at=args.at, diffusivity=args.diffusivity,
        beta=parse_velocity(args.beta, "beta"), alloy_factor=args.alloy_factor == "on", geometry=args.geometry,
        diameter=args.diameter, thickness=args.thickness, hardness_relation=args.hardness_relation,
        d0=args.d0, q=args.q, d_multiplier=args.d_multiplier,
    )


def _format(result, units: DisplayUnits) -> str:
    s = result.setup
    length = units.format_length
    temp = units.format_temperature(s.temperature)
    lines = []
    if result.target_depth is not None:
        lines.append(f"Soak time: {format_duration(result.soak_time)} ({result.soak_time / 3600:.2f} h) at {temp}, "
                     f"carbon potential {s.carbon_potential:.2f} %C")
    else:
        lines.append(f"Soak of {format_duration(result.soak_time)} at {temp}, carbon potential {s.carbon_potential:.2f} %C")
    lines.append(f"  {s.threshold.depth_name:<21} {length(result.case_depth)} at {s.threshold}"
                 + (f" (= {s.threshold_carbon:.3f} %C)" if s.threshold.kind != "carbon" else ""))
    lines.append(f"  surface carbon        {result.surface_carbon:.3f} %C at the end "
                 f"(equilibrium {s.equilibrium_carbon:.3f} %C, saturation {s.saturation_carbon:.2f} %C)")
    lines.append(f"  steel                 {s.steel.name} ({s.steel.standard}), core {s.steel.carbon:.3f} %C, "
                 f"alloy factor {s.alloy_factor:.3f}" + ("" if s.alloy_factor_on else " (off)"))
    beta = "inf (surface held at equilibrium)" if math.isinf(s.beta) else f"{s.beta * 100:.3g} cm/s"
    lines.append(f"  models                D: {s.diffusivity.display}; β = {beta}; {s.geometry.describe()}")
    mv = _probe_mv(s.carbon_potential, s.temperature)
    if mv is not None:
        lines.append(f"  oxygen probe          {mv:.0f} mV for {s.carbon_potential:.2f} %C with 20 % CO carrier "
                     f"(ideal probe; `casedepth probe` for other CO)")
    if result.carbon_at_depth is not None:
        lines.append(f"  carbon at {length(result.probe_depth):<11} {result.carbon_at_depth:.3f} %C")
    if result.target_depth is None:
        lines.append(f"  diffusion length √(Dt) {length(result.diffusion_length)} (D at the threshold carbon; "
                     f"a length scale, not a depth where the carbon stops)")
    for w in result.warnings:
        lines.append(f"Warning: {w}")
    return "\n".join(lines)


def _probe_mv(potential: float, temperature: float) -> float | None:
    """Ideal probe voltage [mV] in 20 % CO carrier gas, or None outside the relation's range."""
    try:
        return probe_voltage_for_potential(potential, temperature)
    except InputError:
        return None


def _surface_window(text: str) -> float | tuple[float, float]:
    parts = text.replace("–", "-").split("-")
    if len(parts) == 1:
        return parse_number(parts[0], "surface target")
    if len(parts) == 2:
        return (parse_number(parts[0], "surface target"), parse_number(parts[1], "surface target"))
    raise InputError("surface target", f"cannot read {text!r}; write 0.80 or 0.75-0.85 (wt % C)")


def _boost_diffuse(args, setup: CarburizingSetup) -> int:
    if args.target is None:
        raise InputError("surface target", "needs --target (the effective case depth to plan for)")
    if args.boost_potential is None:
        raise InputError("boost potential", "required with --surface-target (wt % C, 0.05–2)")
    plan = plan_boost_diffuse(setup, parse_length(args.target, "target"), _surface_window(args.surface_target),
                              parse_number(args.boost_potential, "boost potential"), setup.carbon_potential)
    cycle = plan.cycle
    if args.json:
        out = {
            "boost_time_h": plan.boost_time / 3600.0, "diffuse_time_h": plan.diffuse_time / 3600.0,
            "soak_time_h": (plan.boost_time + plan.diffuse_time) / 3600.0,
            "case_depth_mm": cycle.case_depth * 1e3, "surface_carbon_pct": cycle.surface_carbon,
            "surface_target_pct": list(plan.surface_target), "surface_aim_pct": plan.surface_aim,
            "target_depth_mm": plan.target_depth * 1e3, "threshold": str(setup.threshold),
            "threshold_carbon_pct": setup.threshold_carbon, "temperature_c": setup.temperature - 273.15,
            "boost_potential_pct": parse_number(args.boost_potential, "boost potential"),
            "diffuse_potential_pct": setup.carbon_potential, "steel": setup.steel.name,
            "warnings": setup.warnings() + cycle.warnings,
            "profile": {"depth_mm": (cycle.profile.depth * 1e3).tolist(), "carbon_pct": cycle.profile.carbon.tolist()},
        }
        print(json.dumps(out))
        return 0
    units = DisplayUnits(args.units)
    print(f"Boost {format_duration(plan.boost_time)} at carbon potential {args.boost_potential} %C, then diffuse "
          f"{format_duration(plan.diffuse_time)} at {setup.carbon_potential:.2f} %C, at {units.format_temperature(setup.temperature)}")
    print(f"  {setup.threshold.depth_name:<21} {units.format_length(cycle.case_depth)} at {setup.threshold}")
    print(f"  surface carbon        {cycle.surface_carbon:.3f} %C at the end (window {plan.surface_target[0]:.2f}–"
          f"{plan.surface_target[1]:.2f} %C, aimed at {plan.surface_aim:.3f})")
    print(f"  time at temperature   {format_duration(plan.boost_time + plan.diffuse_time)}")
    for warning in setup.warnings() + cycle.warnings:
        print(f"Warning: {warning}")
    return 0


def _carburize(args) -> int:
    setup = setup_from_args(args)
    if args.surface_target is not None:
        return _boost_diffuse(args, setup)
    if args.target is not None:
        if args.carbon_at:
            raise InputError("carbon at", "only used with --time")
        result = soak_time_for_case_depth(setup, parse_length(args.target, "target"))
        tradeoff = _tradeoff(args, setup, result.target_depth)
    else:
        if args.compare_temperatures:
            raise InputError("compare temperatures", "only used with --target")
        probe = parse_length(args.carbon_at, "carbon at") if args.carbon_at else None
        result = carburize(setup, parse_time(args.time, "time"), probe)
    if args.json:
        out = result.to_dict()
        out["probe_mv"] = _probe_mv(setup.carbon_potential, setup.temperature)
        if args.target is not None and tradeoff:
            out["temperature_tradeoff"] = [{"temperature_c": T - 273.15, "soak_time_h": t / 3600.0} for T, t in tradeoff]
        if args.time is not None:
            out["diffusion_length_note"] = ("sqrt(D t) with D at the threshold carbon: a length scale, "
                                            "not a depth at which all carbon stops")
        print(json.dumps(out))
    else:
        units = DisplayUnits(args.units)
        print(_format(result, units))
        if args.target is not None and tradeoff:
            print("Same case at other temperatures:")
            for T, t in tradeoff:
                print(f"  {units.format_temperature(T):>8}  {format_duration(t):>12}  ({t / 3600:.2f} h)")
    return 0


def _tradeoff(args, setup: CarburizingSetup, target: float) -> list[tuple[float, float]]:
    if not args.compare_temperatures:
        return []
    temperatures = [parse_temperature(t, "compare temperatures") for t in args.compare_temperatures.split(",") if t.strip()]
    try:
        return temperature_tradeoff(setup, target, temperatures)
    except InputError as error:
        raise InputError("compare temperatures", error.message) from None


def _run(args) -> int:
    plan = Plan.load(args.plan)
    outcome = evaluate(plan.values())
    if outcome.process == "nitriding":
        return _print_nitriding(plan, outcome, args)
    setup, quote = outcome.setup, outcome.quote
    if args.json:
        out = {
            "plan": plan.title, "process": outcome.process, "case_depth_mm": outcome.case_depth * 1e3,
            "surface_carbon_pct": outcome.surface_carbon, "threshold": str(setup.threshold),
            "threshold_carbon_pct": setup.threshold_carbon,
            "target_depth_mm": [d * 1e3 for d in outcome.targets],
            "stages": [stage_to_dict(stage) for stage in outcome.stages],
            "quote": quote.to_dict(), "warnings": list(outcome.warnings),
            "cautions": [c.title for c in outcome.cautions],
            "profile": {"depth_mm": (outcome.profile.depth * 1e3).tolist(), "carbon_pct": outcome.profile.carbon.tolist()},
            "probe_mv": [{"stage": label, "mv": mv} for label, mv in outcome.probe],
            "carrier_co_pct": outcome.carrier_co * 100.0,
        }
        if outcome.process == "single":
            soak_low, soak, soak_high = outcome.soak_window
            out.update(soak_time_h=soak / 3600.0, window_soak_time_h=[soak_low / 3600.0, soak_high / 3600.0],
                       shop_stages_counted=outcome.counts_shop_stages,
                       soak_time_alone_h=outcome.aim.soak_time / 3600.0)
        if outcome.boost_time is not None:
            out.update(boost_time_h=outcome.boost_time / 3600.0, diffuse_time_h=outcome.diffuse_time / 3600.0,
                       soak_time_h=(outcome.boost_time + outcome.diffuse_time) / 3600.0)
        print(json.dumps(out))
        return 0
    units = DisplayUnits(args.units)
    print(f"{plan.title} ({outcome.process})")
    if outcome.process == "single":
        soak_low, soak, soak_high = outcome.soak_window
        print(f"  soak {format_duration(soak)} at {units.format_temperature(setup.temperature)}, "
              f"carbon potential {setup.carbon_potential:.2f} %C (window {format_duration(soak_low)} to "
              f"{format_duration(soak_high)})")
        if outcome.counts_shop_stages:
            print(f"  the shop's heat-up and drop are counted in the case; a soak alone would need "
                  f"{format_duration(outcome.aim.soak_time)}")
    elif outcome.boost_time is not None:
        print(f"  boost {format_duration(outcome.boost_time)} at {plan.boost_potential:.2f} %C, diffuse "
              f"{format_duration(outcome.diffuse_time)} at {plan.diffuse_potential:.2f} %C, at "
              f"{units.format_temperature(setup.temperature)}")
    print(f"  {setup.threshold.depth_name} {units.format_length(outcome.case_depth)} at {setup.threshold}; surface carbon "
          f"{outcome.surface_carbon:.3f} %C at the end")
    if outcome.probe:
        print("  oxygen probe (ideal, " + f"{outcome.carrier_co * 100:g} % CO): "
              + ", ".join(f"{label.lower()} {mv:.0f} mV" for label, mv in outcome.probe))
    print("Cycle quote:")
    print(quote.text())
    for warning in outcome.warnings:
        print(f"Warning: {warning}")
    return 0


def _exhaust_potential(text: str) -> float:
    """K_N from measured exhaust fractions written as ``NH3=40,H2=45`` (volume %, 1 atm total)."""
    fractions = {}
    for part in text.replace(";", ",").split(","):
        name, sep, value = part.partition("=")
        name = name.strip().upper()
        if not sep or name not in ("NH3", "H2"):
            raise InputError("nitriding atmosphere", f"{text!r} is not of the form NH3=40,H2=45 (volume %)")
        fractions[name] = parse_number(value.strip().rstrip("%"), "nitriding atmosphere") / 100.0
    if set(fractions) != {"NH3", "H2"} or not (0 < fractions["NH3"] + fractions["H2"] <= 1.0 + 1e-9):
        raise InputError("nitriding atmosphere", f"{text!r}: give both NH3 and H2, each above 0 and together at most 100 %")
    return nitriding_potential(fractions["NH3"], fractions["H2"])


def _nitride(args) -> int:
    if args.kn is not None:
        kn = parse_number(args.kn, "nitriding potential")
    elif args.dissociation is not None:
        kn = nitriding_potential_from_dissociation(parse_number(args.dissociation.rstrip("%"), "dissociation") / 100.0)
    elif args.exhaust is not None:
        kn = _exhaust_potential(args.exhaust)
    else:
        raise InputError("nitriding potential", "give --kn (atm^-1/2), --dissociation (%) or --exhaust NH3=..,H2=.. (%)")
    setup = NitridingSetup(
        steel_from_text(args.steel, "steel", process="nitriding"), parse_temperature(args.temperature, "temperature"), kn,
        None if args.core_hardness is None else parse_number(args.core_hardness, "core hardness"),
        None if args.surface_hardness is None else parse_number(args.surface_hardness, "nitrided surface hardness"),
        parse_number(args.d_multiplier, "diffusivity multiplier"))
    if args.target is not None:
        result = nitriding_time(setup, parse_length(args.target, "target"))
    else:
        result = nitride(setup, parse_time(args.time, "time"))
    out = result.to_dict()
    window_kn, stages = None, None
    if args.compound:
        window = _window_um(args.compound)
        advice = compound_layer_advice(setup, result, window)
        window_kn, stages = advice.kn_for_window, advice.two_stage
        out["compound_window_um"] = [w * 1e6 for w in window]
        out["kn_for_compound_window"] = window_kn
        out["dissociation_for_compound_window_pct"] = 100.0 * dissociation_for_potential(window_kn)
        if stages is not None:
            out["two_stage"] = {"first_time_h": stages.first_time / 3600.0, "first_kn": stages.first_kn,
                                "second_time_h": stages.second_time / 3600.0, "second_kn": stages.second_kn,
                                "compound_layer_um": stages.compound_layer * 1e6,
                                "epsilon_layer_um": stages.layer.epsilon * 1e6,
                                "gamma_prime_layer_um": stages.layer.gamma_prime * 1e6}
        if advice.message:
            out["warnings"].append(advice.message)
    if args.json:
        print(json.dumps(out))
        return 0
    units = DisplayUnits(args.units)
    print(f"Nitriding time: {format_duration(result.time)} ({result.time / 3600:.1f} h) at "
          f"{units.format_temperature(setup.temperature)}, K_N {kn:.2f} atm^-1/2 "
          f"({out['dissociation_pct']:.0f} % dissociation)")
    print(f"  nitrided hardness depth {units.format_length(result.nitrided_depth)} (core {setup.core:.0f} HV + 50 HV)")
    print(f"  compound layer          {result.layer.describe()}; surface phase {PHASE_NAMES[result.layer.surface_phase]}")
    if window_kn is not None:
        print(f"  for a {out['compound_window_um'][0]:g}–{out['compound_window_um'][1]:g} µm layer: K_N "
              f"{window_kn:.2f} ({out['dissociation_for_compound_window_pct']:.0f} % dissociation)")
    if stages is not None:
        print(f"  or two stages: {stages.first_time / 3600:.1f} h at K_N {stages.first_kn:.2f}, then "
              f"{stages.second_time / 3600:.1f} h at K_N {stages.second_kn:.2f} (layer {stages.layer.describe()})")
    for warning in out["warnings"]:
        print(f"Warning: {warning}")
    print("Caution: ammonia is toxic (exposure limits of tens of ppm) and flammable; purge before opening; "
          "local codes and licensed practice govern.")
    return 0


def _print_nitriding(plan, outcome, args) -> int:
    out = outcome.aim.to_dict()
    out.update(plan=plan.title, process="nitriding", target_depth_mm=[d * 1e3 for d in outcome.targets],
               window_soak_time_h=[outcome.low.time / 3600.0, outcome.high.time / 3600.0],
               compound_window_um=[w * 1e6 for w in outcome.compound_window], kn_for_compound_window=outcome.kn_for_window,
               warnings=list(outcome.warnings), cautions=[c.title for c in outcome.cautions])
    out["quote"] = outcome.quote.to_dict()
    two = outcome.schedule
    out["stages"] = ([{"time_h": outcome.aim.time / 3600.0, "kn": outcome.setup.nitriding_potential}] if two is None else
                     [{"time_h": two.first_time / 3600.0, "kn": two.first_kn},
                      {"time_h": two.second_time / 3600.0, "kn": two.second_kn}])
    if args.json:
        print(json.dumps(out))
        return 0
    units = DisplayUnits(args.units)
    s = outcome.setup
    print(f"{plan.title} (gas nitriding)")
    print(f"  nitride {format_duration(outcome.aim.time)} at {units.format_temperature(s.temperature)}, K_N "
          f"{s.nitriding_potential:.2f} (window {format_duration(outcome.low.time)} to {format_duration(outcome.high.time)})")
    if outcome.schedule is not None:
        two = outcome.schedule
        print(f"  in two stages: {format_duration(two.first_time)} at K_N {two.first_kn:.2f}, then "
              f"{format_duration(two.second_time)} at K_N {two.second_kn:.2f}")
    print(f"  nitrided hardness depth {units.format_length(outcome.aim.nitrided_depth)}; compound layer "
          f"{outcome.aim.layer.describe()}")
    print("Cycle quote:")
    print(outcome.quote.text())
    for warning in outcome.warnings:
        print(f"Warning: {warning}")
    return 0


def _window_um(text: str) -> tuple[float, float]:
    parts = text.lower().replace("µm", "").replace("um", "").replace("–", "-").split("-")
    if len(parts) != 2:
        raise InputError("compound layer", f"cannot read {text!r}; write a window such as 5-10um")
    return (parse_number(parts[0], "compound layer") * 1e-6, parse_number(parts[1], "compound layer") * 1e-6)


def _outputs(args) -> list[tuple[str, str]]:
    outputs = [(fmt, getattr(args, fmt)) for fmt in ("pdf", "svg", "png") if getattr(args, fmt)]
    if not outputs:
        raise InputError("output", "say where to write it: --pdf FILE, --svg FILE or --png FILE")
    return outputs


def _nitriding_chart(args):
    from .documents import nitriding_chart

    steel = steel_from_text(args.steel, "steel", process="nitriding")
    hours = None if args.hours is None else parse_number(args.hours, "hours")
    if args.temperatures:
        temperatures = [parse_temperature(t, "temperatures") for t in args.temperatures.split(",") if t.strip()]
        if not 1 <= len(temperatures) <= 6:
            raise InputError("temperatures", "give one to six temperatures")
        setup = NitridingSetup(steel, temperatures[0], parse_number(args.kn or "3", "nitriding potential"))
        for T in temperatures[1:]:
            NitridingSetup(steel, T, setup.nitriding_potential)  # each temperature must be a nitriding one
        return nitriding_chart(setup, temperatures=temperatures, paper=args.paper, units=args.units, hours=hours)
    if args.temperature is None:
        raise InputError("temperature", "required with --potentials")
    potentials = [parse_number(k, "potentials") for k in args.potentials.split(",") if k.strip()]
    if not 1 <= len(potentials) <= 6:
        raise InputError("potentials", "give one to six nitriding potentials")
    setup = NitridingSetup(steel, parse_temperature(args.temperature, "temperature"), potentials[0])
    for k in potentials[1:]:
        NitridingSetup(steel, setup.temperature, k)
    return nitriding_chart(setup, potentials=potentials, paper=args.paper, units=args.units, hours=hours)


def _chart(args) -> int:
    try:
        return _chart_unchecked(args)
    except InputError as error:
        if args.temperatures and error.field == "temperature":  # one of the list the user gave
            raise InputError("temperatures", error.message) from None
        if args.potentials and error.field in ("carbon potential", "nitriding potential"):
            raise InputError("potentials", error.message) from None
        raise


def _chart_unchecked(args) -> int:
    from .documents import case_depth_chart, save

    outputs = _outputs(args)
    if args.treatment == "nitriding":
        for written in (w for fmt, path in outputs for w in save(_nitriding_chart(args), path, fmt)):
            print(f"wrote {written}")
        return 0
    if args.temperatures:
        potential = args.potential if args.potential is not None else "1.0"
        temperatures = [parse_temperature(t, "temperatures") for t in args.temperatures.split(",") if t.strip()]
        if not 1 <= len(temperatures) <= 6:
            raise InputError("temperatures", "give one to six temperatures")
        setup = api.setup(args.steel, f"{temperatures[0]}K", potential, at=args.at)
        document = case_depth_chart(setup, temperatures=temperatures, paper=args.paper, units=args.units,
                                    hours=None if args.hours is None else parse_number(args.hours, "hours"))
    else:
        if args.temperature is None:
            raise InputError("temperature", "required with --potentials")
        potentials = [parse_number(p, "potentials") for p in args.potentials.split(",") if p.strip()]
        if not 1 <= len(potentials) <= 6:
            raise InputError("potentials", "give one to six carbon potentials")
        setup = api.setup(args.steel, f"{parse_temperature(args.temperature, 'temperature')}K", potentials[0], at=args.at)
        document = case_depth_chart(setup, potentials=potentials, paper=args.paper, units=args.units,
                                    hours=None if args.hours is None else parse_number(args.hours, "hours"))
    for fmt, path in outputs:
        for written in save(document, path, fmt):
            print(f"wrote {written}")
    return 0


def _sheet(args) -> int:
    from .documents import process_sheet, save

    outputs = _outputs(args)
    plan = Plan.load(args.plan)
    document = process_sheet(plan, evaluate(plan.values()), paper=args.paper, units=args.units, shop=args.shop,
                             logo=args.logo, revision=args.revision or plan.revision)
    for fmt, path in outputs:
        for written in save(document, path, fmt):
            print(f"wrote {written}")
    return 0


def _calibrate(args) -> int:
    from .calibration import calibrate_plan

    plan = Plan.load(args.plan)
    found = calibrate_plan(plan, parse_time(args.soak, "soak"), parse_length(args.measured, "measured"))
    if args.write:
        plan.set(found.field, round(found.multiplier, 3))
        plan.save(args.plan)
    if args.json:
        print(json.dumps({"multiplier": found.multiplier, "field": found.field, "predicted_mm": found.predicted * 1e3,
                          "measured_mm": found.measured * 1e3, "soak_time_h": found.soak_time / 3600.0,
                          "written": bool(args.write)}))
        return 0
    print(found.describe())
    print(f"  {'stored in ' + str(args.plan) if args.write else 'add --write to store it in the plan'} "
          f"({'nitrogen' if found.field == 'n_multiplier' else 'carbon'} diffusivity multiplier)")
    return 0


def _load(args) -> int:
    from .loads import plan_load

    load = plan_load([Plan.load(path) for path in args.plans])
    if args.json:
        print(json.dumps(load.to_dict()))
        return 0
    print(load.text(DisplayUnits(args.units)))
    return 0


def _probe(args) -> int:
    T = parse_temperature(args.temperature, "temperature")
    co = parse_number(args.carrier_co.rstrip("%"), "CO") / 100.0
    if args.potential is not None:
        potential = parse_number(args.potential, "carbon potential")
        mv = probe_voltage_for_potential(potential, T, co)
    else:
        mv = parse_number(args.mv, "probe")
        potential = carbon_potential_from_probe(mv, T, co)
    if args.json:
        print(json.dumps({"temperature_c": round(T - ZERO_CELSIUS, 6), "carbon_potential_pct": potential, "probe_mv": mv,
                          "carrier_co_pct": co * 100.0}))
        return 0
    print(f"{mv:.0f} mV  <->  carbon potential {potential:.3f} %C at {DisplayUnits('metric').format_temperature(T)}, "
          f"{co * 100:g} % CO (ideal probe, air reference; trim with the controller's CO factor)")
    return 0


def _steels(_args) -> int:
    for steel in library("all"):
        print(f"{steel.name:<13} {steel.process:<12} {steel.standard:<34} {steel.composition_text()}")
    return 0


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    argv = sys.argv[1:] if argv is None else list(argv)
    if not argv or argv[0] == "gui":  # the window; Qt is imported only here
        from .gui.app import main as window_main

        return window_main(argv[1:])
    parser = _build_parser()
    try:
        args = parser.parse_args(argv)
        handler = {"carburize": _carburize, "steels": _steels, "run": _run, "nitride": _nitride, "chart": _chart,
                   "sheet": _sheet, "probe": _probe, "load": _load, "calibrate": _calibrate}.get(args.command)
        if handler is not None:
            return handler(args)
        parser.print_help()
        return 0
    except SystemExit as stop:  # --help and --version
        return int(stop.code or 0)
    except _UsageError as error:
        print(f"casedepth: error: {error}", file=sys.stderr)
        return 2
    except InputError as error:
        print(f"casedepth: error: {FLAGS.get(error.field, error.field)}: {error.message}", file=sys.stderr)
        return 2
    except SolverError as error:
        print(f"casedepth: the solver stopped: {error}", file=sys.stderr)
        return 1
    except BrokenPipeError:  # the reader (e.g. `| head`) left early: stop quietly
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return 1


if __name__ == "__main__":
    sys.exit(main())

"""Command line: ``casedepth carburize …``, ``casedepth nitride …`` and friends.

The planning commands come from the treatment table (one command per treatment) and their options
from the parameter table (the rows a treatment uses); they build a plan and evaluate it exactly as
the window and ``casedepth run`` do. ``main(argv)`` returns the exit code (0 fine, 2 bad input,
1 the solver stopped) so it can run in-process. Bad input prints one line naming the option (or the
plan file's key) and the allowed range; never a traceback.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from contextlib import contextmanager
from pathlib import Path

from . import __version__, formats
from .constants import ZERO_CELSIUS
from .errors import InputError, SolverError
from .files import FileWriteError, writable
from .models.atmosphere import (DEFAULT_CARRIER, DEFAULT_GAS_DATA, GAS_DATA, READINGS, FurnaceGas, carrier_from_text,
                                check_carrier, convert_reading)
from .models.steels import library
from .parameters import PARAMETERS, OptionError, label, option_for, options_for
from .models.hardness import SCALES
from .plan import Plan, compare_temperatures, evaluate, forward, load, plan_from_options, save
from .treatments import TREATMENTS
from .units import DisplayUnits, check_text, format_duration, parse_length, parse_number, parse_temperature, parse_time


class _UsageError(Exception):
    pass


@contextmanager
def _writing(field: str):
    """A file that cannot be written is bad input of the option that named it (exit 2, one line)."""
    try:
        yield
    except FileWriteError as error:
        raise InputError(field, str(error)) from None


def _shown(path) -> str:
    """A file name as it can be printed: bytes the system could not decode (a name from another encoding)
    shown as replacement characters rather than stopping the print."""
    return os.fsencode(str(path)).decode("utf-8", "replace")


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


def _plan_command(commands, treatment, wanted: str | None) -> None:
    """A treatment's planning command: every option of the parameter rows it uses, and the goal. Only the
    command being run (``wanted``) gets its options: a command's options ask the tables for their choices,
    and ``casedepth --help`` or another command need not load every treatment's models for that."""
    parser = commands.add_parser(treatment.command, help=treatment.description.split(":")[0],
                                 description=treatment.description)
    if wanted != treatment.command:
        return
    goal = parser.add_mutually_exclusive_group(required=True)
    groups = {}
    for row, option in options_for(treatment.key):
        where = goal if option.flag == "--target" else parser
        if option.flag != "--target" and len(row.options) > 1:  # several ways to give one value: one of them
            if row.key not in groups:
                groups[row.key] = parser.add_mutually_exclusive_group()
            where = groups[row.key]
        where.add_argument(option.flag, dest=option.dest, help=option.help, metavar=option.metavar,
                           choices=option.choices() if option.choices else None)
    goal.add_argument("--time", help="instead of a target: what a soak of this length gives (6h, 90min, 5h30min)")
    for option in treatment.forward_options:
        parser.add_argument(option.flag, dest=option.dest, help=option.help)
    parser.add_argument("--compare-temperatures", metavar="T1,T2,…",
                        help="with --target: also the soak at each of these temperatures, the plan otherwise unchanged")
    parser.add_argument("--save", metavar="PLAN", help="also write the plan as a plan file (casedepth run PLAN gives "
                                                       "the same numbers)")
    _printing(parser)
    parser.set_defaults(handler=_plan, treatment=treatment.key)


def _build_parser(argv: list[str] | None = None) -> argparse.ArgumentParser:
    """The parser; a treatment's planning command gets its options only if ``argv`` runs it (None: every one)."""
    parser = _Parser(prog="casedepth", description="Turn a case-depth callout into a furnace cycle.")
    parser.add_argument("--version", action="version", version=f"casedepth {__version__}")
    commands = parser.add_subparsers(dest="command", parser_class=_Parser)
    named = None if argv is None else next((a for a in argv if not a.startswith("-")), "")
    for treatment in TREATMENTS.values():
        _plan_command(commands, treatment, treatment.command if argv is None else named)

    ch = commands.add_parser("chart", help="print a case-depth chart (PDF, SVG or PNG)",
                             description="A case-depth chart: the depth against time at temperature for several "
                                         "temperatures (or potentials), with a table of times for standard depths.")
    ch.add_argument("--treatment", default="carburizing", choices=list(TREATMENTS), help="the treatment (default carburizing)")
    ch.add_argument("--steel", required=True, help="grade or composition, as for the planning commands")
    vary = ch.add_mutually_exclusive_group(required=True)
    vary.add_argument("--temperatures", help="900,925,950 (°C unless a unit is given: 1650F,1700F)")
    vary.add_argument("--potentials", help="0.9,1.0,1.1 (carbon potential, wt %% C; nitriding: K_N 1,3,6), at --temperature")
    ch.add_argument("--temperature", help="with --potentials: the furnace temperature")
    ch.add_argument("--potential", help="carburizing, with --temperatures: the carbon potential (default the plan's, 1.0)")
    ch.add_argument("--kn", help="nitriding, with --temperatures: the nitriding potential K_N (default 3)")
    ch.add_argument("--at", help="carburizing: threshold 0.40%%C, 550HV, 50HRC or total")
    ch.add_argument("--hours", help="length of the time axis, h (default: long enough for the table)")
    ch.add_argument("--shop", default="", help="the shop's name, printed over the title")
    ch.add_argument("--customer", default="", help="the customer the chart is for, printed over the title")
    ch.add_argument("--logo", help="logo image (PNG) printed at the top right")
    _document_outputs(ch, "chart")
    ch.set_defaults(handler=_chart)

    sh = commands.add_parser("sheet", help="print the process sheet of a saved plan (PDF, SVG or PNG)")
    sh.add_argument("plan", help="the plan file")
    _document_outputs(sh, "sheet")
    sh.add_argument("--shop", default="", help="shop name for the title block")
    sh.add_argument("--logo", help="logo image (PNG) for the title block")
    sh.add_argument("--revision", help="revision (default: the plan's)")
    sh.add_argument("--quote", action="store_true", help="the quote for the office (stage times and cost) instead "
                                                        "of the floor's process sheet")
    sh.set_defaults(handler=_sheet)

    r = commands.add_parser("run", help="run a saved plan and print its results and the cycle quote",
                            description="Run a saved plan (*.cdplan.json) and print its results and the cycle quote.")
    r.add_argument("plan", help="the plan file")
    _printing(r)
    r.set_defaults(handler=_run)

    cb = commands.add_parser("calibrate", help="the diffusivity multiplier that reproduces a measured section",
                             description="From a plan, the soak a load actually had and what was measured on its "
                                         "section, the diffusivity multiplier with which the plan's models reproduce "
                                         "it: a depth (--measured; carburizing: effective case depth at the plan's "
                                         "threshold; nitriding: nitrided hardness depth), or for nitriding a whole "
                                         "hardness traverse (--traverse; the multiplier whose hardness profile fits "
                                         "the readings best).")
    cb.add_argument("plan", metavar="PLAN", help="the plan file (one soak, or one nitriding stage)")
    cb.add_argument("--soak", required=True, help="the soak the load had at temperature: 6h, 6h30min, 390min")
    cb.add_argument("--measured", help="the depth measured on the section: 0.95mm, 0.037in")
    cb.add_argument("--traverse", help="nitriding: hardness readings from the surface inwards, depth=HV separated by "
                                       "commas (at least 3): \"0.05mm=590,0.1mm=560,0.2mm=480,0.3mm=400\"")
    cb.add_argument("--write", action="store_true", help="store the multiplier in the plan file")
    _printing(cb, units=False)
    cb.set_defaults(handler=_calibrate)

    ld = commands.add_parser("load", help="one soak for several parts in one furnace load",
                             description="Combine saved one-soak plans that share the furnace step into one load: the "
                                         "soak every part's drawing window allows, and each part's case at it.")
    ld.add_argument("plans", nargs="+", metavar="PLAN", help="plan files (*.cdplan.json)")
    _printing(ld)
    ld.set_defaults(handler=_load)

    cp = commands.add_parser("capability", help="where a load's spread puts the case against the drawing's window",
                             description="Draw the parts of a load from the furnace's spread (temperature uniformity, "
                                         "potential band, β, the grade's composition range), run the plan's cycle on "
                                         "each (its soak, or its boost and diffuse or its own stages in the plan's "
                                         "split), and say where the depths fall: percentiles, the share inside the "
                                         "drawing's window, Cp and Cpk, and which input moves the depth most.")
    cp.add_argument("plan", metavar="PLAN", help="a plan file (*.cdplan.json)")
    cp.add_argument("--temperature-band", metavar="10C",
                    help="furnace uniformity, ± (default: the shop's temperature tolerance, as on the process sheet)")
    cp.add_argument("--potential-band", metavar="0.05",
                    help="potential held within ±: %%C for carburizing, K_N for nitriding (default: the shop's tolerance)")
    cp.add_argument("--beta-range", metavar="1e-5-2e-5cm/s",
                    help="the parts' mass-transfer coefficient anywhere in this range (default: the plan's β within "
                         "the plan's factor, 2 unless set)")
    cp.add_argument("--beta-factor", metavar="2", help="the parts' β anywhere from β ÷ factor to β × factor (default: "
                                                       "the plan's Load spread setting, 2 unless set)")
    # the choices are the parameter table's (its tables load with the capability module: only for this command)
    spread_choices = (lambda key: list(PARAMETERS[key].kind.options)) if named in (None, "capability") else (lambda key: None)
    cp.add_argument("--composition", choices=spread_choices("spread_composition"),
                    help="the steel's nominal composition, or anywhere in its grade's range (default: the plan's)")
    cp.add_argument("--distribution", choices=spread_choices("spread_distribution"),
                    help="uniform within each band, or normal with the band as 2σ (default: the plan's)")
    cp.add_argument("--samples", help="parts drawn (16–4096; default: the plan's, 256 unless set)")
    cp.add_argument("--optimize", action="store_true",
                    help="also the time at temperature (in the plan's split) that puts most parts inside the drawing's "
                         "window (each part run twice)")
    _printing(cp)
    cp.set_defaults(handler=_capability)

    pr = commands.add_parser("probe", help="furnace readings <-> carbon potential: oxygen probe, dew point, CO2",
                             description="Convert one reading of a carburizing gas — an oxygen probe's voltage (air "
                                         "reference), its dew point, its CO2, or the carbon potential a shim-stock "
                                         "test measured — into the others, at a temperature and for the carrier gas "
                                         "(ideal equilibria; trim as the shop trims its controller).")
    pr.add_argument("--temperature", required=True, help="furnace temperature: 925C (800–1100 °C)")
    reading = pr.add_mutually_exclusive_group(required=True)
    reading.add_argument("--potential", dest="carbon_potential", help="carbon potential, wt %% C (or a shim-stock "
                                                                      "result)")
    reading.add_argument("--mv", help="oxygen-probe voltage, mV")
    reading.add_argument("--dew-point", help="dew point of the gas: 20F, -7C (a bare number is °C)")
    reading.add_argument("--co2", help="CO2 of the gas, vol %% (infrared analyser): 0.2")
    gas = pr.add_mutually_exclusive_group()
    gas.add_argument("--carrier", help='carrier gas: natural-gas-endo (default), propane-endo, nitrogen-methanol, or '
                                       'an own mix "CO=20 H2=40" (vol %%)')
    gas.add_argument("--carrier-co", help="CO in the carrier gas, vol %% (an own mix with 40 %% H2)")
    pr.add_argument("--gas-data", choices=list(GAS_DATA), default=DEFAULT_GAS_DATA,
                    help="the Gibbs energies the readings are worked out with (default %(default)s)")
    pr.add_argument("--steel", help="the steel in the furnace, a grade or \"C=0.20 Mn=0.80 …\": a reading or potential "
                                    "that would decarburize its core is refused (without it: below 0.10 %%C)")
    _printing(pr, units=False)
    pr.set_defaults(handler=_probe)

    rc = commands.add_parser("record", help="the shop's furnace record: loads, measured coupons, a furnace's fit",
                             description="Keep every load's plan and its measured coupons in one database (SQLite; "
                                         "default in the platform's data folder, or --db / CASEDEPTH_RECORD), and fit "
                                         "a furnace's multipliers to all its traverses at once.")
    actions = rc.add_subparsers(dest="record_action", metavar="{add,measure,fit,fits,list,furnace}")
    add = actions.add_parser("add", help="record a load run from a plan")
    add.add_argument("plan", metavar="PLAN", help="the plan the load was run from (stored whole)")
    add.add_argument("--furnace", required=True, help='the furnace: "Pit 2"')
    add.add_argument("--load", required=True, help="the load's number: 2026-118")
    add.add_argument("--date", help="the day it ran, YYYY-MM-DD (default today)")
    add.add_argument("--soak", help="the soak actually run, where it differed from the plan's: 6h30min")
    add.add_argument("--parts", help="parts in the load")
    measure = actions.add_parser("measure", help="record a coupon's traverse of a recorded load (CSV)")
    measure.add_argument("load", metavar="LOAD", help="the load's number")
    kind = measure.add_mutually_exclusive_group(required=True)
    kind.add_argument("--carbon", metavar="FILE.csv", help="carbon profile: a header row, then depth mm and wt %% C")
    kind.add_argument("--hardness", metavar="FILE.csv", help="hardness traverse: a header row, then depth mm and "
                                                             "hardness")
    kind.add_argument("--case-depth", help="the effective case depth measured (at the plan's threshold): 0.95mm")
    kind.add_argument("--nitrided-depth", help="the nitrided hardness depth measured: 0.42mm")
    kind.add_argument("--compound-layer", help="the compound layer measured: 8um")
    kind.add_argument("--surface-hardness", help="the surface hardness measured: 60HRC or 720HV")
    kind.add_argument("--core-hardness", help="the core hardness measured: 32HRC or 320HV")
    measure.add_argument("--scale", choices=SCALES, default="HV1", help="the hardness method (HRC is turned into HV "
                                                                        "by ASTM E140; default HV1)")
    measure.add_argument("--furnace", help="the furnace, where two furnaces have a load of this number")
    measure.add_argument("--coupon", default="", help="which coupon of the load")
    measure.add_argument("--by", default="", help="who measured")
    fit = actions.add_parser("fit", help="a furnace's multipliers fitted to all its recorded traverses")
    fit.add_argument("--furnace", required=True)
    fit.add_argument("--grade", help="fit only the loads of this steel grade (new plans of the grade take it)")
    fit.add_argument("--save", action="store_true", help="keep the fit: new plans that name this furnace take it")
    fits = actions.add_parser("fits", help="a furnace's saved fits over time (its trend)")
    fits.add_argument("--furnace", required=True)
    listing = actions.add_parser("list", help="the recorded loads, with each load's planned and measured depth")
    listing.add_argument("--furnace")
    oven = actions.add_parser("furnace", help="a furnace: its type, survey class and notes, its loads and kept fit")
    oven.add_argument("name", metavar="NAME", help='the furnace: "Pit 2" (new names are added)')
    oven.add_argument("--kind", help='its type: "pit", "integral quench", "vacuum" …')
    oven.add_argument("--survey-class", help="its AMS 2750 furnace class, 1–6")
    oven.add_argument("--notes", help="anything about it")
    for sub in (add, measure, fit, fits, listing, oven):
        sub.add_argument("--db", help="the record's file (default: the platform's data folder, or CASEDEPTH_RECORD)")
    for sub in (fit, fits, listing, oven):
        sub.add_argument("--json", action="store_true", help="print one JSON object instead of text")
    rc.set_defaults(handler=_record)

    st = commands.add_parser("steels", help="list the steel library")
    st.set_defaults(handler=_steels)
    commands.add_parser("gui", help="open the window: casedepth gui [PLAN.json] [--screenshot OUT.png]", add_help=False)
    return parser


# -- planning commands ------------------------------------------------------------------------------------------
def _given(args, treatment) -> dict[str, str]:
    """The parameter options the user typed, by name."""
    return {option.dest: getattr(args, option.dest) for _, option in options_for(treatment)
            if getattr(args, option.dest, None) is not None}


def _calibrated(plan: Plan, set_by: dict) -> str | None:
    """A new plan that names a furnace takes that furnace's latest saved fit from the record, except the values given
    on the command line (:func:`casedepth.shop.furnace_fit.calibration_changes`, as the window's furnace field
    does); what the plan then records as its calibration, or None."""
    if not plan.furnace:
        return None
    from .shop.furnace_fit import calibration_changes

    changes = calibration_changes(plan.values(), plan.furnace, keep=tuple(set_by))
    if changes:
        plan.update(**changes)
    return plan.calibration or None


def _plan(args) -> int:
    treatment = TREATMENTS[args.treatment]
    if getattr(args, "potential_as", None) is not None and getattr(args, "potential", None) is not None:
        raise InputError("potential_as", "give the potential once: --potential (wt % C) or --potential-as (a reading)")
    plan, args.set_by = plan_from_options(treatment.key, _given(args, treatment.key))
    calibrated = _calibrated(plan, args.set_by)
    units = DisplayUnits(args.units)
    if args.save:
        with _writing("save"):
            writable(args.save)
    if args.time is not None:
        if args.compare_temperatures:
            raise InputError("compare_temperatures", "only used with --target")
        extra = {option.dest: parse_length(getattr(args, option.dest), option.dest)
                 for option in treatment.forward_options if getattr(args, option.dest, None) is not None}
        result = forward(plan, parse_time(args.time, "time"), *extra.values())
        if args.save:
            with _writing("save"):
                save(plan, args.save)
        print(json.dumps(result.to_dict()) if args.json else result.text(units))
        if calibrated and not args.json:
            print(f"Calibrated on {calibrated}")
        return 0
    for option in treatment.forward_options:
        if getattr(args, option.dest, None) is not None:
            raise InputError(option.dest, "only used with --time")
    outcome = evaluate(plan)
    comparison = []
    if args.compare_temperatures:
        temperatures = [parse_temperature(t, "compare_temperatures") for t in args.compare_temperatures.split(",")
                        if t.strip()]
        comparison = compare_temperatures(plan, temperatures)
    if args.save:
        with _writing("save"):
            save(plan, args.save)
    if args.json:
        out = outcome.to_dict()
        out["calibration"] = plan.calibration
        if comparison:
            out["temperature_tradeoff"] = [{"temperature_c": T - ZERO_CELSIUS, "soak_time_h": t / 3600.0}
                                           for T, t in comparison]
        print(json.dumps(out))
        return 0
    print(outcome.text(units))
    if calibrated:
        print(f"Calibrated on {calibrated}")
    if comparison:
        print("Same case at other temperatures (the plan otherwise unchanged):")
        for T, t in comparison:
            print(f"  {units.format_temperature(T):>8}  {format_duration(t):>12}  ({t / 3600:.2f} h)")
    left = [T for T in (temperatures if args.compare_temperatures else []) if T not in dict(comparison)]
    if left:
        print("  left out: " + ", ".join(units.format_temperature(T) for T in left) + " (the plan cannot run there as it is)")
    if args.save:
        print(f"Plan written to {_shown(args.save)}")
    return 0


def _run(args) -> int:
    plan = load(args.plan)
    outcome = evaluate(plan)
    if args.json:
        out = outcome.to_dict()
        out["offers"] = [{"parameter": offer.key, "value": offer.value, "text": offer.text} for offer in plan.offers()]
        out["file_notes"] = list(plan.file_notes)
        print(json.dumps(out))
        return 0
    print(f"{plan.title} ({TREATMENTS[plan.treatment].label.lower()})")
    print(outcome.text(DisplayUnits(args.units)))
    for offer in plan.offers():
        print(f"Newer: {offer.text} (not applied: this plan keeps what it was made with)")
    for note in plan.file_notes:
        print(f"Note: {note}")
    return 0


# -- documents ---------------------------------------------------------------------------------------------------
def _outputs(args) -> list[tuple[str, str]]:
    outputs = [(fmt, getattr(args, fmt)) for fmt in ("pdf", "svg", "png") if getattr(args, fmt)]
    if not outputs:
        raise InputError("output", "say where to write it: --pdf FILE, --svg FILE or --png FILE")
    for fmt, path in outputs:  # refused before the work, not after
        with _writing(fmt):
            writable(path)
    return outputs


def _list(text: str, read, field: str) -> list[float]:
    values = [read(part, field) for part in text.split(",") if part.strip()]
    if not 1 <= len(values) <= 6:
        raise InputError(field, "give one to six values")
    return values


def _chart(args) -> int:
    from .report.documents import save as save_document

    outputs = _outputs(args)
    treatment = TREATMENTS[args.treatment]
    potential_option = "kn" if treatment.potential_key == "kn" else "potential"
    given = {"steel": args.steel, "temperature": args.temperature, potential_option: getattr(args, potential_option)}
    if args.at is not None:
        if treatment.key != "carburizing":
            raise InputError("at", "carburizing only")
        given["at"] = args.at
    if args.potential is not None and treatment.potential_key != "carbon_potential":
        raise InputError("potential", f"{treatment.label.lower()} takes --kn")
    if args.kn is not None and treatment.potential_key != "kn":
        raise InputError("kn", f"{treatment.label.lower()} takes --potential")
    hours = None if args.hours is None else parse_number(args.hours, "hours")
    if args.temperatures:
        temperatures = _list(args.temperatures, parse_temperature, "temperatures")
        given["temperature"] = f"{temperatures[0]}K"
        plan, args.set_by = plan_from_options(treatment.key, given)
        for T in temperatures:  # each one must be a temperature the treatment runs at
            _checked(plan, {"temperature": T}, "temperatures")
        kwargs = {"temperatures": temperatures}
    else:
        if args.temperature is None:
            raise InputError("temperature", "required with --potentials")
        potentials = _list(args.potentials, lambda t, f: parse_number(t, f), "potentials")
        plan, args.set_by = plan_from_options(treatment.key, given)
        for p in potentials:
            _checked(plan, {treatment.potential_key: p}, "potentials")
        kwargs = {"potentials": potentials}
    for field in ("shop", "customer"):
        if getattr(args, field):
            check_text(field, getattr(args, field), lines=False)
    document = treatment.chart(plan.values(), paper=args.paper, units=args.units, hours=hours, shop=args.shop,
                               customer=args.customer, logo=args.logo, **kwargs)
    for fmt, path in outputs:
        with _writing(fmt):
            written = save_document(document, path, fmt)
        for name in written:
            print(f"wrote {_shown(name)}")
    return 0


def _checked(plan: Plan, change: dict, field: str) -> None:
    """Refuse one value of a chart's list the treatment cannot run at, naming the list's option."""
    from .parameters import PARAMETERS as rows

    values = {**plan.values(), **change}
    for key in change:
        try:
            rows[key].check_range(values)
        except InputError as error:
            raise InputError(field, error.message) from None


def _sheet(args) -> int:
    from .report.documents import process_sheet, quote_sheet, save as save_document

    outputs = _outputs(args)
    for field in ("shop", "revision"):
        if getattr(args, field):
            check_text(field, getattr(args, field), lines=False)
    plan = load(args.plan)
    document = (quote_sheet if args.quote else process_sheet)(plan, evaluate(plan), paper=args.paper, units=args.units,
                                                               shop=args.shop, logo=args.logo,
                                                               revision=args.revision or plan.revision)
    for fmt, path in outputs:
        with _writing(fmt):
            written = save_document(document, path, fmt)
        for name in written:
            print(f"wrote {_shown(name)}")
    return 0


# -- the shop ------------------------------------------------------------------------------------------------------
def _calibrate(args) -> int:
    from .shop.calibration import calibrate_plan, calibrate_traverse, parse_traverse

    if (args.measured is None) == (args.traverse is None):
        raise _UsageError("calibrate: give exactly one of --measured (a depth, e.g. 0.95mm) or --traverse "
                          "(hardness readings, e.g. \"0.1mm=560,0.2mm=480,0.3mm=400\")")
    plan = load(args.plan)
    if args.write:
        with _writing("plan"):
            writable(args.plan)
    soak = parse_time(args.soak, "soak")
    if args.traverse is not None:
        found = calibrate_traverse(plan, soak, parse_traverse(args.traverse))
    else:
        found = calibrate_plan(plan, soak, parse_length(args.measured, "measured"))
    if args.write:
        plan.set(found.field, round(found.multiplier, 3))
        with _writing("plan"):
            save(plan, args.plan)
    if args.json:
        if args.traverse is not None:
            print(json.dumps({**found.to_dict(), "written": bool(args.write)}))
        else:
            print(json.dumps({"multiplier": found.multiplier, "field": found.field,
                              "predicted_mm": found.predicted * 1e3, "measured_mm": found.measured * 1e3,
                              "soak_time_h": found.soak_time / 3600.0, "written": bool(args.write)}))
        return 0
    print(found.describe())
    print(f"  {'stored in ' + _shown(args.plan) if args.write else 'add --write to store it in the plan'} "
          f"({label(found.field)})")
    return 0


def _range(text: str, read, field: str) -> tuple[float, float]:
    """``"1e-5-2e-5cm/s"`` -> two values read by ``read`` (the unit after the second applies to both): a range
    split at its dash, not at an exponent's minus."""
    text = str(text).strip()
    cut = next((i for i, ch in enumerate(text) if ch in "-–" and i > 0 and text[i - 1] not in "eE"), None)
    if cut is None:
        raise InputError(field, f"cannot read {text!r}; write a range such as 1e-5-2e-5cm/s")
    first, second = text[:cut].strip(), text[cut + 1:].strip()
    unit = second.lstrip("0123456789.eE+-")
    return read(first + unit if first and first[-1].isdigit() else first, field), read(second, field)


def _capability(args) -> int:
    from .shop.capability import Spread, capability
    from .units import parse_temperature_difference, parse_velocity

    plan = load(args.plan)
    units = DisplayUnits(args.units)
    bands = {}
    if args.temperature_band is not None:
        bands["temperature"] = parse_temperature_difference(args.temperature_band, "temperature_band")
    if args.potential_band is not None:
        bands[TREATMENTS[plan.treatment].potential_key] = parse_number(args.potential_band, "potential_band")
    beta_range = None if args.beta_range is None else _range(args.beta_range, parse_velocity, "beta_range")
    if args.beta_factor is not None:
        bands["beta"] = parse_number(args.beta_factor, "beta_factor")
    samples = None
    if args.samples is not None:
        samples = parse_number(args.samples, "samples")
        if not samples.is_integer():
            raise InputError("samples", f"{args.samples!r} is not a whole number of parts")
        samples = int(samples)
    spread = Spread(bands, beta_range, args.composition, args.distribution, samples)
    found = capability(plan.values(), spread, optimize=args.optimize)
    if args.json:
        print(json.dumps(found.to_dict()))
        return 0
    print(found.text(units))
    return 0


def _load(args) -> int:
    from .shop.loads import plan_load

    load_plan = plan_load([load(path) for path in args.plans])
    if args.json:
        print(json.dumps(load_plan.to_dict()))
        return 0
    print(load_plan.text(DisplayUnits(args.units)))
    return 0


def _probe(args) -> int:
    T = parse_temperature(args.temperature, "temperature")
    if args.carrier_co is not None:
        carrier, co, h2 = "own", parse_number(args.carrier_co.rstrip("%"), "carrier_co") / 100.0, 0.40
        check_carrier(co, h2, "carrier_co")
    else:
        carrier, co, h2 = carrier_from_text(args.carrier or DEFAULT_CARRIER)
    furnace_gas = FurnaceGas(carrier, co, h2, args.gas_data)
    gas = furnace_gas.at(T)
    core_potential = None
    if args.steel is not None:  # the potential that holds its core carbon: the core carbon over its alloy factor
        from .models.steels import steel_from_text
        from .models.surface import Gunnarson_alloy_factor

        steel = steel_from_text(args.steel)
        core_potential = steel.carbon / Gunnarson_alloy_factor(steel.composition)
    if args.carbon_potential is not None:
        kind, value = "carbon_potential", parse_number(args.carbon_potential, "carbon_potential")
    elif args.mv is not None:
        kind, value = "mv", parse_number(args.mv, "mv")
    elif args.dew_point is not None:
        kind, value = "dew_point", parse_temperature(args.dew_point, "dew_point")
    else:
        kind, value = "co2", parse_number(args.co2.rstrip("%"), "co2") / 100.0
    readings = convert_reading(kind, value, gas, core_potential)
    described = furnace_gas.describe()
    if args.json:
        out = {"temperature_c": round(T - ZERO_CELSIUS, 6), "carrier": carrier, "carrier_co_pct": co * 100.0,
               "carrier_h2_pct": h2 * 100.0, "gas_data": args.gas_data, "given": READINGS[kind].json_key}
        out.update({READINGS[k].json_key: READINGS[k].to_json(v) for k, v in readings.items()})
        print(json.dumps(out))
        return 0
    print(f"At {formats.temperature(T)} in {described} (ideal equilibria; trim as the controller is trimmed):")
    for k, v in readings.items():
        mark = "  (given)" if k == kind else ""
        print(f"  {READINGS[k].label:<17} {READINGS[k].show(v)}{mark}")
    return 0


def _record(args) -> int:
    from .plan.fileformat import to_dict
    from .shop.record import Measurement, Record, parse_measured, read_csv

    if args.record_action is None:
        raise _UsageError("record: say what to do: add, measure, fit, fits, list or furnace (casedepth record --help)")
    with Record(args.db) as record:
        if args.record_action == "add":
            plan = load(args.plan)
            soak = None if args.soak is None else parse_time(args.soak, "soak")
            parts = None if args.parts is None else int(parse_number(args.parts, "parts"))
            record.add_load(args.furnace, args.load, to_dict(plan), args.date, soak, parts)
            print(f"recorded load {args.load} of {' '.join(args.furnace.split())} ({plan.title}) in {record.path}")
            return 0
        if args.record_action == "measure":
            single = next((key for key in ("case_depth", "nitrided_depth", "compound_layer", "surface_hardness",
                                           "core_hardness") if getattr(args, key) is not None), None)
            if single is not None:
                points = [(0.0, parse_measured(single, getattr(args, single)))]
                record.add_measurement(args.load, Measurement(single, points, args.coupon, "", args.by), args.furnace)
                print(f"recorded the {single.replace('_', ' ')} of load {args.load}")
                return 0
            kind, path = ("carbon", args.carbon) if args.carbon else ("hardness", args.hardness)
            field = kind  # errors name the option that gave the file
            try:
                text = Path(path).read_text(encoding="utf-8-sig")
            except OSError as error:
                raise InputError(field, f"{path}: {error.strerror or error}") from None
            points = read_csv(text, kind, args.scale if kind == "hardness" else "", field)
            record.add_measurement(args.load, Measurement(kind, points, args.coupon,
                                                          args.scale if kind == "hardness" else "", args.by),
                                   args.furnace)
            print(f"recorded {len(points)} {kind} readings of load {args.load}")
            return 0
        if args.record_action == "fit":
            from .shop.furnace_fit import fit_furnace

            fitted = fit_furnace(record.loads(args.furnace), " ".join(args.furnace.split()), args.grade)
            saved = None
            if args.save:
                record.save_calibration(args.furnace, fitted.treatment, fitted.to_dict())
                saved = record.calibration(args.furnace, fitted.treatment, fitted.grade)
            if args.json:
                print(json.dumps({**fitted.to_dict(), "saved": None if saved is None else saved.label()}))
            else:
                print(fitted.text() + ("" if saved is None else f"\nSaved: new plans for {saved.furnace} take it "
                                                                f"({saved.label()})"))
            return 0
        if args.record_action == "furnace":
            if any(value is not None for value in (args.kind, args.survey_class, args.notes)):
                oven = record.describe_furnace(args.name, args.kind, args.survey_class, args.notes)
            else:
                oven = record.furnace(args.name)
            loads = record.loads(oven.name)
            kept = {treatment: record.calibration(oven.name, treatment) for treatment in ("carburizing", "nitriding")}
            if args.json:
                print(json.dumps({**oven.to_dict(), "loads": len(loads),
                                  "measured_loads": sum(1 for entry in loads if entry.measurements),
                                  "kept_fits": {t: f.label() for t, f in kept.items() if f is not None}}))
            else:
                print(oven.text())
                print(f"  {len(loads)} loads, {sum(1 for entry in loads if entry.measurements)} with measurements")
                for f in kept.values():
                    if f is not None:
                        print(f"  new plans take {f.label()}")
            return 0
        if args.record_action == "fits":
            record.furnace_id(args.furnace)  # refuses an unknown furnace, naming the known ones
            trend = record.calibrations(args.furnace)
            if args.json:
                print(json.dumps({"furnace": " ".join(args.furnace.split()),
                                  "fits": [{"id": f.id, "made": f.made, "treatment": f.treatment, **f.fit} for f in trend]}))
            else:
                print("\n".join(_trend_line(f) for f in trend) or f"no fit of {args.furnace} saved (record fit --save)")
            return 0
        from .shop.furnace_fit import depth_check

        loads = record.loads(args.furnace)
        checks = [depth_check(entry) if entry.measurements else None for entry in loads]
        if args.json:
            print(json.dumps({"record": str(record.path), "loads": [
                {**entry.to_dict(), "depth": None if check is None else check.to_dict()}
                for entry, check in zip(loads, checks)]}))
            return 0
        units = DisplayUnits()
        for entry, check in zip(loads, checks):
            kinds = ", ".join(f"{m.kind} ({len(m.points)})" for m in entry.measurements) or "no measurements"
            soak = "" if entry.soak is None else f", soak run {format_duration(entry.soak)}"
            depths = ""
            if check is not None:
                measured = "not measured" if check.measured is None else \
                    f"measured {formats.length(check.measured, units)} ({check.how})"
                depths = f"; depth planned {formats.length(check.predicted, units)}, {measured}"
            print(f"{entry.date}  {entry.furnace:<12} {entry.number:<12} {entry.plan.get('title', '')}{soak}: "
                  f"{kinds}{depths}")
        if not loads:
            print(f"no loads recorded in {record.path}")
        return 0


def _trend_line(saved) -> str:
    """One saved fit of a furnace in a line: when, of what, each multiplier with its 95 % interval."""
    from .shop.furnace_fit import NAMES

    parts = []
    for json_name, name in NAMES.values():
        if json_name in saved.fit:
            low, high = saved.fit[f"{json_name}_ci"]
            parts.append(f"{name} {saved.fit[json_name]:.3f} ({low:.3f}–{high:.3f})")
    grade = "every grade" if saved.grade is None else f"grade {saved.grade}"
    loads = len({(row["load"], row["date"]) for row in saved.fit.get("loads", [])})
    return f"#{saved.id}  {saved.made}  {saved.treatment}, {grade}, {loads} loads: " + "; ".join(parts)


def _steels(_args) -> int:
    for steel in library("all"):
        print(f"{steel.name:<13} {steel.process:<12} {steel.standard:<34} {steel.composition_text()}")
    return 0


# -- errors -> the option the user typed -------------------------------------------------------------------------------
def _flag_for(error: InputError, args, parser) -> str:
    """The option (or file) an error is against: as typed, or the first option of the parameter, or the label."""
    field = error.field
    if field in ("plan file", "plan"):
        return "PLAN"
    treatment = getattr(args, "treatment", None) if args is not None else None
    if not isinstance(error, OptionError) and treatment is not None and field in PARAMETERS:
        field = option_for(treatment, field, getattr(args, "set_by", {})) or field
    actions = _all_actions(parser, getattr(args, "command", None), getattr(args, "record_action", None))
    for action in actions:
        if action.dest == field and action.option_strings:
            return action.option_strings[0]
    for action in actions:  # a positional argument: its name as the usage line shows it
        if action.dest == field and not action.option_strings and action.metavar:
            return action.metavar
    return label(field)


def _all_actions(parser, command, action_name=None):
    """The actions of the parser, of the command given and of that command's own action (``record add`` …)."""
    actions = list(parser._actions)
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction) and command in action.choices:
            sub = action.choices[command]
            actions += sub._actions
            for inner in sub._actions:
                if isinstance(inner, argparse._SubParsersAction) and action_name in inner.choices:
                    actions += inner.choices[action_name]._actions
    return actions


def _one_value_each(args, parser) -> None:
    """Refuse a flag given a list where it takes one value (argparse turns ``--steel=--`` into ``[]``)."""
    for action in _all_actions(parser, getattr(args, "command", None)):
        if action.nargs is None and action.option_strings and isinstance(getattr(args, action.dest, None), list):
            raise _UsageError(f"{action.option_strings[0]}: give one value after the flag")


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    argv = sys.argv[1:] if argv is None else list(argv)
    if not argv or argv[0] == "gui":  # the window; Qt is imported only here
        from .gui.app import main as window_main

        return window_main(argv[1:])
    parser = _build_parser(argv)
    args = None
    try:
        args = parser.parse_args(argv)
        _one_value_each(args, parser)
        if getattr(args, "handler", None) is None:
            parser.print_help()
            return 0
        return args.handler(args)
    except SystemExit as stop:  # --help and --version
        return int(stop.code or 0)
    except _UsageError as error:
        print(f"casedepth: error: {error}", file=sys.stderr)
        return 2
    except InputError as error:
        print(f"casedepth: error: {_flag_for(error, args, parser)}: {error.message}", file=sys.stderr)
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

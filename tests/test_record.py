"""The shop's furnace record (casedepth.shop.record) and a furnace's calibration from it
(casedepth.shop.furnace_fit).

Sources: Crank, The Mathematics of Diffusion (1975), §3.3, the surface-evaporation solution (tests/analytic.py) —
an independent solve that makes synthetic carbon traverses with known multipliers; Bates & Watts, Nonlinear
Regression Analysis and Its Applications (1988), ch. 2, for what a 95 % interval of a least-squares fit must do
(contain the truth in most repetitions); SQLite's documented atomic commit (a killed writer loses only its
unfinished transaction) — the kill test checks it here.
"""

from __future__ import annotations

import json
import math
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

from analytic import evaporation_plane
from casedepth.cli import main
from casedepth.errors import InputError, NotReachableError
from casedepth.models.diffusivity import Arrhenius
from casedepth.plan import Plan, evaluate
from casedepth.plan.fileformat import to_dict
from casedepth.shop.furnace_fit import fit_furnace
from casedepth.shop.record import SCHEMA_VERSION, Measurement, Record, read_csv

K = 273.15
DATA = Path(__file__).parent / "data" / "record"
EXAMPLE = Path(__file__).resolve().parents[1] / "resources" / "examples" / "pinion-shaft.cdplan.json"


def synthetic_furnace(record: Record, furnace: str, m: float, f: float, noise: float, seed: int) -> None:
    """Four loads of constant-D, mass-transfer carburizing (no shop stages, flat surface) whose carbon traverses come
    from Crank's surface-evaporation solution with D × ``m`` and β × ``f``, plus normal noise of ``noise`` %C."""
    rng = np.random.default_rng(seed)
    for i, (celsius, potential, hours) in enumerate([(915, 0.9, 4), (925, 1.0, 6), (940, 1.1, 8), (930, 0.95, 5)]):
        plan = Plan(temperature=celsius + K, carbon_potential=potential, diffusivity="arrhenius", count_shop_stages=False,
                    beta_model="constant", beta=1.5e-7, alloy_factor=False)
        core = evaluate(plan).setup.steel.carbon
        x = np.arange(0.1, 2.01, 0.1) * 1e-3
        F = evaporation_plane(x, hours * 3600, float(Arrhenius(0.5, celsius + K)) * m, 1.5e-7 * f)
        carbon = core + (potential - core) * F + rng.normal(0.0, noise, len(x))
        record.add_load(furnace, f"L-{i}", to_dict(plan), f"2026-11-{10 + i:02d}", hours * 3600.0,
                        measurements=[Measurement("carbon", list(zip(x, carbon)))])


def test_a_furnace_fitted_to_synthetic_traverses_recovers_its_multipliers(tmp_path):
    """Made with D × 1.3 and β × 0.6 by Crank's solution, noise 0.02 %C: the fit's 95 % intervals hold both, and the
    scatter it reports is the noise over the weights' 0.03 %C (about 0.67)."""
    with Record(tmp_path / "r.sqlite") as record:
        synthetic_furnace(record, "Pit 2", 1.3, 0.6, 0.02, seed=3)
        fit = fit_furnace(record.loads("Pit 2"), "Pit 2")
    low, high = fit.intervals["d_multiplier"]
    assert low < 1.3 < high and high / low < 1.3
    low, high = fit.intervals["beta"]
    assert low < 0.6 < high
    assert fit.scatter == pytest.approx(0.02 / 0.03, rel=0.3)
    assert fit.readings == 80 and not any(load.outlier for load in fit.loads)
    data = fit.to_dict()
    assert {"diffusivity_multiplier", "diffusivity_multiplier_ci", "beta_cm_per_s", "beta_ci", "loads"} <= set(data)
    assert data["beta_cm_per_s"] == pytest.approx(1.5e-5 * fit.multipliers["beta"])


def test_the_intervals_cover_the_truth_in_most_repetitions(tmp_path):
    """Five noisy records of the same furnace (fixed seeds): a 95 % interval may miss once in twenty; at most one
    miss of five."""
    misses = 0
    for seed in range(5):
        with Record(tmp_path / f"r{seed}.sqlite") as record:
            synthetic_furnace(record, "Pit", 0.8, 1.5, 0.03, seed=seed)
            fit = fit_furnace(record.loads("Pit"), "Pit")
        low, high = fit.intervals["d_multiplier"]
        misses += not (low < 0.8 < high)
    assert misses <= 1


def test_an_outlying_load_is_flagged(tmp_path):
    with Record(tmp_path / "r.sqlite") as record:
        synthetic_furnace(record, "Pit", 1.0, 1.0, 0.01, seed=1)
        plan = Plan(diffusivity="arrhenius", count_shop_stages=False, beta_model="constant", alloy_factor=False)
        x = np.arange(0.1, 1.6, 0.1) * 1e-3
        record.add_load("Pit", "L-bad", to_dict(plan), "2026-11-20", 6 * 3600.0,
                        measurements=[Measurement("carbon", list(zip(x, np.full(len(x), 0.9))))])  # a mixed-up coupon
        fit = fit_furnace(record.loads("Pit"), "Pit")
    flagged = [load.number for load in fit.loads if load.outlier]
    assert flagged == ["L-bad"]


def test_an_impossible_record_is_refused(tmp_path):
    with Record(tmp_path / "r.sqlite") as record:
        plan = Plan(diffusivity="arrhenius", count_shop_stages=False, beta_model="constant", alloy_factor=False)
        x = np.arange(0.1, 1.1, 0.1) * 1e-3
        record.add_load("Pit", "L-1", to_dict(plan), "2026-11-20", 6 * 3600.0,
                        measurements=[Measurement("carbon", list(zip(x, np.linspace(2.4, 2.3, len(x)))))])
        with pytest.raises((NotReachableError, InputError)) as error:
            fit_furnace(record.loads("Pit"), "Pit")
        assert error.value.field == "furnace"
        record.add_load("Empty", "E-1", to_dict(plan), "2026-11-21")
        with pytest.raises(InputError, match="no load of this furnace has measurements"):
            fit_furnace(record.loads("Empty"), "Empty")


def test_loads_and_measurements_round_trip_and_are_refused_with_their_field(tmp_path):
    plan = to_dict(Plan())
    with Record(tmp_path / "r.sqlite") as record:
        record.add_load("Pit 2", "2026-118", plan, "2026-11-30", 6.5 * 3600, parts=40)
        record.add_measurement("2026-118", Measurement("hardness", [(1e-4, 700.0), (5e-4, 620.0), (1e-3, 480.0)],
                                                       "C1", "HV1", "inspector A"))
        (load,) = record.loads("Pit 2")
        assert (load.number, load.date, load.soak, load.parts, load.plan) == ("2026-118", "2026-11-30", 6.5 * 3600, 40,
                                                                             plan)
        assert load.measurements[0].points == [(1e-4, 700.0), (5e-4, 620.0), (1e-3, 480.0)]
        for call, field in [(lambda: record.add_load("Pit 2", "2026-118", plan), "load"),
                            (lambda: record.add_load("Pit 2", "X", plan, "30.11.2026"), "date"),
                            (lambda: record.add_measurement("nope", Measurement("carbon", [(0, 1), (1e-4, 1), (2e-4, 1)])),
                             "load"),
                            (lambda: record.add_measurement("2026-118", Measurement("carbon", [(0, 1), (1e-4, 1)])),
                             "points"),
                            (lambda: record.loads("Pit 9"), "furnace")]:
            with pytest.raises(InputError) as error:
                call()
            assert error.value.field == field
        assert len(record.loads()) == 1  # nothing half-written by the refusals


@pytest.mark.parametrize("text,words", [
    ("", "the file is empty"),
    ("depth,C\n0.1,0.9\n0.2\n0.3,0.7\n", "row 3: 1 values"),
    ("depth,C\n0.1,0.9\n0.x,0.8\n0.3,0.7\n", "row 3: depth '0.x' is not a number"),
    ("depth,C\n0.1,0.9\n0.2,high\n0.3,0.7\n", "row 3: value 'high' is not a number"),
    ("depth,C\n0.1,0.9\n0.3,0.8\n0.2,0.7\n", "row 4: depths must increase"),
    ("depth,C\n0.1,0.9\n0.2,3.5\n0.3,0.7\n", "row 3: 3.5 %C is outside 0–2.5 %C"),
    ("depth,C\n0.1,0.9\n0.2,0.8\n", "2 readings: a traverse needs at least 3"),
])
def test_a_malformed_csv_is_refused_with_its_row(text, words):
    with pytest.raises(InputError) as error:
        read_csv(text, "carbon")
    assert words in error.value.message


def test_csv_as_labs_export_it():
    """Commas; semicolons with decimal commas; tabs; HRC turned into HV by ASTM E140 (50 HRC ≈ 513 HV)."""
    assert read_csv("depth_mm,C\n0.1,0.95\n0.3,0.80\n0.5,0.62\n", "carbon") == [(1e-4, 0.95), (3e-4, 0.80), (5e-4, 0.62)]
    assert read_csv("Tiefe;HV1\n0,1;720\n0,3;690\n0,6;560\n", "hardness")[1] == pytest.approx((3e-4, 690.0))
    assert read_csv("d\tHV\n0.1\t700\n0.2\t650\n0.3\t600\n", "hardness")[2] == pytest.approx((3e-4, 600.0))
    assert read_csv("d,HRC\n0.1,60\n0.5,50\n1.0,40\n", "hardness", "HRC")[1][1] == pytest.approx(513, abs=3)


def test_the_first_schema_opens(tmp_path):
    """A record made by schema 1 (its SQL as released, tests/data/record/schema-1.sql) opens with its load."""
    path = tmp_path / "old.sqlite"
    with sqlite3.connect(path) as db:
        db.executescript((DATA / "schema-1.sql").read_text())
    with Record(path) as record:
        assert record.version == SCHEMA_VERSION
        (load,) = record.loads()
        assert (load.furnace, load.number, load.soak) == ("Pit 1 (demo)", "D-001", 21600.0)
        assert [v for _, v in load.measurements[0].points] == [700, 600, 480]


def test_a_file_that_is_no_record_is_refused(tmp_path):
    bad = tmp_path / "notes.sqlite"
    bad.write_text("not a database at all, just words " * 50)
    with pytest.raises(InputError) as error:
        Record(bad)
    assert error.value.field == "db"
    other = tmp_path / "other.sqlite"
    with sqlite3.connect(other) as db:
        db.execute("CREATE TABLE t (x)")
    with pytest.raises(InputError, match="not a furnace record"):
        Record(other)


def test_a_reader_reads_while_a_writer_writes(tmp_path):
    """WAL: a second connection reads the committed loads while the first holds a write open."""
    path = tmp_path / "r.sqlite"
    with Record(path) as writer, Record(path) as reader:
        writer.add_load("Pit", "A", {"title": "a"}, "2026-11-01")
        writer.db.execute("BEGIN IMMEDIATE")
        writer.db.execute("INSERT INTO furnaces (name) VALUES ('half-way')")
        assert [load.number for load in reader.loads()] == ["A"] and "half-way" not in reader.furnaces()
        writer.db.rollback()


WRITER = """
import sys
from casedepth.shop.record import Measurement, Record
record = Record(sys.argv[1])
start = int(sys.argv[2])
print("ready", flush=True)
for n in range(start, start + 1000):
    record.add_load("Pit", f"L{n}", {"title": str(n)}, "2026-11-01",
                    measurements=[Measurement("hardness", [(k * 1e-4, 700.0 - k) for k in range(1, 41)])])
"""


def test_a_writer_killed_at_any_moment_loses_only_its_unfinished_load(tmp_path):
    """200 writers, four at a time: each records loads (each with its 40-point traverse, one transaction) and is killed at a random
    moment; the database stays consistent (SQLite's integrity check) and every load in it has its whole traverse."""
    path = tmp_path / "r.sqlite"
    Record(path).close()
    script = tmp_path / "writer.py"
    script.write_text(WRITER)
    rng = np.random.default_rng(7)
    for batch in range(50):  # four writers at a time, as two programs and two windows might share a record
        writers = [subprocess.Popen([sys.executable, str(script), str(path), str((4 * batch + k) * 1000)],
                                    stdout=subprocess.PIPE, text=True) for k in range(4)]
        for writer in writers:
            writer.stdout.readline()  # "ready": imports done, writing now
        for writer in writers:
            time.sleep(float(rng.uniform(0.0, 0.01)))
            writer.kill()
        for writer in writers:
            writer.wait()
            writer.stdout.close()
    with sqlite3.connect(path) as db:
        assert db.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        counts = db.execute("SELECT COUNT(points.value) FROM loads JOIN measurements ON measurements.load_id = loads.id "
                            "JOIN points ON points.measurement_id = measurements.id GROUP BY loads.id").fetchall()
        total = db.execute("SELECT COUNT(*) FROM loads").fetchone()[0]
    assert total > 0 and len(counts) == total and all(c == 40 for (c,) in counts)


def test_the_record_command(tmp_path, capsys):
    db = str(tmp_path / "r.sqlite")
    carbon = tmp_path / "c.csv"
    carbon.write_text("depth_mm,carbon\n0.1,0.80\n0.3,0.74\n0.6,0.58\n0.9,0.44\n1.2,0.33\n1.6,0.24\n")
    hardness = tmp_path / "h.csv"
    hardness.write_text("depth;HV1\n0,1;720\n0,3;700\n0,6;620\n0,9;540\n1,2;450\n1,6;360\n")
    assert main(["record", "add", str(EXAMPLE), "--furnace", "Pit 2", "--load", "2026-118", "--date", "2026-11-30",
                 "--db", db]) == 0
    assert main(["record", "add", str(EXAMPLE), "--furnace", "Pit 2", "--load", "2026-119", "--soak", "6h30min",
                 "--db", db]) == 0
    assert main(["record", "measure", "2026-118", "--carbon", str(carbon), "--db", db]) == 0
    assert main(["record", "measure", "2026-119", "--hardness", str(hardness), "--scale", "HV1", "--db", db]) == 0
    capsys.readouterr()
    assert main(["record", "list", "--json", "--db", db]) == 0
    listed = json.loads(capsys.readouterr().out)["loads"]
    assert [(x["load"], x["soak_h"]) for x in listed] == [("2026-118", None), ("2026-119", 6.5)]
    assert main(["record", "fit", "--furnace", "Pit 2", "--json", "--db", db]) == 0
    fitted = json.loads(capsys.readouterr().out)
    assert len(fitted["diffusivity_multiplier_ci"]) == 2 and len(fitted["beta_ci"]) == 2 and len(fitted["loads"]) == 2
    assert main(["record", "measure", "2026-120", "--carbon", str(carbon), "--db", db]) == 2
    assert capsys.readouterr().err.startswith("casedepth: error: LOAD: no load '2026-120'")
    carbon.write_text("depth,C\n0.1,0.9\n0.x,0.8\n0.3,0.7\n")
    assert main(["record", "measure", "2026-118", "--carbon", str(carbon), "--db", db]) == 2
    assert "casedepth: error: --carbon: row 3" in capsys.readouterr().err
    assert main(["record", "fit", "--furnace", "Pit 9", "--db", db]) == 2
    assert "--furnace" in capsys.readouterr().err
    assert math.isfinite(fitted["scatter"])


def test_a_saved_fit_is_what_new_plans_for_the_furnace_take(tmp_path, capsys, scratch_record):
    """``record fit --save`` keeps the fit (record schema 2); a new plan naming the furnace then runs with its
    multipliers and says so (the plan's ``calibration``), unless its multipliers are given; another furnace's plans,
    and an old record of schema 1, are untouched."""
    with Record(scratch_record) as record:
        synthetic_furnace(record, "Pit 2", 1.3, 0.6, 0.02, seed=3)
    assert main(["record", "fit", "--furnace", "Pit 2", "--save", "--json"]) == 0
    saved = json.loads(capsys.readouterr().out)
    assert saved["saved"].startswith("Pit 2: record fit #1 of ")
    args = ["carburize", "--temperature", "925C", "--potential", "1.0", "--target", "1mm", "--diffusivity", "arrhenius",
            "--beta", "1.5e-5cm/s", "--json"]
    assert main([*args, "--furnace", "Pit 2"]) == 0
    calibrated = json.loads(capsys.readouterr().out)
    assert calibrated["calibration"] == saved["saved"].replace("(D × 1.3, β × 0.597)", "(D × 1.3)")  # β was given
    assert main([*args, "--furnace", "Pit 9"]) == 0
    plain = json.loads(capsys.readouterr().out)
    assert plain["calibration"] == "" and calibrated["soak_time_h"] != pytest.approx(plain["soak_time_h"], rel=1e-3)
    # the plan the fit gives is the plan with its multiplier typed in
    assert main([*args, "--d-multiplier", f"{saved['diffusivity_multiplier']!r}"]) == 0
    typed = json.loads(capsys.readouterr().out)
    assert typed["soak_time_h"] == pytest.approx(calibrated["soak_time_h"], rel=1e-9)
    assert main([*args, "--furnace", "Pit 2", "--d-multiplier", "1.0"]) == 0  # given: the plan keeps it
    assert json.loads(capsys.readouterr().out)["calibration"] == ""
    # a plan that takes β as the fitted loads did takes the fit's β too
    assert main(["carburize", "--temperature", "925C", "--target", "1mm", "--diffusivity", "arrhenius", "--furnace",
                 "Pit 2", "--json", "--beta-multiplier", "1"]) == 0  # (gas β given: the loads' one β does not apply)
    assert json.loads(capsys.readouterr().out)["calibration"].endswith("(D × 1.3)")
    with Record(scratch_record) as record:
        assert record.version == SCHEMA_VERSION and record.calibration("Pit 2", "nitriding") is None


def test_a_plan_that_takes_beta_as_the_loads_did_takes_the_fitted_beta(scratch_record):
    from casedepth.shop.furnace_fit import apply_calibration

    with Record(scratch_record) as record:
        synthetic_furnace(record, "Pit 2", 1.3, 0.6, 0.02, seed=3)
        fit = fit_furnace(record.loads("Pit 2"), "Pit 2")
        record.save_calibration("Pit 2", "carburizing", fit.to_dict(), "2026-12-01")
        saved = record.calibration("Pit 2", "carburizing")
    one_beta = apply_calibration(Plan(beta_model="constant", beta=2e-7).values(), saved)
    assert one_beta["beta"] == pytest.approx(1.5e-7 * fit.multipliers["beta"], rel=1e-12)
    assert one_beta["d_multiplier"] == pytest.approx(fit.multipliers["d_multiplier"], rel=1e-12)
    assert "β ×" in one_beta["calibration"] and "of 2026-12-01" in one_beta["calibration"]
    low, high = fit.intervals["beta"]  # the load spread's β band is the fit's interval
    assert one_beta["spread_beta_factor"] == pytest.approx(math.sqrt(high / low), rel=1e-12)
    gas = apply_calibration(Plan().values(), saved)  # the gas β: another model than the loads' — left alone
    assert gas["beta_multiplier"] == 1.0 and "β" not in gas["calibration"]
    with pytest.raises(InputError):
        apply_calibration(Plan(treatment="nitriding").values(), saved)


def test_single_values_are_recorded_and_measured_depths_fit_the_diffusivity(tmp_path, capsys, scratch_record):
    """Record schema 3: a load's measured case depth, compound layer, surface and core hardness are one value each.
    Effective case depths alone fit the diffusivity of a surface held at equilibrium: made by Crank's erfc solution
    (1975, §3.3) with D × 1.25 and 0.02 mm of scatter, four loads give the multiplier back within its interval."""
    from scipy.special import erfcinv

    rng = np.random.default_rng(5)
    with Record(scratch_record) as record:
        for i, (celsius, potential, hours) in enumerate([(900, 0.9, 4), (925, 1.0, 6), (950, 1.1, 8), (930, 1.0, 5)]):
            plan = Plan(temperature=celsius + K, carbon_potential=potential, diffusivity="arrhenius",
                        count_shop_stages=False, beta_held=True, alloy_factor=False)
            setup = evaluate(plan).setup
            D = float(Arrhenius(0.5, celsius + K)) * 1.25
            share = (setup.threshold_carbon - setup.steel.carbon) / (potential - setup.steel.carbon)
            depth = 2.0 * math.sqrt(D * hours * 3600) * float(erfcinv(share)) + rng.normal(0.0, 0.02e-3)
            record.add_load("Pit 4", f"D-{i}", to_dict(plan), f"2026-10-0{i + 1}", hours * 3600.0,
                            measurements=[Measurement("case_depth", [(0.0, depth)])])
        fit = fit_furnace(record.loads("Pit 4"), "Pit 4")
    assert list(fit.multipliers) == ["d_multiplier"]  # held surfaces: D alone
    low, high = fit.intervals["d_multiplier"]
    assert low < 1.25 < high and high / low < 1.2
    assert "D-0 (2026-10-01), effective case depth: misses by" in fit.text()
    # the command line records single values, in the units people type
    assert main(["record", "measure", "D-1", "--surface-hardness", "60HRC"]) == 0
    assert main(["record", "measure", "D-1", "--compound-layer", "8um"]) == 0
    assert main(["record", "measure", "D-1", "--case-depth", "0.040in"]) == 0
    assert main(["record", "measure", "D-1", "--core-hardness", "1400HV"]) == 2
    assert "--core-hardness" in capsys.readouterr().err
    with Record(scratch_record) as record:
        load = next(x for x in record.loads("Pit 4") if x.number == "D-1")
    kinds = {m.kind: m.points[0][1] for m in load.measurements}
    assert kinds["surface_hardness"] == pytest.approx(697, abs=3)  # 60 HRC by ASTM E140
    assert kinds["compound_layer"] == pytest.approx(8e-6) and kinds["case_depth"] == pytest.approx(1.016e-3)
    with pytest.raises(InputError, match="one value"):
        with Record(scratch_record) as record:
            record.add_measurement("D-1", Measurement("case_depth", [(0.0, 1e-3), (1e-4, 1e-3)]))


NITRIDED = Path(__file__).resolve().parents[1] / "resources" / "examples" / "piston-rod-nitrided.cdplan.json"


def test_a_nitriding_furnace_fits_its_diffusivity_and_the_nitrides_hardness(scratch_record):
    """Nitriding loads fit D_N and the nitrides' hardness multiplier at once: a traverse's level fixes the one, its
    depth the other. The traverses are the model's own (D_N × 0.8, hardness × 1.15, 12 HV of noise): this checks the
    fit, not the model (the carburizing fit-back above uses Crank's independent solution)."""
    from casedepth.plan import forward, load

    rng = np.random.default_rng(11)
    base = load(NITRIDED)
    x = np.arange(0.05, 0.61, 0.05) * 1e-3
    with Record(scratch_record) as record:
        for i, hours in enumerate((24, 30, 36, 40)):
            truth = forward({**base.values(), "n_multiplier": 0.8, "strength_multiplier": 1.15}, hours * 3600.0)
            hv = np.interp(x, truth.depth, truth.hardness) + rng.normal(0.0, 12.0, len(x))
            record.add_load("Nitriding pit 1", f"N-{i}", to_dict(base), f"2026-09-{10 + i}", hours * 3600.0,
                            measurements=[Measurement("hardness", list(zip(x, hv)), scale="HV0.5")])
        fit = fit_furnace(record.loads("Nitriding pit 1"), "Nitriding pit 1")
        record.save_calibration("Nitriding pit 1", "nitriding", fit.to_dict(), "2026-12-01")
        saved = record.calibration("Nitriding pit 1", "nitriding", "31CrMoV9")
    assert list(fit.multipliers) == ["n_multiplier", "strength_multiplier"]
    for key, truth in (("n_multiplier", 0.8), ("strength_multiplier", 1.15)):
        low, high = fit.intervals[key]
        assert low < truth < high and high / low < 1.25, key
    assert "Nitrides' HV ×" in fit.text() and "strength_multiplier_ci" in fit.to_dict()
    from casedepth.shop.furnace_fit import apply_calibration

    taken = apply_calibration(base.values(), saved)
    assert taken["strength_multiplier"] == pytest.approx(fit.multipliers["strength_multiplier"])
    low, high = fit.intervals["n_multiplier"]  # the load spread's D band is the fit's interval
    assert taken["spread_d_factor"] == pytest.approx(math.sqrt(high / low))
    assert "nitrides' HV ×" in taken["calibration"]


def test_a_grade_has_its_own_fit_and_plans_of_the_grade_take_it(scratch_record, capsys):
    """Two grades in one furnace, made (Crank's solution) with D × 1.3 and D × 0.8: the furnace's fit lands between,
    each grade's fit holds its own; a plan of a fitted grade takes that grade's fit, a plan of another grade the
    furnace's; the saved fits, oldest first, are the furnace's trend (``record fits``)."""
    with Record(scratch_record) as record:
        synthetic_furnace(record, "Pit 3", 1.3, 1.0, 0.02, seed=4)
        other = Plan(temperature=925 + K, carbon_potential=1.0, diffusivity="arrhenius", count_shop_stages=False,
                     beta_model="constant", beta=1.5e-7, alloy_factor=False)
        other.choose_steel("4320")
        core = evaluate(other).setup.steel.carbon
        x = np.arange(0.1, 2.01, 0.1) * 1e-3
        rng = np.random.default_rng(8)
        for i, hours in enumerate((5, 7)):
            F = evaporation_plane(x, hours * 3600, float(Arrhenius(0.5, 925 + K)) * 0.8, 1.5e-7)
            carbon = core + (1.0 - core) * F + rng.normal(0.0, 0.02, len(x))
            record.add_load("Pit 3", f"G-{i}", to_dict(other), f"2026-11-2{i}", hours * 3600.0,
                            measurements=[Measurement("carbon", list(zip(x, carbon)))])
    assert main(["record", "fit", "--furnace", "Pit 3", "--save", "--json"]) == 0
    every = json.loads(capsys.readouterr().out)
    assert every["grade"] is None and every["grades"] == {"8620": 4, "4320": 2}
    assert 0.8 < every["diffusivity_multiplier"] < 1.3
    assert main(["record", "fit", "--furnace", "Pit 3", "--grade", "4320", "--save", "--json"]) == 0
    own = json.loads(capsys.readouterr().out)
    low, high = own["diffusivity_multiplier_ci"]
    assert own["grade"] == "4320" and low < 0.8 < high and own["saved"].startswith("Pit 3, grade 4320: record fit #2")
    assert main(["record", "fit", "--furnace", "Pit 3", "--grade", "9310"]) == 2
    assert "--grade" in capsys.readouterr().err
    args = ["carburize", "--temperature", "925C", "--potential", "1.0", "--target", "1mm", "--furnace", "Pit 3", "--json"]
    assert main([*args, "--steel", "4320"]) == 0
    assert "grade 4320" in json.loads(capsys.readouterr().out)["calibration"]
    assert main([*args, "--steel", "8620"]) == 0
    assert json.loads(capsys.readouterr().out)["calibration"].startswith("Pit 3: record fit #1")
    assert main(["record", "fits", "--furnace", "Pit 3", "--json"]) == 0
    trend = json.loads(capsys.readouterr().out)["fits"]
    assert [(f["id"], f["grade"]) for f in trend] == [(1, None), (2, "4320")]
    assert main(["record", "fits", "--furnace", "Pit 3"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[0].startswith("#1") and "every grade, 6 loads: D multiplier" in lines[0] and "grade 4320" in lines[1]


def test_each_load_lists_its_planned_and_measured_depth(scratch_record, capsys):
    """``record list`` gives each measured load's depth as planned (its plan's model for the soak run) and as
    measured: a measured depth as recorded, or where a carbon traverse crosses the drawing's 0.40 %C (between
    readings, linearly)."""
    from casedepth.plan import forward
    from casedepth.shop.furnace_fit import depth_check

    plan = Plan(temperature=925 + K, carbon_potential=1.0, count_shop_stages=False)
    with Record(scratch_record) as record:
        record.add_load("Pit 5", "A", to_dict(plan), "2026-11-01", 6 * 3600.0,
                        measurements=[Measurement("carbon", [(0.2e-3, 0.80), (0.8e-3, 0.50), (1.2e-3, 0.30)])])
        record.add_load("Pit 5", "B", to_dict(plan), "2026-11-02", 6 * 3600.0,
                        measurements=[Measurement("case_depth", [(0.0, 1.05e-3)])])
        record.add_load("Pit 5", "C", to_dict(plan), "2026-11-03")
        a, b, _ = record.loads("Pit 5")
    check = depth_check(a)
    # 0.40 %C halfway from 0.50 to 0.30 (within 1 µm: the level is the model's profile read at its depth)
    assert check.measured == pytest.approx(0.8e-3 + 0.10 / 0.20 * 0.4e-3, abs=1e-6)
    assert check.predicted == pytest.approx(forward(plan, 6 * 3600.0).case_depth, rel=1e-12)
    assert depth_check(b).measured == 1.05e-3
    assert main(["record", "list", "--furnace", "Pit 5", "--json"]) == 0
    listed = json.loads(capsys.readouterr().out)["loads"]
    assert listed[1]["depth"]["measured_mm"] == pytest.approx(1.05) and listed[2]["depth"] is None
    assert main(["record", "list", "--furnace", "Pit 5"]) == 0
    assert "measured 1.05 mm (effective case depth)" in capsys.readouterr().out


def test_a_diffusivity_band_widens_the_load_spread():
    """The load spread's D factor (a furnace fit sets it from its interval): the parts' depths spread wider with D
    anywhere in D/1.3–D×1.3 (depth ∝ √D for a held surface, Crank 1975 §3.3: ±14 % at the ends); 1 spreads nothing."""
    from casedepth.shop.capability import Spread, capability

    plan = Plan(temperature=925 + K, carbon_potential=1.0, count_shop_stages=False, beta_held=True)
    values = {**plan.values(), "spread_samples": 64}
    none = capability(values, Spread())
    wide = capability({**values, "spread_d_factor": 1.3}, Spread())
    assert "d_multiplier" not in none.bands and wide.bands["d_multiplier"] == 1.3
    assert np.ptp(wide.depths) > 1.5 * np.ptp(none.depths)
    low, high = wide.sensitivity["d_multiplier"]
    assert low / wide.nominal == pytest.approx(1 / math.sqrt(1.3), rel=0.02)
    assert high / wide.nominal == pytest.approx(math.sqrt(1.3), rel=0.02)


def test_the_python_api_reaches_the_same_record_and_fit():
    import casedepth
    from casedepth.shop import furnace_fit, record

    assert casedepth.Record is record.Record and casedepth.Measurement is record.Measurement
    assert casedepth.fit_furnace is furnace_fit.fit_furnace and casedepth.depth_check is furnace_fit.depth_check


def test_a_furnace_has_a_type_a_survey_class_and_notes(scratch_record, capsys):
    """``record furnace NAME`` sets and shows a furnace's details (the survey class one of AMS 2750's six furnace
    classes), its loads and the fit new plans take."""
    assert main(["record", "furnace", "IQ 1", "--kind", "integral quench", "--survey-class", "class 2",
                 "--notes", "rebuilt 2025"]) == 0
    assert capsys.readouterr().out.startswith("IQ 1: integral quench, AMS 2750 class 2; rebuilt 2025")
    assert main(["record", "furnace", "IQ 1", "--json"]) == 0
    shown = json.loads(capsys.readouterr().out)
    assert (shown["kind"], shown["survey_class"], shown["loads"], shown["kept_fits"]) == ("integral quench", "2", 0, {})
    assert main(["record", "furnace", "IQ 1", "--survey-class", "7"]) == 2
    assert capsys.readouterr().err.startswith("casedepth: error: --survey-class: '7' is not an AMS 2750")
    assert main(["record", "furnace", "Pit 9", "--json"]) == 2  # shown only if it is there
    with Record(scratch_record) as record:
        assert record.furnace("IQ 1").notes == "rebuilt 2025"


def test_a_plan_calibrated_by_a_fit_states_the_fits_uncertainty():
    """A nitriding plan that took a furnace fit's D_N says how sure its depth is from the fit's interval (depth ∝
    √D_N, time ∝ 1/D_N at one depth: Crank 1975 §3.3), not "±25 % until calibrated"; its load spread carries that
    interval in the parts and adds no model uncertainty on top."""
    from casedepth.plan import evaluate, load
    from casedepth.shop.capability import Spread, capability

    plan = load(NITRIDED)
    plain = evaluate(plan)
    assert "until calibrated" in plain.setup.uncertainty
    plan.update(n_multiplier=0.85, spread_d_factor=1.21, calibration="Nitriding pit 1: record fit #4 of 2026-12-03")
    calibrated = evaluate(plan)
    assert calibrated.setup.uncertainty.startswith("depth ±10 %, time ±21 % from the furnace fit's D_N (95 %)")
    assert calibrated.view().hardness.caption.endswith("(depth ±10 %)")
    assert plain.view().hardness.caption.endswith("(depth ±25 % until calibrated)")
    load_spread = capability(plan.values(), Spread(samples=32))
    assert load_spread.model_uncertainty is None and load_spread.bands["n_multiplier"] == 1.21

"""The command line contract of ``casedepth carburize`` (issue: solver library and command line)."""

import json
import subprocess
import sys

import pytest

from casedepth.cli import main

BASE = ["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "1.00"]


def run(capsys, *args):
    code = main([*BASE, *args])
    out, err = capsys.readouterr()
    return code, out, err


def test_inverse_json_fields(capsys):
    code, out, _ = run(capsys, "--target", "1.0mm", "--json")
    assert code == 0
    data = json.loads(out)
    for key in ("soak_time_h", "surface_carbon_pct", "case_depth_mm", "threshold_carbon_pct", "warnings", "profile"):
        assert key in data
    assert data["case_depth_mm"] == pytest.approx(1.0, rel=1e-6)
    assert len(data["profile"]["depth_mm"]) == len(data["profile"]["carbon_pct"]) > 50
    assert 4.0 < data["soak_time_h"] < 10.0


def test_forward_json_fields_and_round_trip(capsys):
    _, out, _ = run(capsys, "--target", "1.0mm", "--json")
    hours = json.loads(out)["soak_time_h"]
    code, out, _ = run(capsys, "--time", f"{hours!r}h", "--carbon-at", "0.5mm", "--json")
    assert code == 0
    data = json.loads(out)
    assert data["case_depth_mm"] == pytest.approx(1.0, rel=5e-4)  # within the solver's accuracy
    assert data["carbon_at_pct"] > 0.4
    assert data["diffusion_length_mm"] > 0
    assert "length scale" in data["diffusion_length_note"]


def test_units_in_and_out(capsys):
    code, out, _ = run(capsys, "--target", "0.040in", "--at", "550HV", "--units", "imperial")
    assert code == 0
    assert "0.040 in at 550 HV" in out
    assert "°F" in out


def test_hardness_threshold_reports_its_carbon(capsys):
    """50 HRC on 8620: about 0.35–0.40 %C in a well-quenched, tempered case (common practice, from memory); read
    from the quench, a thick section in oil needs a little more carbon (bainite where the case is leanest)."""
    _, out, _ = run(capsys, "--target", "1.0mm", "--at", "50HRC", "--hardness-relation", "tempered", "--json")
    data = json.loads(out)
    assert 0.35 <= data["threshold_carbon_pct"] <= 0.40
    assert any("50 HRC is taken as" in w for w in data["warnings"])
    _, out, _ = run(capsys, "--target", "1.0mm", "--at", "50HRC", "--json")
    data = json.loads(out)
    assert 0.35 <= data["threshold_carbon_pct"] <= 0.46
    assert any("50 HRC is read as" in w for w in data["warnings"])


@pytest.mark.parametrize("args", [
    ["--geometry", "cylinder", "--diameter", "30mm"], ["--geometry", "bore", "--diameter", "30mm"],
    ["--geometry", "sphere", "--diameter", "30mm"], ["--thickness", "10mm"],
    ["--diffusivity", "agren"], ["--diffusivity", "arrhenius", "--d0", "2.3e-5", "--q", "148"],
    ["--beta", "inf"], ["--alloy-factor", "off"], ["--hardness-relation", "as-quenched", "--at", "550HV"],
])
def test_options_accepted(capsys, args):
    code, out, err = run(capsys, "--target", "0.8mm", *args)
    assert code == 0, err
    assert "Soak time" in out


def test_steel_list_and_help(capsys):
    assert main(["steels"]) == 0
    assert "16MnCr5" in capsys.readouterr().out
    assert main(["carburize", "--help"]) == 0
    assert main(["--version"]) == 0


BAD = [
    (["carburize"], "required"),
    ([*BASE], "--target --time"),
    ([*BASE, "--target", "1mm", "--time", "6h"], "not allowed with"),
    (["carburize", "--steel", "unobtainium", "--temperature", "925C", "--potential", "1", "--target", "1mm"], "--steel"),
    (["carburize", "--steel", "C=0.2 Zz=1", "--temperature", "925C", "--potential", "1", "--target", "1mm"], "--steel"),
    (["carburize", "--steel", "8620", "--temperature", "600C", "--potential", "1", "--target", "1mm"], "--temperature"),
    (["carburize", "--steel", "8620", "--temperature", "warm", "--potential", "1", "--target", "1mm"], "--temperature"),
    (["carburize", "--steel", "8620", "--temperature", "925C", "--potential", "9", "--target", "1mm"], "--potential"),
    ([*BASE, "--target", "-1mm"], "--target"),
    ([*BASE, "--target", "1 parsec"], "--target"),
    ([*BASE, "--time", "-2h"], "--time"),
    ([*BASE, "--time", "soon"], "--time"),
    ([*BASE, "--target", "1mm", "--at", "0.1%C"], "--at"),
    ([*BASE, "--target", "1mm", "--at", "99HRC"], "--at"),
    ([*BASE, "--target", "1mm", "--carbon-at", "0.5mm"], "--carbon-at"),
    ([*BASE, "--time", "6h", "--carbon-at", "-1mm"], "--carbon-at"),
    ([*BASE, "--target", "1mm", "--diffusivity", "magic"], "--diffusivity"),
    ([*BASE, "--target", "1mm", "--d0", "1e-5"], "--d0"),
    ([*BASE, "--target", "1mm", "--diffusivity", "arrhenius", "--q", "5"], "--q"),
    ([*BASE, "--target", "1mm", "--d-multiplier", "0"], "--d-multiplier"),
    ([*BASE, "--target", "1mm", "--beta", "-1cm/s"], "--beta"),
    ([*BASE, "--target", "1mm", "--alloy-factor", "maybe"], "--alloy-factor"),
    ([*BASE, "--target", "1mm", "--hardness-relation", "x"], "--hardness-relation"),
    ([*BASE, "--target", "1mm", "--geometry", "cube"], "--geometry"),
    ([*BASE, "--target", "1mm", "--geometry", "cylinder"], "--diameter"),
    ([*BASE, "--target", "1mm", "--geometry", "cylinder", "--diameter", "5km"], "--diameter"),
    ([*BASE, "--target", "1mm", "--thickness", "0mm"], "--thickness"),
    ([*BASE, "--target", "1mm", "--geometry", "cylinder", "--diameter", "10mm", "--thickness", "3mm"], "--thickness"),
    ([*BASE, "--target", "1mm", "--units", "furlongs"], "--units"),
    ([*BASE, "--target", "1mm", "--frobnicate"], "--frobnicate"),
]


@pytest.mark.parametrize("argv,names", BAD, ids=[" ".join(b[0][-2:]) for b in BAD])
def test_bad_input_gives_one_line_and_exit_2(capsys, argv, names):
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1, err
    assert "Traceback" not in err
    assert names.split()[0] in lines[0]


def test_installed_module_entry_point(tmp_path):
    done = subprocess.run([sys.executable, "-m", "casedepth", *BASE, "--target", "0.5mm", "--json"],
                          capture_output=True, text=True, timeout=60, cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["case_depth_mm"] == pytest.approx(0.5, rel=1e-6)


def test_the_drawing_window_on_the_command_line(capsys):
    """--target 0.9-1.3mm plans both ends and the aim (the middle), as the window does for its window."""
    code, out, _ = run(capsys, "--target", "0.9-1.3mm", "--json")
    data = json.loads(out)
    assert code == 0
    assert data["target_depth_mm"] == pytest.approx([0.9, 1.1, 1.3])
    low, high = data["window_soak_time_h"]
    assert low < data["soak_time_h"] < high
    assert data["case_depth_mm"] == pytest.approx(1.1, rel=1e-5)
    code, text, _ = run(capsys, "--target", "0.035-0.050in", "--units", "imperial")
    assert code == 0 and "drawing window" in text and "0.035 in to 0.050 in" in text


@pytest.mark.parametrize("command", [
    [*BASE, "--target", "0.9-1.3mm", "--geometry", "cylinder", "--diameter", "32mm", "--at", "50HRC"],
    [*BASE[:1], "--steel", "8620", "--temperature", "925C", "--target", "1.2mm", "--surface-target", "0.75-0.85"],
    ["nitride", "--steel", "4140", "--temperature", "520C", "--dissociation", "40", "--target", "0.3-0.5mm",
     "--compound", "4-8um", "--two-stage", "on"],
], ids=["one soak", "boost and diffuse", "two-stage nitriding"])
def test_a_saved_plan_runs_to_the_same_numbers(capsys, tmp_path, command):
    """One evaluation path: the plan `--save` writes gives, through `casedepth run`, the numbers the command
    printed (1e-9)."""
    path = tmp_path / "plan.cdplan.json"
    assert main([*command, "--json", "--save", str(path)]) == 0
    first = json.loads(capsys.readouterr().out)
    assert main(["run", str(path), "--json"]) == 0
    again = json.loads(capsys.readouterr().out)
    for key in ("soak_time_h", "case_depth_mm", "window_soak_time_h", "boost_time_h", "compound_layer_um"):
        if key in first:
            assert again[key] == pytest.approx(first[key], rel=1e-9), key


def test_the_shop_stages_policy_is_shown_and_the_same_default_everywhere(capsys):
    """A new plan counts the carbon of the shop's heat-up, drop and equalize, whether made on the command line, in
    Python or in the window (one table row's default); every output says whether it does."""
    from casedepth.plan import Plan, evaluate

    _, out, _ = run(capsys, "--target", "1.0mm", "--json")
    counted = json.loads(out)
    assert counted["shop_stages_counted"] is True and Plan().count_shop_stages is True
    assert counted["soak_time_h"] == pytest.approx(evaluate(Plan(case_min=1e-3, case_max=1e-3)).soak_time / 3600,
                                                   rel=1e-12)
    _, out, _ = run(capsys, "--target", "1.0mm", "--json", "--shop-stages", "off")
    alone = json.loads(out)
    assert alone["shop_stages_counted"] is False and alone["soak_time_h"] > counted["soak_time_h"]
    _, text, _ = run(capsys, "--target", "1.0mm")
    assert "shop stages           counted (heat-up 1 h" in text
    _, text, _ = run(capsys, "--time", "6h")
    assert "shop stages           counted" in text


@pytest.mark.parametrize("args,flag,words", [
    (["--target", "1mm", "--d0", "2e-5"], "--d0", "only used with the arrhenius diffusivity"),
    (["--target", "1mm", "--surface-target", "0.8"], "--potential", "only used with one soak"),
    (["--target", "1mm", "--boost-potential", "1.1"], "--boost-potential", "only used with boost and diffuse"),
    (["--target", "1.3-0.9mm"], "--target", "below its start"),
    (["--target", "1mm", "--shop-stages", "maybe"], "--shop-stages", "on or off"),
])
def test_an_option_that_plays_no_part_or_cannot_be_read_is_named(capsys, args, flag, words):
    code, out, err = run(capsys, *args)
    assert code == 2 and out == ""
    assert err.startswith(f"casedepth: error: {flag}: ") and words in err


@pytest.mark.parametrize("change,words", [
    ({"threshold_kind": "hrc "}, "threshold_kind: 'hrc ' is not one of"),
    ({"carbon_potential_pct": "1.0"}, "carbon_potential_pct: '1.0' is not a number"),
    ({"nonsense": 1}, "unknown key nonsense"),
])
def test_a_bad_plan_file_is_named_in_one_line(capsys, tmp_path, change, words):
    from casedepth.plan import Plan, to_dict

    data = to_dict(Plan())
    data.update(change)
    path = tmp_path / "bad.cdplan.json"
    path.write_text(json.dumps(data))
    assert main(["run", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("casedepth: error: PLAN: ") and words in err and len(err.strip().splitlines()) == 1


def test_a_probe_reading_that_means_soot_is_refused(capsys):
    assert main(["probe", "--temperature", "800C", "--mv", "1300", "--carrier-co", "50"]) == 2
    err = capsys.readouterr().err
    assert "--mv" in err and "graphite" in err and "Traceback" not in err

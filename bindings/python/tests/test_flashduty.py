"""The Python package: cases against the command-line tool, batch calls against the
per-case calls and against scipy's brentq on the Rachford-Rice equation, errors with their
kind and field, and the hostile inputs the tool's tests use."""

import json
import math
import pathlib
import sys
import subprocess
import threading

import numpy as np
import pytest

import flashduty

# The Rachford-Rice root by scipy's brentq, a reference outside the project: the same loop
# as the package's benchmark (tools/bench_python.py).
sys.path.insert(0, str(pathlib.Path(__file__).resolve().parents[3] / "tools"))
from bench_python import rr_brentq  # noqa: E402

# (file, command, components file): every case example the tool runs.
EXAMPLES = [
    ("flash_tp.json", "flash", None),
    ("flash_tp.toml", "flash", None),
    ("flash_given_k.json", "flash", None),
    ("flash_p_vapour_fraction.json", "flash", None),
    ("flash_t_vapour_fraction.json", "flash", None),
    ("bubble.json", "bubble", None),
    ("bubble_t.json", "bubble", None),
    ("dew.json", "dew", None),
    ("duty.json", "duty", None),
    ("duty_given.json", "duty", None),
    ("curve.json", "curve", None),
    ("water_toluene_condenser.json", "curve", None),
    ("wet_toluene_bubble.json", "bubble", None),
    ("user_component_case.json", "bubble", "user_component.json"),
    ("ethanol_water_bubble.json", "bubble", None),
    ("ethanol_water_heater.json", "duty", None),
    ("azeotropes.json", "azeotropes", None),
]


def load_case(path):
    text = path.read_text()
    if path.suffix == ".toml":
        import tomllib

        return tomllib.loads(text)
    return json.loads(text)


@pytest.mark.parametrize("name,command,components", EXAMPLES)
def test_every_example_matches_the_command_line_tool(root, cli, name, command, components):
    path = root / "examples" / name
    args = [str(cli), command, "--json", str(path)]
    library = None
    if components:
        args += ["--components", str(root / "examples" / components)]
        library = flashduty.Library(files=[str(root / "examples" / components)])
    expected = json.loads(subprocess.run(args, check=True, capture_output=True, text=True).stdout)
    got = getattr(flashduty, command)(load_case(path), library=library).to_dict()
    assert got == expected


def test_results_read_as_attributes_and_items():
    r = flashduty.duty(
        components=["benzene", "toluene"],
        z=[0.5, 0.5],
        flow="36 kmol/h",
        inlet={"T": "25 degC", "P": "1 atm"},
        outlet={"T": "120 degC", "P": "1 atm"},
    )
    assert r.duty_W > 0 and r["duty_W"] == r.duty_W
    assert r.outlet.phase == "vapour" and r.outlet["T_K"] == pytest.approx(393.15)
    assert "caution" in r and "licensed engineer" in r.caution
    found = flashduty.outlet_for_duty(
        components=["benzene", "toluene"],
        z=[0.5, 0.5],
        flow="36 kmol/h",
        inlet={"T": "25 degC", "P": "1 atm"},
        outlet={"P": "1 atm"},
        duty=r.duty_W,
    )
    assert found.outlet.T_K == pytest.approx(393.15, abs=1e-6)


def test_water_phase_and_library_files(root):
    # CRC azeotrope table (from memory): water-toluene boils at 84.1 degC at 1 atm.
    r = flashduty.bubble(components=["water", "toluene"], z=[0.3, 0.7], P="1 atm", water_phase="immiscible")
    assert abs(r.T_K - 273.15 - 84.1) < 1.0
    assert r.phase_set == "organic+aqueous"
    lib = flashduty.Library(files=[str(root / "examples" / "user_component.json")])
    assert len(lib) == len(flashduty.Library()) + 1
    assert "exampleane" in lib.names()


def test_activity_models_and_azeotropes():
    # Perry's ethanol-water table at 1 atm (from memory): x = 0.0966 boils at 86.7 degC and
    # x = 0.1238 at 85.3 degC; CRC azeotrope table (from memory): 78.15 degC at x = 0.894.
    r = flashduty.bubble(components=["ethanol", "water"], z=[0.1, 0.9], P="1 atm", liquid_model="nrtl")
    assert 85.3 < r.T_K - 273.15 < 87.2
    assert r.liquid_model == "nrtl"
    ideal = flashduty.bubble(components=["ethanol", "water"], z=[0.1, 0.9], P="1 atm")
    assert "non-ideal-liquid" in [w["kind"] for w in ideal.warnings]
    a = flashduty.azeotropes(components=["ethanol", "water"], P="1 atm", liquid_model="nrtl")
    assert a.count == 1
    assert abs(a.azeotropes[0]["T_K"] - 351.3) < 0.2


# The hostile inputs of the command-line tool's tests: each refused with its kind and field.
HOSTILE = [
    ({"components": ["unobtainium"], "z": [1], "T": 300, "P": 1e5}, "unknown-component", "components[0]"),
    ({"components": ["water"], "z": [1], "T": "hot", "P": 1e5}, "not-a-number", "T"),
    ({"components": ["water"], "z": [1], "T": "300 furlongs", "P": 1e5}, "unknown-unit", "T"),
    ({"components": ["water"], "z": [1], "T": -5, "P": 1e5}, None, "T"),
    ({"components": ["water"], "z": [1], "T": 300, "P": "1 barg"}, "gauge-pressure", "P"),
    ({"components": ["water", "ethanol"], "z": [0.5, -0.5], "T": 300, "P": 1e5}, None, "z[1]"),
    ({"components": ["water", "ethanol"], "z": [0.5, 0.6], "T": 300, "P": 1e5}, "mole-fraction-sum", "z"),
    ({"components": ["water"], "z": [1], "T": 300, "P": 1e5, "colour": "blue"}, "unknown-key", "colour"),
    ({"components": ["water"], "z": [1], "T": 300}, None, "flash"),
    ({"components": ["x" * 100_000], "z": [1], "T": 300, "P": 1e5}, "unknown-component", "components[0]"),
    ({"z": [0.5, 0.5], "K": [2, -1]}, None, "K[1]"),
    ({"components": ["water", "toluene"], "z": [0.5, 0.5], "P": 1e5, "water_phase": "maybe"}, None, "water_phase"),
    ({"components": ["water"], "z": [1], "P": 1e5, "T": 300, "liquid_model": "margules"}, "unknown-liquid-model", "liquid_model"),
    (
        {"components": ["ethanol", "water"], "z": [0.5, 0.5], "P": 1e5, "T": 350, "liquid_model": "nrtl",
         "binary_parameters": {"pairs": [{"components": ["ethanol", "water"], "nrtl": {"b12": 1, "b21": 1, "alpha": 2}}]}},
        "invalid-parameter",
        "binary_parameters.pairs[0].nrtl.alpha",
    ),
]


@pytest.mark.parametrize("case,kind,field", HOSTILE)
def test_hostile_inputs_raise_with_kind_and_field(case, kind, field):
    command = "bubble" if "water_phase" in case else "flash"
    with pytest.raises(flashduty.FlashdutyError) as info:
        getattr(flashduty, command)(case)
    e = info.value
    assert e.field == field, str(e)
    if kind:
        assert e.kind == kind, str(e)
    assert "\n" not in str(e) and len(str(e)) < 100_200


def test_values_python_cannot_write_as_json_are_refused():
    with pytest.raises(flashduty.FlashdutyError) as info:
        flashduty.flash(components=["water"], z=[math.nan], T=300, P=1e5)
    assert info.value.kind == "invalid-case"
    with pytest.raises(flashduty.FlashdutyError):
        flashduty.flash(components=["water"], z=[1], T=object(), P=1e5)


def test_batch_errors_name_the_row():
    z = np.array([[0.5, 0.5], [0.5, 0.5]])
    with pytest.raises(flashduty.FlashdutyError) as info:
        flashduty.flash_batch(["benzene", "toluene"], z, [360.0, -1.0], 1e5)
    assert info.value.field == "row 1: T"
    with pytest.raises(flashduty.FlashdutyError) as info:
        flashduty.rachford_rice_batch(np.array([[0.5, 0.6]]), np.array([[2.0, 0.5]]))
    assert info.value.kind == "mole-fraction-sum"
    with pytest.raises(flashduty.FlashdutyError) as info:
        flashduty.rachford_rice_batch(np.array([[0.5, 0.5]]), np.array([[2.0, 0.5, 1.0]]))
    assert info.value.kind == "length-mismatch"
    with pytest.raises(flashduty.FlashdutyError):
        flashduty.flash_batch(["benzene", "unobtainium"], z, 360.0, 1e5)
    with pytest.raises(flashduty.FlashdutyError):
        flashduty.duty_batch(["water", "ethanol"], [0.5, 0.5], 1.0, 300, 1e5, 350, 1e5, water_phase="immiscible")


def random_given_k(rng, rows, n):
    z = rng.uniform(0.05, 1.0, size=(rows, n))
    z /= z.sum(axis=1, keepdims=True)
    k = np.exp(rng.uniform(np.log(0.01), np.log(100.0), size=(rows, n)))
    return z, k


def test_rachford_rice_batch_against_brentq():
    rng = np.random.default_rng(20261203)
    z, k = random_given_k(rng, 500, 10)
    out = flashduty.rachford_rice_batch(z, k)
    for r in range(500):
        assert out["vapour_fraction"][r] == pytest.approx(rr_brentq(z[r], k[r]), abs=1e-12)
    x, y = out["x"], out["y"]
    back = out["liquid_fraction"][:, None] * x + out["vapour_fraction"][:, None] * y
    assert np.allclose(back, z, rtol=0, atol=1e-14)


def test_flash_batch_matches_one_flash_at_a_time_and_threads():
    rng = np.random.default_rng(7)
    names = ["n-pentane", "n-hexane", "n-heptane", "toluene"]
    z = rng.uniform(0.05, 1, size=(200, 4))
    z /= z.sum(axis=1, keepdims=True)
    t = rng.uniform(300, 400, size=200)
    out = flashduty.flash_batch(names, z, t, 101325.0)
    for r in range(0, 200, 20):
        one = flashduty.flash(components=names, z=list(z[r]), T=float(t[r]), P=101325.0)
        assert out["vapour_fraction"][r] == pytest.approx(one.vapour_fraction, abs=1e-14)
        assert flashduty.PHASES[out["phase"][r]] == one.phase
    # Calls from several threads at once give the same answers (the GIL is released).
    results = [None] * 4

    def work(i):
        results[i] = flashduty.flash_batch(names, z, t, 101325.0)["vapour_fraction"]

    threads = [threading.Thread(target=work, args=(i,)) for i in range(4)]
    for th in threads:
        th.start()
    for th in threads:
        th.join()
    for res in results:
        assert np.array_equal(res, out["vapour_fraction"])


def test_duty_batch_matches_the_duty_case():
    t_out = np.linspace(300.0, 420.0, 13)
    q = flashduty.duty_batch(["benzene", "toluene"], [0.5, 0.5], 2.0, 298.15, 101325.0, t_out, 101325.0)
    for i in (0, 6, 12):
        one = flashduty.duty(
            components=["benzene", "toluene"],
            z=[0.5, 0.5],
            flow=2.0,
            inlet={"T": 298.15, "P": 101325.0},
            outlet={"T": float(t_out[i]), "P": 101325.0},
        )
        assert q[i] == one.duty_W
    assert np.all(np.diff(q) > 0)


def test_case_text_almost_right_never_crashes():
    """The command-line tool's fuzz-like inputs, text that is often almost a case: random
    edits of valid cases. Each either runs or raises FlashdutyError with a one-line message."""
    import random

    from flashduty import _flashduty

    rng = random.Random(20261203)
    seeds = [
        '{"components": ["benzene", "toluene"], "z": [0.5, 0.5], "P": "1 atm"}',
        '{"components": ["water", "toluene"], "z": [0.3, 0.7], "T": 350, "P": 1e5, "water_phase": "immiscible"}',
        '{"components": ["water"], "z": [1], "inlet": {"T": 300, "P": 1e5}, "outlet": {"T": 400, "P": 1e5}}',
    ]
    alphabet = '{}[]":,. -eE0123456789abcdefghijklmnopqrstuvwxyzTPKz\\\x00\u00e9'
    for _ in range(600):
        text = list(rng.choice(seeds))
        for _ in range(rng.randint(1, 6)):
            i = rng.randrange(len(text) + 1)
            op = rng.random()
            if op < 0.4 and text:
                del text[min(i, len(text) - 1)]
            elif op < 0.8:
                text.insert(i, rng.choice(alphabet))
            elif text:
                text[min(i, len(text) - 1)] = rng.choice(alphabet)
        command = rng.choice(["flash", "bubble", "dew", "duty", "curve"])
        try:
            flashduty._native(_flashduty.run_case, command, "".join(text))
        except flashduty.FlashdutyError as e:
            assert "\n" not in str(e) and e.kind

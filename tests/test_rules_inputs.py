"""Bad input to the keys of issue 17 (rules, back-up, rings, protective conductors, transformer
voltage, Ics) is refused in one line naming the circuit, the key and what is allowed."""

from __future__ import annotations

import pytest

from coordination import study
from curves.errors import InputError

SUPPLY = """
[supply]
u0_v = 230
phases = 1
earthing = "TN-C-S"
pfc_a = 4000
ze_ohm = 0.35
"""

BOARD = SUPPLY + """
[[circuit]]
id = "tails"
from = "supply"
device = "gG100"
{tails}
[circuit.cable]
length_m = 3
csa_mm2 = 25
{tails_cable}

[[circuit]]
id = "ring"
from = "tails"
device = "B32"
{ring}
[circuit.cable]
length_m = 50
csa_mm2 = 2.5
cpc_mm2 = 1.5
{ring_cable}
"""


def _board(tails: str = "", tails_cable: str = "", ring: str = "", ring_cable: str = "",
           more: str = "") -> str:
    return BOARD.format(tails=tails, tails_cable=tails_cable, ring=ring,
                        ring_cable=ring_cable) + more


# (study text, the circuit, the key, words of the message)
REFUSED = [
    ('[study]\nrules = "nec"\n' + _board(), None, "study.rules", "allowed: iec, bs7671"),
    (_board(ring="backup_a = { supply = 10000 }"), "ring", "backup_a.supply",
     "not a circuit above"),
    (_board(ring="backup_a = { tails = -5 }"), "ring", "backup_a.tails", "out of range"),
    (_board(ring="backup_a = 16000"), "ring", "backup_a", "must be a table"),
    (_board(ring="conditional_a = 16000"), "ring", "conditional_a", "feeds no circuit"),
    (_board(tails="ring = true"), "tails", "ring", "feeds"),
    (_board(ring="sockets = 1"), "ring", "sockets", "true or false"),
    (_board(ring_cable="cpc_armour = true"), "ring", "cable.cpc_mm2", "armour is the"),
    (_board(tails_cable="cpc_armour = true"), "tails", "cable.armour_mm2", "needs armour_mm2"),
    (_board(tails_cable="armour_mm2 = 16"), "tails", "cable.armour_mm2", "only with cpc_armour"),
    (_board(tails_cable="cpc_separate = 1"), "tails", "cable.cpc_separate", "true or false"),
    (_board(ring='device = { family = "tm", In_a = 32, icu_a = 6000, ics_a = 9000 }'),
     "ring", "device.ics_a", "at most Icu"),
]


@pytest.mark.parametrize(("text", "circuit", "key", "words"), REFUSED)
def test_bad_input_is_named(text: str, circuit: str | None, key: str, words: str) -> None:
    if 'device = { family = "tm"' in text:  # the ring's own device replaced
        text = text.replace('device = "B32"\ndevice', "device")
    with pytest.raises(InputError) as caught:
        study.loads(text)
    error = caught.value
    assert error.circuit == circuit
    assert error.key == key
    assert words in str(error)
    assert "\n" not in str(error)


def test_ring_needs_its_cable() -> None:
    text = SUPPLY + '[[circuit]]\nid = "r"\nfrom = "supply"\ndevice = "B32"\nring = true\n'
    with pytest.raises(InputError, match="ring = true needs the ring's cable"):
        study.loads(text)


# the transformer's low-voltage rating far from sqrt(3) U0 (our bounds, 0.9..1.2 of it)
@pytest.mark.parametrize("u_lv_v", [11000.0, 230.0, 300.0])
def test_transformer_voltage_slip_is_refused(u_lv_v: float) -> None:
    text = f"""
[supply]
u0_v = 230
phases = 3
[supply.transformer]
rating_kva = 500
impedance_pct = 4.5
u_lv_v = {u_lv_v}
[[circuit]]
id = "a"
from = "supply"
device = "gG100"
"""
    with pytest.raises(InputError) as caught:
        study.loads(text)
    assert caught.value.key == "supply.transformer.u_lv_v"
    assert "allowed: 359 to 478 V" in str(caught.value)


def test_cli_refuses_an_unknown_rule_set_in_one_line(cli, tmp_path) -> None:
    path = tmp_path / "s.toml"
    path.write_text('[study]\nrules = "nec"\n' + _board(), encoding="utf-8")
    result = cli("check", path)
    assert result.exit_code == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and "study.rules" in lines[0] and "bs7671" in lines[0]

"""The two rule sets against the clauses they cite: IEC 60364-4-41/-4-43 and BS 7671:2018.

Each parametrize names its clause on the line above. BS 7671's scope of Table 41.1 and its
433.1.202 are from memory (the brief of the rule set says so, and so does every output).
"""

from __future__ import annotations

import pytest

from coordination import rules
from curves.errors import InputError

# (rule set, final, sockets, In [A], takes Table 41.1's times)
# IEC 60364-4-41:2005 411.3.2.2: Table 41.1 applies to final circuits not exceeding 32 A,
# with or without socket-outlets; 411.3.2.3 / 411.3.2.4: others 5 s (TN) / 1 s (TT).
IEC_SCOPE = [
    ("iec", True, True, 32.0, True),
    ("iec", True, True, 40.0, False),
    ("iec", True, False, 32.0, True),
    ("iec", True, False, 40.0, False),
    ("iec", False, True, 16.0, False),
]
# BS 7671:2018 411.3.2.2 (from memory): final circuits up to 63 A with one or more
# socket-outlets and up to 32 A supplying only fixed equipment.
BS_SCOPE = [
    ("bs7671", True, True, 63.0, True),
    ("bs7671", True, True, 80.0, False),
    ("bs7671", True, True, 40.0, True),
    ("bs7671", True, False, 32.0, True),
    ("bs7671", True, False, 40.0, False),
    ("bs7671", False, True, 16.0, False),
]


# IEC 60364-4-41:2005 411.3.2.2-411.3.2.4
@pytest.mark.parametrize(("name", "final", "sockets", "in_a", "expected"), IEC_SCOPE)
def test_iec_scope_of_table_41_1(name, final, sockets, in_a, expected) -> None:
    assert rules.in_final_scope(rules.rule_set(name), final, sockets, in_a) is expected


# BS 7671:2018 411.3.2.2 (from memory)
@pytest.mark.parametrize(("name", "final", "sockets", "in_a", "expected"), BS_SCOPE)
def test_bs7671_scope_of_table_41_1(name, final, sockets, in_a, expected) -> None:
    assert rules.in_final_scope(rules.rule_set(name), final, sockets, in_a) is expected


# BS 7671:2018 is never looser than IEC 60364-4-41:2005 on the scope of the short times: every
# circuit IEC 60364-4-41 411.3.2.2 puts in scope, BS 7671 411.3.2.2 (from memory) does too.
@pytest.mark.parametrize("sockets", [True, False])
@pytest.mark.parametrize("in_a", [6.0, 16.0, 32.0, 40.0, 63.0, 80.0])
def test_bs7671_scope_contains_iec_scope(sockets: bool, in_a: float) -> None:
    if rules.in_final_scope(rules.IEC, True, sockets, in_a):
        assert rules.in_final_scope(rules.BS7671, True, sockets, in_a)


# (rule set, family, In <= Iz held to meet I2 <= 1.45 Iz)
# BS 7671:2018 433.1.202 (from memory): gG fuses to BS 88-2/-3, MCBs to BS EN 60898, breakers to
# BS EN 60947-2 and RCBOs to BS EN 61009-1; IEC 60364-4-43:2008 433.1 has no such provision.
I2_IMPLIED = [
    ("bs7671", "gG", True),
    ("bs7671", "mcb", True),
    ("bs7671", "breaker-tm", True),
    ("bs7671", "breaker-electronic", True),
    ("bs7671", "datasheet", False),
    ("iec", "gG", False),
    ("iec", "mcb", False),
    ("iec", "breaker-tm", False),
]


# BS 7671:2018 433.1.202 (from memory); IEC 60364-4-43:2008 433.1
@pytest.mark.parametrize(("name", "family", "expected"), I2_IMPLIED)
def test_i2_condition_implied_by_in_le_iz(name: str, family: str, expected: bool) -> None:
    assert rules.i2_implied(rules.rule_set(name), family) is expected


# Each rule set cites the clauses above in its own words; BS 7671's recalled ones are marked.
# (rule set, attribute, the clause cited)
CITED = [
    ("iec", "scope", "IEC 60364-4-41:2005 411.3.2.2"),
    ("iec", "final_times", "IEC 60364-4-41 Table 41.1"),
    ("iec", "distribution_tn", "IEC 60364-4-41 411.3.2.3"),
    ("iec", "distribution_tt", "IEC 60364-4-41 411.3.2.4"),
    ("iec", "overload", "IEC 60364-4-43 433.1"),
    ("iec", "backup", "IEC 60364-4-43 434.5.1"),
    ("bs7671", "scope", "BS 7671:2018 411.3.2.2 (from memory)"),
    ("bs7671", "final_times", "BS 7671:2018 Table 41.1"),
    ("bs7671", "i2_implied", "BS 7671:2018 433.1.202 (from memory)"),
    ("bs7671", "backup", "BS 7671:2018 434.5.1"),
]


# IEC 60364-4-41:2005, IEC 60364-4-43:2008, BS 7671:2018 (clause numbers as cited above)
@pytest.mark.parametrize(("name", "attribute", "cited"), CITED)
def test_each_rule_cites_its_clause(name: str, attribute: str, cited: str) -> None:
    assert getattr(rules.rule_set(name), attribute).cite == cited


def test_rule_set_names_and_refusal() -> None:
    assert rules.rule_set(" BS7671 ") is rules.BS7671
    assert rules.rule_set("iec") is rules.IEC
    with pytest.raises(InputError, match=r"key 'study.rules'.*allowed: \"iec\", \"bs7671\""):
        rules.rule_set("nec")
    with pytest.raises(InputError):
        rules.rule_set(True)


# (rule set, final, sockets, In [A], kind, the clause a circuit's time comes from)
# IEC 60364-4-41:2005 Table 41.1 / 411.3.2.3 (TN) / 411.3.2.4 (TT); BS 7671:2018 the same
# clauses, its scope from memory
CLASSES = [
    ("iec", True, True, 40.0, "TN", "IEC 60364-4-41 411.3.2.3"),
    ("bs7671", True, True, 40.0, "TN", "BS 7671:2018 Table 41.1"),
    ("bs7671", True, False, 40.0, "TT", "BS 7671:2018 411.3.2.4"),
    ("iec", False, False, 16.0, "TN", "IEC 60364-4-41 411.3.2.3"),
]


# IEC 60364-4-41:2005 411.3.2.2-411.3.2.4; BS 7671:2018 411.3.2.2 (from memory)
@pytest.mark.parametrize(("name", "final", "sockets", "in_a", "kind", "cited"), CLASSES)
def test_circuit_class_cites_where_its_time_comes_from(name, final, sockets, in_a, kind,
                                                       cited) -> None:
    _, words, clause = rules.circuit_class(rules.rule_set(name), final, sockets, in_a, kind)
    assert clause.where == cited
    assert words.endswith(kind)

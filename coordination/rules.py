"""National rule sets: which clauses a study's protection checks apply.

The checks apply IEC 60364 unless the study says ``[study] rules = "bs7671"``. The two rule sets
differ in a few places a designer meets every day, and every difference lives here, as frozen
data with the clause it comes from, read through small pure functions (no test of the rule
set's name anywhere else):

* the scope of Table 41.1's short disconnection times (0.4 s in TN at 230 V): IEC 60364-4-41
  final circuits up to 32 A; BS 7671 final circuits up to 63 A with socket-outlets and up to
  32 A supplying fixed equipment;
* the overload condition I2 <= 1.45 Iz: BS 7671 holds it met by In <= Iz for gG fuse-links
  (taken as BS 88-2/-3), MCBs, IEC 60947-2 breakers and RCBOs; IEC 60364-4-43 asks for it.

What both share (the times of Table 41.1 themselves, back-up protection by a device on the
supply side) is one :class:`Clause` each, cited in the rule set's own words.

Values marked "from memory" were recalled, not read from a copy of the standard.
"""

from __future__ import annotations

from dataclasses import dataclass
from types import MappingProxyType
from typing import Any

from curves.errors import InputError


@dataclass(frozen=True)
class Clause:
    """A requirement and where it is written.

    Parameters
    ----------
    where : str
        The standard and clause or table, e.g. ``"IEC 60364-4-41 411.3.2.2"``.
    says : str
        The requirement in a few words (our wording).
    from_memory : bool
        The clause (its number or its content) was recalled rather than read.
    """

    where: str
    says: str
    from_memory: bool = False

    @property
    def cite(self) -> str:
        """``where``, marked "from memory" where it was recalled.

        Examples
        --------
        >>> print(Clause("BS 7671 433.1.202", "In <= Iz suffices", True).cite)
        BS 7671 433.1.202 (from memory)
        """
        return f"{self.where} (from memory)" if self.from_memory else self.where


@dataclass(frozen=True, eq=False)  # one object per rule set: identity is equality (and a fast
class RuleSet:                     # hash for the caches keyed on it)
    """The clauses a study's checks apply, as data.

    Parameters
    ----------
    key : str
        The study-file value (``"iec"``, ``"bs7671"``).
    name : str
        What every output calls it (``"IEC 60364"``, ``"BS 7671:2018"``).
    sockets_scope_a : float
        Largest rated current [A] of a final circuit with socket-outlets that takes Table 41.1's
        times.
    fixed_scope_a : float
        Largest rated current [A] of a final circuit supplying only fixed equipment that takes
        them.
    scope : Clause
        Where that scope is written.
    final_times : Clause
        Table 41.1 (the times themselves, the same values in both rule sets).
    distribution_tn, distribution_tt : Clause
        5 s (TN) and 1 s (TT) for distribution circuits and final circuits beyond the scope.
    overload : Clause
        Ib <= In <= Iz and I2 <= 1.45 Iz.
    i2_implied_families : frozenset of str
        Band families (``curves.band.Band.family``) for which In <= Iz is held to meet
        I2 <= 1.45 Iz.
    i2_implied : Clause or None
        Where that is written, and of which devices.
    backup : Clause
        Back-up protection: a device with a lower breaking capacity, backed by one on the supply
        side.
    """

    key: str
    name: str
    sockets_scope_a: float
    fixed_scope_a: float
    scope: Clause
    final_times: Clause
    distribution_tn: Clause
    distribution_tt: Clause
    overload: Clause
    i2_implied_families: frozenset[str]
    i2_implied: Clause | None
    backup: Clause


#: IEC 60364 (the default): IEC 60364-4-41:2005 and IEC 60364-4-43:2008.
IEC = RuleSet(
    key="iec",
    name="IEC 60364",
    sockets_scope_a=32.0,
    fixed_scope_a=32.0,
    scope=Clause("IEC 60364-4-41:2005 411.3.2.2",
                 "Table 41.1 applies to final circuits not exceeding 32 A"),
    final_times=Clause("IEC 60364-4-41 Table 41.1", "maximum disconnection times of final "
                       "circuits (TN 0.4 s, TT 0.2 s at 120 < U0 <= 230 V)"),
    distribution_tn=Clause("IEC 60364-4-41 411.3.2.3", "TN distribution circuits and final "
                           "circuits beyond the scope of Table 41.1: 5 s"),
    distribution_tt=Clause("IEC 60364-4-41 411.3.2.4", "TT distribution circuits and final "
                           "circuits beyond the scope of Table 41.1: 1 s"),
    overload=Clause("IEC 60364-4-43 433.1", "Ib <= In <= Iz and I2 <= 1.45 Iz"),
    i2_implied_families=frozenset(),
    i2_implied=None,
    backup=Clause("IEC 60364-4-43 434.5.1", "a lower breaking capacity is admitted where a "
                  "device on the supply side has the breaking capacity needed and the energy "
                  "let through is withstood by the device and the conductors on the load side"),
)

#: BS 7671:2018 (the UK's wiring regulations, which follow IEC 60364 with national changes).
BS7671 = RuleSet(
    key="bs7671",
    name="BS 7671:2018",
    sockets_scope_a=63.0,
    fixed_scope_a=32.0,
    scope=Clause("BS 7671:2018 411.3.2.2", "Table 41.1 applies to final circuits not exceeding "
                 "63 A with one or more socket-outlets and 32 A supplying only fixed equipment",
                 from_memory=True),
    final_times=Clause("BS 7671:2018 Table 41.1", "maximum disconnection times of final "
                       "circuits (TN 0.4 s, TT 0.2 s at 120 < U0 <= 230 V)"),
    distribution_tn=Clause("BS 7671:2018 411.3.2.3", "TN distribution circuits and final "
                           "circuits beyond the scope of Table 41.1: 5 s"),
    distribution_tt=Clause("BS 7671:2018 411.3.2.4", "TT distribution circuits and final "
                           "circuits beyond the scope of Table 41.1: 1 s"),
    overload=Clause("BS 7671:2018 433.1.1", "Ib <= In <= Iz and I2 <= 1.45 Iz",
                    from_memory=True),
    # mcb: BS EN 60898 MCBs and BS EN 61009-1 RCBOs (an RCBO's overcurrent part is an MCB's);
    # breaker-tm / breaker-electronic: BS EN 60947-2; gG: taken as BS 88-2 / BS 88-3
    i2_implied_families=frozenset({"gG", "mcb", "breaker-tm", "breaker-electronic"}),
    i2_implied=Clause("BS 7671:2018 433.1.202", "In <= Iz also meets I2 <= 1.45 Iz for gG "
                      "fuses to BS 88-2 / BS 88-3, MCBs to BS EN 60898, breakers to "
                      "BS EN 60947-2 and RCBOs to BS EN 61009-1", from_memory=True),
    backup=Clause("BS 7671:2018 434.5.1", "a lower breaking capacity is admitted where a device "
                  "on the supply side has the breaking capacity needed and the energy let "
                  "through is withstood by the device and the conductors on the load side"),
)

#: The rule sets by their study-file value.
RULE_SETS = MappingProxyType({IEC.key: IEC, BS7671.key: BS7671})
#: The default rule set.
DEFAULT = IEC.key


def rule_set(value: Any = DEFAULT) -> RuleSet:
    """The rule set a study names (case and surrounding spaces ignored).

    Raises
    ------
    InputError
        For anything but ``"iec"`` or ``"bs7671"`` (key ``study.rules``).

    Examples
    --------
    >>> print(rule_set("BS7671").name)
    BS 7671:2018
    """
    if isinstance(value, RuleSet):
        return value
    if isinstance(value, str) and value.strip().lower() in RULE_SETS:
        return RULE_SETS[value.strip().lower()]
    allowed = ", ".join(f'"{k}"' for k in RULE_SETS)
    raise InputError(f"unknown rule set {value!r}; allowed: {allowed}", key="study.rules")


def final_scope_a(rules: RuleSet, sockets: bool) -> float:
    """Largest rated current [A] of a final circuit that takes Table 41.1's times.

    Parameters
    ----------
    rules : RuleSet
        The study's rule set.
    sockets : bool
        The circuit supplies socket-outlets.

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2.2 (32 A); BS 7671:2018, 411.3.2.2 (63 A with socket-outlets,
    32 A fixed equipment; from memory).

    Examples
    --------
    >>> print(final_scope_a(BS7671, True), final_scope_a(IEC, True))
    63.0 32.0
    """
    return rules.sockets_scope_a if sockets else rules.fixed_scope_a


def in_final_scope(rules: RuleSet, final: bool, sockets: bool, in_a: float) -> bool:
    """Whether a circuit takes the short times of Table 41.1 (else 5 s TN / 1 s TT).

    Parameters
    ----------
    rules : RuleSet
        The study's rule set.
    final : bool
        A final circuit (feeds current-using equipment or socket-outlets, no board).
    sockets : bool
        It supplies socket-outlets.
    in_a : float
        Its device's rated current or current setting [A].

    References
    ----------
    IEC 60364-4-41:2005, 411.3.2.2-411.3.2.4; BS 7671:2018, 411.3.2.2 (from memory).

    Examples
    --------
    >>> print(in_final_scope(BS7671, True, True, 40.0), in_final_scope(IEC, True, True, 40.0))
    True False
    """
    return bool(final) and float(in_a) <= final_scope_a(rules, sockets)


def circuit_class(rules: RuleSet, final: bool, sockets: bool, in_a: float,
                  kind: str) -> tuple[bool, str, Clause]:
    """A circuit's disconnection class: in Table 41.1's scope, the class in words, the clause.

    Parameters
    ----------
    rules : RuleSet
        The study's rule set.
    final, sockets : bool
        A final circuit; one that supplies socket-outlets.
    in_a : float
        The device's rated current or current setting [A].
    kind : str
        ``"TN"`` or ``"TT"``.

    Returns
    -------
    tuple
        (in scope, e.g. ``"final circuit with socket-outlets, TN"``, the :class:`Clause`).

    Examples
    --------
    >>> scope, words, clause = circuit_class(BS7671, True, True, 40.0, "TN")
    >>> print(scope, words, clause.cite, sep=" | ")
    True | final circuit with socket-outlets up to 63 A, TN | BS 7671:2018 Table 41.1
    """
    limit = final_scope_a(rules, sockets)
    what = "final circuit with socket-outlets" if sockets else "final circuit"
    if in_final_scope(rules, final, sockets, in_a):
        return True, f"{what} up to {limit:g} A, {kind}", rules.final_times
    clause = rules.distribution_tn if kind == "TN" else rules.distribution_tt
    if final:
        return False, f"{what} above {limit:g} A, {kind}", clause
    return False, f"distribution circuit, {kind}", clause


def i2_implied(rules: RuleSet, family: str) -> bool:
    """Whether the rule set holds In <= Iz to meet I2 <= 1.45 Iz for a device family.

    Parameters
    ----------
    rules : RuleSet
        The study's rule set.
    family : str
        The band's family (``"gG"``, ``"mcb"``, ``"breaker-tm"``, ``"breaker-electronic"``,
        ``"datasheet"`` ...).

    References
    ----------
    BS 7671:2018, 433.1.202 (from memory); IEC 60364-4-43:2008, 433.1 (no such provision).

    Examples
    --------
    >>> print(i2_implied(BS7671, "gG"), i2_implied(IEC, "gG"), i2_implied(BS7671, "datasheet"))
    True False False
    """
    return family in rules.i2_implied_families


def tagged(rules: RuleSet, text: str) -> str:
    """A check's reason with the rule set named in front.

    Examples
    --------
    >>> print(tagged(BS7671, "Zs within limit"))
    [BS 7671:2018] Zs within limit
    """
    return f"[{rules.name}] {text}"


def summary(rules: RuleSet) -> str:
    """The rule set in one sentence, with its clauses: for the terminal, the JSON and the report.

    Examples
    --------
    >>> print(summary(IEC)[:59])
    IEC 60364: Table 41.1's times for final circuits up to 32 A
    """
    if rules.sockets_scope_a == rules.fixed_scope_a:
        scope = f"final circuits up to {rules.fixed_scope_a:g} A"
    else:
        scope = (f"final circuits up to {rules.sockets_scope_a:g} A with socket-outlets and up "
                 f"to {rules.fixed_scope_a:g} A for fixed equipment")
    text = (f"{rules.name}: Table 41.1's times for {scope} ({rules.scope.cite}), 5 s (TN) / "
            f"1 s (TT) for the others; overload {rules.overload.says} ({rules.overload.cite})")
    if rules.i2_implied is not None:
        text += f", where {rules.i2_implied.says} ({rules.i2_implied.cite})"
    return (text + f"; back-up protection only as declared from the maker's tests "
            f"({rules.backup.cite}).")


def json_rules(rules: RuleSet) -> dict[str, str]:
    """The rule set for the JSON output: ``key``, ``name`` and ``summary``.

    Examples
    --------
    >>> print(json_rules(BS7671)["key"])
    bs7671
    """
    return {"key": rules.key, "name": rules.name, "summary": summary(rules)}

"""What a check is given about one member: a frozen, typed :class:`Context`.

A check reads data values from the context as :class:`~timbersheets.engineering.data.Datum`s
(never bare floats) and returns them in its result, so the sheet's list of
unverified values is the union of what results carry, plus what building the
context read (:attr:`Context.used`). Nothing is recorded as a side effect:
:func:`inputs` splits the arguments of a `Calc` into the floats it computes with
and the Datums they came from, so a value cannot reach an equation without
reaching the result too.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

from ..data import DataSet
from ..datum import Datum

if TYPE_CHECKING:  # types only: the context is built by the design, which imports the checks
    from ..materials import Strengths
    from ..ownweight import OwnWeight
    from ..member import Member
    from ..sections import Section


@dataclass(frozen=True)
class Reading:
    """A value a check computes with, the data values behind it and any remark it needs on the sheet."""

    value: float
    used: tuple[Datum, ...] = ()
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class Inputs:
    """The arguments of one `Calc` call as floats, with the Datums and notes they came from."""

    values: dict[str, float]
    used: tuple[Datum, ...]
    notes: tuple[str, ...]


def inputs(**given: float | Datum | Reading) -> Inputs:
    """Split `given` (floats, Datums or Readings, in the order the check reads them) for a `Calc`."""
    values: dict[str, float] = {}
    used: list[Datum] = []
    notes: list[str] = []
    for name, item in given.items():
        if isinstance(item, Datum):
            values[name] = item.value
            used.append(item)
        elif isinstance(item, Reading):
            values[name] = item.value
            used += item.used
            notes += item.notes
        else:
            values[name] = float(item)
    return Inputs(values, tuple(used), tuple(notes))


@dataclass(frozen=True)
class Context:
    """Everything a check needs about one member, in compute units (N, mm, MPa).

    `f`, `K_S` and `phi` hold the specified strengths, service factors and
    resistance factors as Datums by symbol. `member` is the schedule's member with
    its own weight in the dead load (`own_weight`, when the row does not refuse it).
    `used` and `notes` are what building the context read and remarked (the density
    of the own weight, K_Zt), carried explicitly beside the checks' own.
    """

    member: Member
    section: Section
    strengths: Strengths
    f: Mapping[str, Datum]
    K_S: Mapping[str, Datum]
    phi: Mapping[str, Datum]
    data: DataSet  # for the lookups a check makes itself (size factors, restraint rules)
    K_Zt: Datum | None = None  # sawn tension size factor (O86-14 6.4.5); None: 1.0
    own_weight: OwnWeight | None = None
    used: tuple[Datum, ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def mark(self) -> str:
        return self.member.mark

    @property
    def glulam(self) -> bool:
        return self.member.material == "glulam"

    @property
    def K_H(self) -> float:
        """The system factor the schedule gives (bending and shear take it as given)."""
        return self.member.K_H

    def K_H_for(self, action: str) -> Reading:
        """K_H for compression or tension: the schedule's value, at most the tabled one (O86 Table 6.4.4)."""
        limit = self.data.system_factor_limit(action)
        if self.member.K_H <= limit.value:
            return Reading(self.member.K_H)
        note = (f"K_H = {self.member.K_H:g} from the schedule applies to bending and shear; {action} takes "
                f"K_H = {limit.value:g}, the most O86 tables for it")
        return Reading(limit.value, (limit,), (note,))

    @property
    def tension_size_factor(self) -> float | Datum:
        """K_Zt as a check reads it: the Datum of sawn tension members, else 1.0 (glulam, O86-14 7.5.11)."""
        return self.K_Zt if self.K_Zt is not None else 1.0

    @property
    def K_T(self) -> float:
        return self.member.K_T

    @property
    def K_e(self) -> float:
        return self.member.Ke

    @property
    def length(self) -> float:
        return self.member.length

    @property
    def L_x(self) -> float:
        return self.member.Lx

    @property
    def L_y(self) -> float:
        return self.member.Ly

    @property
    def A_n(self) -> float:
        """Net area (mm²): the gross area times the row's net_area ratio."""
        return self.section.A * self.member.net_area

"""The member's own weight, added to its dead load unless the row says the dead load includes it.

Density per material, species and service condition from ``data/densities.csv``
(provenance per row). A member that spans horizontally (a bending member, or a
combined member carrying gravity line loads) gets it as a uniform line load
w_sw = γ A_g; any other member gets the whole weight P_sw = w_sw L as axial load
at its base, on the safe side of the weight above the critical section. A
frame model's moments and shears are its own: the tool cannot place the
weight in them, so the sheet asks for it there.

Compute units: kg/mm³, N/kg, N/mm³, mm², N/mm, N.
"""

from __future__ import annotations

from dataclasses import dataclass

from .calc import calc
from .data import DataSet, Datum
from .sections import Section

G_N_PER_KG = 9.81  # standard gravity, common practice (9.80665 rounded as design practice does)
KG_M3_TO_KG_MM3 = 1e-9


@calc(units={"rho": "kg/mm**3", "g": "N/kg", "gamma": "N/mm**3", "A_g": "mm**2", "w_sw": "N/mm"},
      clause="own weight (common practice)")
def own_weight_line(rho, g, A_g):
    gamma = rho * g
    w_sw = gamma * A_g
    return locals()


@calc(units={"w_sw": "N/mm", "L": "mm", "P_sw": "N"}, clause="own weight (common practice)")
def own_weight_total(w_sw, L):
    P_sw = w_sw * L
    return locals()


@calc(units={"w_sw": "N/mm", "L": "mm", "F_sw": "N"}, clause="own weight (common practice)")
def own_weight_on_model(w_sw, L):
    F_sw = w_sw * L
    return locals()


@dataclass(frozen=True)
class OwnWeight:
    """The own weight the tool adds: as a line load (effect 'w') or axial load at the base ('P')."""

    effect: str
    value: float  # N/mm for 'w', N for 'P'
    density: Datum
    line: dict[str, float]
    total: dict[str, float] | None  # the P_sw step, for axial own weight


def spans_horizontally(member) -> bool:
    """True for members whose own weight is a load on their span (bending, or gravity line loads)."""
    if member.type == "bending":
        return True
    return member.type in ("beam-column", "tension-bending") and any(member.values[f"w_{t}"] for t in "DLS")


def own_weight(member, section: Section, data: DataSet) -> OwnWeight | None:
    """The own weight of `member` with `section`, or None when the row gives self_weight = no."""
    if member.values.get("self_weight") == "no":
        return None
    rho = data.density(member.material, member.species, member.service)
    line = own_weight_line(rho=rho.value * KG_M3_TO_KG_MM3, g=G_N_PER_KG, A_g=section.A)
    if spans_horizontally(member):
        return OwnWeight("w", line["w_sw"], rho, line, None)
    total = own_weight_total(w_sw=line["w_sw"], L=member.length)
    return OwnWeight("P", total["P_sw"], rho, line, total)


def with_own_weight(member, weight: OwnWeight | None):
    """A copy of `member` whose dead load includes `weight` (the schedule's member is left as it is)."""
    if weight is None:
        return member
    name = f"{weight.effect}_D"
    return member.with_values({name: member.values[name] + weight.value})


def gives_line_loads(member, weight: OwnWeight | None) -> bool:
    """True when the schedule row itself gives line loads w_* (the own weight alone does not count)."""
    own = weight.value if weight is not None and weight.effect == "w" else 0.0
    return any(abs(member.values[f"w_{t}"] - (own if t == "D" else 0.0)) > 1e-12 for t in "DLSWE")

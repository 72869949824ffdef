"""What each O86 symbol means and how it is typeset (one table for every sheet)."""

from __future__ import annotations

#: symbol → (LaTeX, meaning)
SYMBOLS: dict[str, tuple[str, str]] = {
    "f_b": ("f_{b}", "specified strength in bending"),
    "f_b_pos": ("f_{b}^{+}", "specified strength in bending, positive moment"),
    "f_b_neg": ("f_{b}^{-}", "specified strength in bending, negative moment"),
    "f_v": ("f_{v}", "specified strength in shear"),
    "f_c": ("f_{c}", "specified strength in compression parallel to grain"),
    "f_cb": ("f_{cb}", "specified strength in compression with bending"),
    "f_cp": ("f_{cp}", "specified strength in compression perpendicular to grain"),
    "f_t": ("f_{t}", "specified strength in tension parallel to grain"),
    "f_tn": ("f_{tn}", "specified strength in tension, net section"),
    "f_tg": ("f_{tg}", "specified strength in tension, gross section"),
    "E": ("E", "modulus of elasticity"),
    "rho": (r"\rho", "density of the wood, for the own weight"),
    "E05": ("E_{05}", "modulus of elasticity for stability (fifth percentile)"),
    "K_Sb": ("K_{Sb}", "service condition factor, bending"),
    "K_Sv": ("K_{Sv}", "service condition factor, shear"),
    "K_Sc": ("K_{Sc}", "service condition factor, compression parallel"),
    "K_Scp": ("K_{Scp}", "service condition factor, compression perpendicular"),
    "K_St": ("K_{St}", "service condition factor, tension parallel"),
    "K_SE": ("K_{SE}", "service condition factor, modulus of elasticity"),
    "K_Zt": ("K_{Zt}", "size factor, tension"),
    "K_Zb": ("K_{Zb}", "size factor, bending"),
    "K_Zv": ("K_{Zv}", "size factor, shear"),
    "K_Zcp": ("K_{Zcp}", "size factor, bearing (compression perpendicular to grain)"),
    "K_X": ("K_{X}", "curvature factor (glulam)"),
    "K_Le": ("K_{Le}", "effective length factor for lateral stability (effective length over the unsupported length)"),
    "d/b": ("d/b", "largest depth-to-width ratio at which the lateral stability factor is 1.0 with the restraint provided"),
    "b_lam": ("b_{lam}", "width of the widest single board (glulam size factor)"),
    "C_V": ("C_{V}", "shear-load coefficient, glulam shear method (b)"),
    "Z_max": ("Z_{max}", "largest member volume for glulam shear method (a)"),
    "phi": (r"\phi", "resistance factor"),
    "K_D": ("K_{D}", "load-duration factor"),
    "K_H": ("K_{H}", "system factor"),
    "K_T": ("K_{T}", "treatment factor"),
    "K_e": ("K_{e}", "effective length factor"),
    "K_B": ("K_{B}", "length-of-bearing factor"),
    "C_c,max": ("C_{c,max}", "largest slenderness ratio of a compression member"),
    "C_B,max": ("C_{B,max}", "largest slenderness ratio for lateral stability in bending"),
    "A_n/A_g": ("A_{n}/A_{g}", "least net area a member may be designed on, as a share of the gross area"),
}

#: Units of data symbols that are not strengths (strengths and moduli are MPa).
SYMBOL_UNITS = {"b_lam": "mm", "Z_max": "m**3", "rho": "kg/m**3"}

ACTION_WORDS = {
    "tension": "Tension parallel to grain",
    "compression": "Compression parallel to grain",
    "bending": "Bending moment",
    "shear": "Shear",
    "bearing": "Bearing (compression perpendicular to grain)",
    "interaction": "Combined axial load and bending",
    "deflection-live": "Deflection under live load",
    "deflection-total": "Deflection under total load",
}


def symbol_latex(name: str) -> str:
    """LaTeX for a symbol; unknown names typeset as handcalcs would (K_Zc → K_{Zc})."""
    if name in SYMBOLS:
        return SYMBOLS[name][0]
    head, _, tail = name.partition("_")
    return f"{head}_{{{tail}}}" if tail else head


def symbol_unit(name: str) -> str:
    return SYMBOL_UNITS.get(name, "")


def meaning(name: str) -> str:
    return SYMBOLS.get(name, ("", ""))[1]

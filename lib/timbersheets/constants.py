"""Words and names used in more than one place: the cautions, MIME types, unit labels.

One copy each, so the sheet, its title block, the package and results agree.
"""

from __future__ import annotations

#: The caution every sheet body and the package's cover carry.
CAUTION = ("This calculation must be reviewed and sealed by a licensed professional engineer before it is "
           "used. The codes and editions adopted by the authority having jurisdiction govern.")

#: The longest member note the title block shows whole; a longer one is cut there and given whole in the
#: sheet's member table.
TITLE_NOTE_CHARS = 90

#: The same caution for a page foot (sheet title block, package pages).
SHORT_CAUTION = ("Review and seal by a licensed professional engineer required; the codes adopted by the "
                 "authority having jurisdiction govern.")

#: The MIME type of the results record a template's last cell displays.
RESULT_MIME = "application/vnd.timbersheets.result+json"

#: How a display unit is written in plain text (results.json, Markdown, the terminal).
UNIT_TEXT = {"kN*m": "kN·m", "mm**2": "mm²", "mm**3": "mm³", "mm**4": "mm⁴", "m**3": "m³", "kN/m**3": "kN/m³",
             "kg/m**3": "kg/m³"}

#: How a display unit is written in LaTeX math.
UNIT_LATEX = {
    "kN": r"\mathrm{kN}",
    "kN*m": r"\mathrm{kN{\cdot}m}",
    "kN/m": r"\mathrm{kN/m}",
    "MPa": r"\mathrm{MPa}",
    "mm": r"\mathrm{mm}",
    "m": r"\mathrm{m}",
    "mm**2": r"\mathrm{mm}^{2}",
    "mm**3": r"\mathrm{mm}^{3}",
    "mm**4": r"\mathrm{mm}^{4}",
    "m**3": r"\mathrm{m}^{3}",
    "kN/m**3": r"\mathrm{kN/m}^{3}",
    "kg/m**3": r"\mathrm{kg/m}^{3}",
    "N": r"\mathrm{N}",
    "N*mm": r"\mathrm{N{\cdot}mm}",
    "N/mm": r"\mathrm{N/mm}",
}

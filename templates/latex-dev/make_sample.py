"""Write sample executed notebooks for the "sheet" LaTeX template.

Layout test material only: the member, loads and data below are illustrative
(several strengths are marked "from memory" on purpose). The equation blocks
are real handcalcs 1.11 output (preferred_string_formatter "~L"), pasted as
strings so this script needs only nbformat (and matplotlib for the chart).

    python make_sample.py [OUTDIR]

writes
    sample.ipynb          every section, a long equation, an error output in
                          5.4, and the summary after it (layout test)
    sample-stopped.ipynb  the same sheet as papermill leaves it when 5.4
                          raises: no outputs after the error
"""

from __future__ import annotations

import base64
import io
import sys
from pathlib import Path

import nbformat
from nbformat.v4 import new_code_cell, new_notebook, new_output

TITLEBLOCK = {
    "project": r"Northgate Community Hall \& Library, Roof Framing",
    "number": "24-117",
    "location": "Prince George, BC",
    "client": "City of Prince George",
    "mark": "RB-204",
    "description": r"Glulam roof beam, grid C / 3--4, simple span",
    "revision": "C",
    "date": "2026-11-30",
    "designed": "A. Moreau, EIT",
    "checked": "changed since check",
    "engineer": r"R. Lindqvist, P.Eng.",
    "tool_version": "0.1.0",
    "inputs_hash": "3f9c2a71be04d5e8a6c1f0b2d9e47a3c5b8f1e6d2a9c0b7e4f3a1d5c8b2e9f07",
    "data_hash": "a41d07c9e2b5f8136d0e4a7c9b2f5e8d1a3c6f9b2e5d8a1c4f7b0e3d6a9c2f51",
    "caution": (
        "Prepared for review: this calculation must be reviewed and sealed by a "
        "licensed professional engineer. The code editions adopted by the "
        "authority having jurisdiction govern."
    ),
}


def latex(text: str):
    return new_output("display_data", data={"text/latex": text.strip("\n"), "text/plain": "<IPython.core.display.Latex object>"})


SEC_MEMBER = r"""
\section{Member}
\begin{tabularx}{\linewidth}{@{}p{46mm}L@{}}
Type & Beam, simply supported, bending about the strong axis \\
Material & Glued-laminated timber, Douglas fir--larch \\
Grade & 24f-EX \\
Size & $b \times d = 130 \times 532$\,mm (14 laminations of 38\,mm) \\
Service condition & Dry, untreated, normal temperature \\
Span & $L = 7.20$\,m, centre to centre of bearings \\
Lateral support & Compression edge held by purlins at 600\,mm; $K_L = 1.00$ \\
Note & Purlins bear on top; no notches or holes within $d$ of the supports. \\
\end{tabularx}
"""

SEC_LOADS = r"""
\section{Specified loads}
Uniform loads on a tributary width of 4.00\,m (NBC 2020, Part 4).
\par\medskip
\begin{tabularx}{\linewidth}{@{}llrrrL@{}}
\toprule
Type & & Area load & Trib. width & Line load & Source \\
 & & kPa & m & kN/m & \\
\midrule
Dead & $D$ & 1.20 & 4.00 & 4.80 & Roof build-up, schedule \\
 & & & & 0.34 & Self-weight, 4.9\,kN/m$^3$ \\
 & & & & \textbf{5.14} & \\
Snow & $S$ & 2.10 & 4.00 & 8.40 & NBC 4.1.6.2, $S_s = 2.6$, $S_r = 0.2$ \\
Wind & $W$ & 0.45 & 4.00 & 1.80 & NBC 4.1.7, downward on roof \\
Live & $L$ & 0.00 & 4.00 & 0.00 & Snow governs over roof live load \\
\bottomrule
\end{tabularx}
"""

SEC_COMBOS = r"""
\section{Load combinations}
NBC 2020 Table 4.1.3.2.-A, ultimate limit states. $w_f$ is the factored line load,
$M_f = w_f L^2/8$ at midspan, $V_f = w_f L/2$ at the support. $K_D$ per CSA O86 cl.~5.3.2.
\par\medskip
\begin{tabularx}{\linewidth}{@{}lLrrrrl@{}}
\toprule
No. & Combination & $w_f$ & $M_f$ & $V_f$ & $K_D$ & Duration \\
 & & kN/m & kN$\cdot$m & kN & & \\
\midrule
1 & $1.4D$ & 7.20 & 46.6 & 25.9 & 0.65 & permanent \\
2 & $1.25D + 1.5L + 1.0S$ & 14.83 & 96.1 & 53.4 & 1.00 & standard \\
3 & $1.25D + 1.5S + 0.4W$ & \textbf{19.75} & \textbf{127.9} & \textbf{71.1} & 1.00 & standard \\
4 & $1.25D + 1.4W + 0.5S$ & 13.15 & 85.2 & 47.3 & 1.15 & short \\
5 & $1.0D + 1.0E + 0.25S$ & 7.24 & 46.9 & 26.1 & 1.15 & short \\
\bottomrule
\end{tabularx}
\par\smallskip
{\footnotesize Combination 3 governs bending and shear (largest $M_f/K_D$ and $V_f/K_D$).
$E$ causes no vertical effect on this member.}
"""

SEC_FACTORS = r"""
\section{Material and modification factors}
\begin{tabularx}{\linewidth}{@{}lrlLll@{}}
\toprule
Symbol & Value & Unit & Meaning & Clause / table & Data status \\
\midrule
$f_b$ & 30.6 & MPa & Specified bending strength & O86 Table 7.3 & from memory \\
$f_v$ & 2.0 & MPa & Specified longitudinal shear strength & O86 Table 7.3 & from memory \\
$E$ & 12\,400 & MPa & Modulus of elasticity & O86 Table 7.3 & from memory \\
$\phi$ & 0.90 & & Resistance factor, bending and shear & O86 7.5.6.5, 7.5.7 & from memory \\
$K_D$ & 1.00 & & Load duration, combination 3 & O86 5.3.2 & computed \\
$K_H$ & 1.00 & & System factor, single member & O86 7.4.3 & computed \\
$K_{Sb}$, $K_{Sv}$ & 1.00 & & Service condition, dry & O86 7.4.1 & computed \\
$K_T$ & 1.00 & & Treatment, untreated & O86 7.4.2 & computed \\
$K_X$ & 1.00 & & Curvature, straight member & O86 7.5.6.5.2 & computed \\
$K_L$ & 1.00 & & Lateral stability, braced edge & O86 7.5.6.4 & computed \\
\bottomrule
\end{tabularx}
"""

CHECK_BENDING = r"""
\section{Checks}
\subsection{Bending moment resistance (O86 cl.~7.5.6.5)}
Factored moment from combination 3, $M_f = 127.9$\,kN$\cdot$m.
$$
\begin{aligned}
S &= \left( b \cdot \frac{ \left( d \right) ^{ 2 } }{ 6 } \right)  = \left( 130.000\ \mathrm{mm} \cdot \frac{ \left( 532.000\ \mathrm{mm} \right) ^{ 2 } }{ 6 } \right) &= 6132186.667\ \mathrm{mm}^{3}
\\
F_{b} &= f_{b} \cdot \left( K_{D} \cdot K_{H} \cdot K_{Sb} \cdot K_{T} \right)  = 30.600\ \mathrm{MPa} \cdot \left( 1.000 \cdot 1.000 \cdot 1.000 \cdot 1.000 \right) &= 30.600\ \mathrm{MPa}
\\
K_{Zbg} &= \operatorname{min} \left( \left( 130 \cdot \frac{ \mathrm{mm} }{ b } \right) ^{ 0.1 } \cdot \left( 610 \cdot \frac{ \mathrm{mm} }{ d } \right) ^{ 0.1 } \cdot \left( 9100 \cdot \frac{ \mathrm{mm} }{ L } \right) ^{ 0.1 } ,\  1.0 \right) \\&= \operatorname{min} \left( \left( 130 \cdot \frac{ \mathrm{mm} }{ 130.000\ \mathrm{mm} } \right) ^{ 0.1 } \cdot \left( 610 \cdot \frac{ \mathrm{mm} }{ 532.000\ \mathrm{mm} } \right) ^{ 0.1 } \cdot \left( 9100 \cdot \frac{ \mathrm{mm} }{ 7.200\ \mathrm{m} } \right) ^{ 0.1 } ,\  1.0 \right) \\&= 1.000  \\
\\
M_{r} &= \left( \phi \cdot F_{b} \cdot S \cdot K_{X} \cdot K_{Zbg} \right)  = \left( 0.900 \cdot 30.600\ \mathrm{MPa} \cdot 6132186.667\ \mathrm{mm}^{3} \cdot 1.000 \cdot 1.000 \right) &= 168.880\ \mathrm{kN} \cdot \mathrm{m}
\end{aligned}
$$
$$
\begin{aligned}
\eta_{M} &= \frac{ M_{f} }{ M_{r} }  = \frac{ 127.900\ \mathrm{kN} \cdot \mathrm{m} }{ 168.880\ \mathrm{kN} \cdot \mathrm{m} } &= 0.757
\end{aligned}
$$
"""

# Deliberately far wider than the line: the template must shrink it to fit.
CHECK_BENDING_LONG = r"""
Lateral stability, written out in one line for the record:
$$
\begin{aligned}
M_{r} &= \phi \cdot f_{b} \cdot \left( K_{D} \cdot K_{H} \cdot K_{Sb} \cdot K_{T} \right) \cdot \left( b \cdot \frac{ \left( d \right) ^{ 2 } }{ 6 } \right) \cdot K_{X} \cdot K_{L}  = 0.900 \cdot 30.600\ \mathrm{MPa} \cdot \left( 1.000 \cdot 1.000 \cdot 1.000 \cdot 1.000 \right) \cdot \left( 130.000\ \mathrm{mm} \cdot \frac{ \left( 532.000\ \mathrm{mm} \right) ^{ 2 } }{ 6 } \right) \cdot 1.000 \cdot 1.000 &= 168.880\ \mathrm{kN} \cdot \mathrm{m}
\end{aligned}
$$
"""

CHECK_SHEAR = r"""
\subsection{Shear resistance (O86 cl.~7.5.7.2)}
Member volume $0.13 \times 0.532 \times 7.2 = 0.50\,\mathrm{m}^3 < 2.0\,\mathrm{m}^3$.
Factored shear at the support from combination 3, $V_f = 71.1$\,kN.
$$
\begin{aligned}
A_{g} &= \left( b \cdot d \right)  = \left( 130.000\ \mathrm{mm} \cdot 532.000\ \mathrm{mm} \right) &= 69160.000\ \mathrm{mm}^{2}
\\
F_{v} &= f_{v} \cdot \left( K_{D} \cdot K_{H} \cdot K_{Sv} \cdot K_{T} \right)  = 2.000\ \mathrm{MPa} \cdot \left( 1.000 \cdot 1.000 \cdot 1.000 \cdot 1.000 \right) &= 2.000\ \mathrm{MPa}
\\
V_{r} &= \left( \phi \cdot F_{v} \cdot 2 \cdot \frac{ A_{g} }{ 3 } \right)  = \left( 0.900 \cdot 2.000\ \mathrm{MPa} \cdot 2 \cdot \frac{ 69160.000\ \mathrm{mm}^{2} }{ 3 } \right) &= 82.992\ \mathrm{kN}
\\
\eta_{V} &= \frac{ V_{f} }{ V_{r} }  = \frac{ 71.100\ \mathrm{kN} }{ 82.992\ \mathrm{kN} } &= 0.857
\end{aligned}
$$
"""

CHECK_DEFLECTION = r"""
\subsection{Deflection under specified snow load (serviceability)}
Limit $L/360$ for a roof member supporting a plaster-free ceiling.
$$
\begin{aligned}
I &= \left( b \cdot \frac{ \left( d \right) ^{ 3 } }{ 12 } \right)  = \left( 130.00\ \mathrm{mm} \cdot \frac{ \left( 532.00\ \mathrm{mm} \right) ^{ 3 } }{ 12 } \right) &= 1631161653.33\ \mathrm{mm}^{4}
\\
\Delta_{S} &= \left( 5 \cdot w_{S} \cdot \frac{ \left( L \right) ^{ 4 } }{ 384 \cdot E \cdot I } \right)  = \left( 5 \cdot 8.40\ \frac{\mathrm{kN}}{\mathrm{m}} \cdot \frac{ \left( 7.20\ \mathrm{m} \right) ^{ 4 } }{ 384 \cdot 12400.00\ \mathrm{MPa} \cdot 1631161653.33\ \mathrm{mm}^{4} } \right) &= 14.53\ \mathrm{mm}
\\
\Delta_{lim} &= \left( \frac{ L }{ 360 } \right)  = \left( \frac{ 7.20\ \mathrm{m} }{ 360 } \right) &= 20.00\ \mathrm{mm}
\\
\eta_{\Delta} &= \frac{ \Delta_{S} }{ \Delta_{lim} }  = \frac{ 14.53\ \mathrm{mm} }{ 20.00\ \mathrm{mm} } &= 0.727
\end{aligned}
$$
"""

CHECK_BEARING_HEAD = r"""
\subsection{Bearing at the supports (O86 cl.~7.5.9)}
"""

ESC = "\x1b"
BEARING_ERROR = new_output(
    "error",
    ename="ScheduleError",
    evalue="schedule.csv row 14, column 'bearing_mm': empty; give the bearing length in mm, e.g. 140",
    traceback=[
        f"{ESC}[0;31m---------------------------------------------------------------------------{ESC}[0m",
        f"{ESC}[0;31mScheduleError{ESC}[0m                             Traceback (most recent call last)",
        f"Cell {ESC}[0;32mIn[11], line 3{ESC}[0m\n"
        f"{ESC}[1;32m      1{ESC}[0m {ESC}[38;5;66;03m# 5.4 Bearing at the supports{ESC}[39;00m\n"
        f"{ESC}[1;32m      2{ESC}[0m l_b {ESC}[38;5;241m=\x1b[39m member{ESC}[38;5;241m.{ESC}[39mbearing_length\n"
        f"{ESC}[0;32m----> 3{ESC}[0m bearing {ESC}[38;5;241m={ESC}[39m checks{ESC}[38;5;241m.{ESC}[39mbearing{ESC}[38;5;241m.{ESC}[39mcheck(member, combos{ESC}[38;5;241m.{ESC}[39mgoverning, l_b{ESC}[38;5;241m=\x1b[39ml_b)\n",
        f"File {ESC}[0;32m/srv/jobs/24-117/.venv/lib/python3.11/site-packages/timbersheets/checks/bearing.py:48{ESC}[0m, in {ESC}[0;36mcheck{ESC}[0;34m(member, combination, l_b){ESC}[0m\n"
        f"{ESC}[1;32m     46{ESC}[0m \x1b[38;5;250m    \x1b[39m\x1b[38;5;124;03m\"\"\"Bearing resistance Q_r, CSA O86 cl. 7.5.9 (kN); l_b in mm.\"\"\"{ESC}[39;00m\n"
        f"{ESC}[1;32m     47{ESC}[0m     {ESC}[38;5;28;01mif{ESC}[39;00m l_b {ESC}[38;5;129;01mis{ESC}[39;00m {ESC}[38;5;28;01mNone{ESC}[39;00m:\n"
        f"{ESC}[0;32m---> 48{ESC}[0m         {ESC}[38;5;28;01mraise{ESC}[39;00m ScheduleError(row{ESC}[38;5;241m={ESC}[39mmember{ESC}[38;5;241m.{ESC}[39mrow, column{ESC}[38;5;241m={ESC}[39m{ESC}[38;5;124m'bearing_mm'{ESC}[39m, value{ESC}[38;5;241m={ESC}[39m{ESC}[38;5;124m''{ESC}[39m, allowed{ESC}[38;5;241m={ESC}[39m{ESC}[38;5;124m'length > 0 mm'{ESC}[39m)\n",
        f"{ESC}[0;31mScheduleError{ESC}[0m: schedule.csv row 14, column 'bearing_mm': empty; give the bearing length in mm, e.g. 140",
    ],
)

SUMMARY_TABLE = r"""
\section{Summary}
\begin{tabularx}{\linewidth}{@{}Llrrrr@{}}
\toprule
Check & Clause & Comb. & Demand & Resistance & Utilization \\
\midrule
Bending moment, $M_f \le M_r$ & O86 7.5.6.5 & 3 & \tsvalue{127.9}{kN\cdot m} & \tsvalue{168.9}{kN\cdot m} & 0.757 \\
Shear, $V_f \le V_r$ & O86 7.5.7.2 & 3 & \tsvalue{71.1}{kN} & \tsvalue{83.0}{kN} & \textbf{0.857} \\
Deflection, $\Delta_S \le L/360$ & serviceability & $S$ & \tsvalue{14.5}{mm} & \tsvalue{20.0}{mm} & 0.727 \\
Bearing, $Q_f \le Q_r$ & O86 7.5.9 & --- & --- & --- & not run \\
\bottomrule
\end{tabularx}
"""

VERDICT = r"""
\begin{verdictbox}
\begin{tabularx}{\linewidth}{@{}lL@{}}
\multicolumn{2}{@{}l}{\Large PASSES} \\[3pt]
Governing check & Shear at the support, O86 cl.~7.5.7.2 \\
Combination & 3: $1.25D + 1.5S + 0.4W$, $K_D = 1.00$ \\
Utilization & $V_f / V_r = 71.1 / 83.0 = 0.857$ \\
\end{tabularx}
\end{verdictbox}
"""

CAUTIONS = r"""
\begin{cautionbox}
\begin{itemize}\setlength{\itemsep}{0pt}
\item Specified strengths $f_b$, $f_v$ and $E$ are marked \emph{from memory} in the data file
  \texttt{o86\_glulam\_2019.csv}; verify them against CSA O86:19 Table 7.3 before sealing.
\item The bearing check did not run (no bearing length in the schedule); this sheet is not complete.
\item Snow load from the NBC 2020 climatic data for Prince George; confirm with the authority having jurisdiction.
\end{itemize}
\end{cautionbox}
"""


def utilization_chart() -> bytes:
    """A plain grey bar chart of utilizations, as a template might display it."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    checks = ["Bending", "Shear", "Deflection"]
    values = [0.757, 0.857, 0.727]
    fig, ax = plt.subplots(figsize=(6.0, 1.8), dpi=150)
    ax.barh(checks, values, color="0.55", edgecolor="black", linewidth=0.6)
    ax.axvline(1.0, color="black", linewidth=1.0)
    ax.set_xlim(0, 1.1)
    ax.set_xlabel("Utilization")
    for y, v in enumerate(values):
        ax.text(v + 0.01, y, f"{v:.3f}", va="center", fontsize=8)
    ax.invert_yaxis()
    fig.tight_layout()
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    plt.close(fig)
    return buf.getvalue()


def build(stopped: bool) -> nbformat.NotebookNode:
    cells = []

    params = new_code_cell('member = "RB-204"\nbearing_mm = None', metadata={"tags": ["parameters"]})
    cells.append(params)
    injected = new_code_cell(
        '# Parameters\nmember = "RB-204"\nbearing_mm = None\n',
        metadata={"tags": ["injected-parameters"]},
    )
    cells.append(injected)

    def cell(*outputs, source="sheet.show(...)"):
        c = new_code_cell(source)
        c.outputs = list(outputs)
        cells.append(c)
        return c

    # Imports print a banner on stdout and return a plain repr: both must be dropped.
    cell(
        new_output("stream", name="stdout", text="timbersheets 0.1.0, data o86_glulam_2019.csv\n"),
        new_output("execute_result", data={"text/plain": "<timbersheets.Member RB-204>"}, execution_count=3),
        source="import timbersheets as ts\nmember = ts.load_member(member)",
    )
    cell(latex(SEC_MEMBER))
    cell(latex(SEC_LOADS))
    cell(latex(SEC_COMBOS))
    cell(latex(SEC_FACTORS))
    cell(latex(CHECK_BENDING), latex(CHECK_BENDING_LONG))
    cell(latex(CHECK_SHEAR))
    cell(latex(CHECK_DEFLECTION))
    cell(latex(CHECK_BEARING_HEAD), BEARING_ERROR)

    png = base64.b64encode(utilization_chart()).decode("ascii")
    summary = [
        latex(SUMMARY_TABLE),
        new_output("display_data", data={"image/png": png, "text/plain": "<Figure size 900x270 with 1 Axes>"}),
        latex(VERDICT),
    ]
    cell(*([] if stopped else summary))
    cell(*([] if stopped else [latex(CAUTIONS)]))

    nb = new_notebook(cells=cells)
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3 (ipykernel)", "language": "python"}
    nb.metadata["language_info"] = {"name": "python", "version": "3.11.7", "mimetype": "text/x-python",
                                    "file_extension": ".py", "pygments_lexer": "ipython3"}
    nb.metadata["timbersheets"] = {"titleblock": dict(TITLEBLOCK)}
    if stopped:
        nb.metadata["timbersheets"]["titleblock"]["checked"] = "not checked"
    nbformat.validate(nb)
    return nb


def main(argv: list[str]) -> None:
    outdir = Path(argv[1]) if len(argv) > 1 else Path(__file__).parent
    outdir.mkdir(parents=True, exist_ok=True)
    nbformat.write(build(stopped=False), outdir / "sample.ipynb")
    nbformat.write(build(stopped=True), outdir / "sample-stopped.ipynb")
    print(f"wrote {outdir / 'sample.ipynb'} and {outdir / 'sample-stopped.ipynb'}")


if __name__ == "__main__":
    main(sys.argv)

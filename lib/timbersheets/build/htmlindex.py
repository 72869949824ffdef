"""index.html of an HTML run: the package's cover and index of members, linking each HTML sheet.

The rows and sentences are the package's own (:func:`timbersheets.build.package.member_rows`,
:func:`~timbersheets.build.package.cover_lines`), so the HTML index and the PDF index agree.
"""

from __future__ import annotations

import html
from pathlib import Path
from typing import Any

from .. import __version__
from ..job.project import Project
from ..job.review import count_text, standing
from ..sheet.htmlsheet import STYLE, text
from ..sheet.sections import CAUTION
from .package import SHORT_CAUTION, cover_lines, member_rows


def index_html(project: Project, doc: dict[str, Any], outdir: Path) -> str:
    """The index page; `outdir` is the revision folder holding sheets/<mark>.html."""
    members = doc["members"]
    rows, notes = member_rows(members, outdir)
    counts = {"total": len(members), "pass": 0, "fail": 0, "error": 0}
    for m in members:
        counts[m["status"]] += 1
    states = [m.get("review") or {"status": "not-checked"} for m in members]
    all_ok = all(standing(state) == "ok" for state in states)
    lines = cover_lines(project, counts, count_text(states))
    stale = (doc.get("carried_over") or {}).get("out_of_date") or []
    stale_text = (f"<p>Removed from this revision as out of date: {html.escape(', '.join(stale))}.</p>"
                  if stale else "")
    f = {k: html.escape(v) for k, v in project.fields.items()}
    body = []
    for r in rows:
        sheet = outdir / "sheets" / f"{r['plain']}.html"
        mark = text(r["mark"])
        link = f'<a href="sheets/{html.escape(r["plain"])}.html">{mark}</a>' if sheet.exists() else mark
        flag = f'<br><em>{text(r["flag"])}</em>' if r["flag"] else ""
        body.append(f"<tr><td>{link}{flag}</td><td>{text(r['description'])}</td><td>{text(r['size'])}</td>"
                    f"<td>{text(r['governing'])}</td><td class=\"r\">{text(r['utilization'])}</td>"
                    f"<td>{text(r['verdict'])}</td><td>{text(r['checked'])}</td></tr>")
    not_designed = ("<h2>Members not designed</h2><ul>" + "".join(f"<li>{text(n)}</li>" for n in notes) + "</ul>"
                    if notes else "")
    unverified = len({w for m in members for w in m["data_warnings"]})
    unverified_text = (f" This run uses {unverified} data values that are not yet verified against the standard; "
                       "each sheet lists the ones it uses." if unverified else "")
    chart = '<img alt="governing utilization of every member" src="summary.png">' if (
        outdir / "summary.png").exists() else ""
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>{f['title']} rev {f['revision']}: index of members</title>
<style>{STYLE}</style></head><body>
<p>STRUCTURAL CALCULATIONS &mdash; TIMBER MEMBERS</p>
<h1>{f['title']}</h1>
<table class="facts"><tbody>
<tr><td>Client</td><td>{f['client']}</td></tr><tr><td>Location</td><td>{f['location']}</td></tr>
<tr><td>Job number</td><td>{f['number']}</td></tr><tr><td>Revision</td><td>{f['revision']}</td></tr>
<tr><td>Date</td><td>{f['date']}</td></tr><tr><td>Engineer of record</td><td>{f['engineer']}</td></tr>
<tr><td>Designed by</td><td>{f['designer']}</td></tr><tr><td>Checker</td><td>{text(lines['checker'])}</td></tr>
<tr><td>Codes</td><td>CSA O86:{html.escape(project.codes['o86'][-2:])}, NBC {html.escape(project.codes['nbc'])} Part 4</td></tr>
<tr><td>Members</td><td>{text(lines['members'])}</td></tr>
</tbody></table>
<div class="caution"><p class="title">Cautions</p><p>{html.escape(CAUTION)}{unverified_text}</p></div>
<h2>Index of members</h2>
<p>{text(lines['unchecked']) if not all_ok else ''}</p>
{stale_text}
<table><thead><tr><th>Mark</th><th>Description</th><th>Size</th><th>Governing</th><th class="r">Util.</th>
<th>Verdict</th><th>Checked</th></tr></thead><tbody>
{chr(10).join(body)}
</tbody></table>
{not_designed}
{chart}
<div class="foot"><p>{html.escape(SHORT_CAUTION)}</p><p>timbersheets {__version__}</p></div>
</body></html>
"""

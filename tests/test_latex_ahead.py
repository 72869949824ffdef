"""The LaTeX exporter made ahead, in a thread, while a batch's notebooks execute (notebooks.latex_ahead).

Each check runs in a fresh interpreter: the exporter is made once per process.
"""

import subprocess
import sys


def in_fresh_process(code: str) -> str:
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    return done.stdout.strip()


def test_the_exporter_made_ahead_is_the_one_to_latex_uses():
    out = in_fresh_process(
        "from timbersheets.build import notebooks as n\n"
        "t = n.latex_ahead(); t.join()\n"
        "made = n._latex_exporter.cache_info()\n"
        "again = n.latex_ahead()\n"
        "n._latex_exporter(str(n.templates_dir() / 'latex'))\n"
        "print(made.currsize, again is None, n._latex_exporter.cache_info().hits)")
    assert out == "1 True 1"  # made once, not started twice, then found by to_latex's own call


def test_a_failing_head_start_is_not_the_batch_s_failure():
    # an exporter that cannot be made (a broken template folder): the thread ends quietly and
    # to_latex, later, raises the error itself, for the member
    out = in_fresh_process(
        "import os; os.environ['TIMBERSHEETS_TEMPLATES'] = '/nonexistent/templates'\n"
        "from timbersheets.build import notebooks as n\n"
        "t = n.latex_ahead(); t.join()\n"
        "print(n._latex_exporter.cache_info().currsize)")
    assert out == "0"

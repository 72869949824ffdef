"""Executing a member's notebook (papermill) and converting it to LaTeX or HTML (nbconvert).

Both steps are plain functions of files, so the runner can call them in worker
processes. A failed execution still leaves the executed notebook, with the
error marked in place by papermill, before the failure is reported.
"""

from __future__ import annotations

import importlib.resources
import os
from functools import lru_cache
from pathlib import Path
from typing import Any

from ..constants import SHORT_CAUTION
from ..errors import ParameterError, TimbersheetsError
from ..fileio import write_atomic
from ..sheet.tex import escape


def templates_dir() -> Path:
    """The folder of notebook and LaTeX templates.

    $TIMBERSHEETS_TEMPLATES if set; in a source checkout, its top-level templates/
    (the folder being edited, even when another checkout is installed editable);
    otherwise the copy installed inside the package (timbersheets.templates).
    """
    env = os.environ.get("TIMBERSHEETS_TEMPLATES")
    if env:
        return Path(env)
    checkout = Path(__file__).resolve().parents[3]
    if (checkout / "pyproject.toml").is_file() and (checkout / "templates" / "latex").is_dir():
        return checkout / "templates"
    installed = Path(str(importlib.resources.files("timbersheets") / "templates"))
    if not (installed / "latex").is_dir():
        raise TimbersheetsError(f"the templates are missing from {installed}; reinstall timbersheets")
    return installed


@lru_cache(maxsize=16)
def template_parameters(template: Path) -> frozenset[str]:
    import papermill

    return frozenset(papermill.inspect_notebook(str(template)))


def check_parameters(template: Path, parameters: dict[str, Any]) -> None:
    """Refuse parameters the template does not declare, and declared ones not given."""
    declared = template_parameters(template)
    unknown, missing = sorted(set(parameters) - declared), sorted(declared - set(parameters))
    if unknown or missing:
        raise ParameterError(unknown, missing, where=f"template {template.name}")


# No input history: IPython otherwise writes every cell to its SQLite file in a thread, a quarter
# of a kernel's time on a sheet (measured: 8.7 s to 6.5 s of kernel CPU for 30 members). A sheet
# never reads its history.
KERNEL_ARGS = ["--IPKernelApp.log_level=ERROR", "--HistoryManager.enabled=False"]

# Between members: what `%reset -f` does (IPython's `reset`: namespaces, output cache, history),
# without its two full garbage collections, 0.2 s a member: a third of a sheet's execution.
# The modules stay imported; a member's cells define everything they use.
CLEAR_NAMESPACE = """\
def _clear_namespace():
    import gc
    collect, gc.collect = gc.collect, lambda *args, **kwargs: 0
    try:
        get_ipython().reset(new_session=False)
    finally:
        gc.collect = collect
_clear_namespace()
"""
# What every sheet imports, run once when a kernel starts, before any member needs it. No sheet
# imports matplotlib (its diagrams are drawn with Pillow); PyCBA, which does, is read from the beam
# store instead.
WARM_UP = ("import timbersheets.sheet.sections, timbersheets.engineering.units, handcalcs.handcalcs\n"
           "timbersheets.engineering.units.registry()\n")
ENGINE = "timbersheets"


def _kernel_manager_class():
    """KernelManager whose kernel is started through `timbersheets.kernel`, so it dies with this process."""
    from jupyter_client import KernelManager

    class DyingKernelManager(KernelManager):
        def format_kernel_cmd(self, extra_arguments=None):
            cmd = super().format_kernel_cmd(extra_arguments)
            if "ipykernel_launcher" in cmd:
                cmd[cmd.index("ipykernel_launcher")] = "timbersheets.kernel"
            return cmd

    return DyingKernelManager


def start_kernel(cwd: Path | None = None) -> None:
    """Start this process's kernel in the background (see `_Kernel.start`); `execute` then uses it."""
    _Kernel.start("python3", str(cwd or os.getcwd()))


def _own_environment() -> tuple:
    """This program's variables in the environment (TIMBERSHEETS_*), which a kernel takes at launch."""
    return tuple(sorted((k, v) for k, v in os.environ.items() if k.startswith("TIMBERSHEETS_")))


class _Kernel:
    """The one kernel of a worker process, started on first use and reused.

    Starting a kernel (and waiting for a client to be ready) costs about a
    second, several times more than running a sheet, so a worker keeps its
    kernel and one started client, and clears the namespace between members.
    """

    km = None
    kc = None
    cwd: str | None = None
    env: tuple = ()  # the TIMBERSHEETS_* variables it was launched with (see _own_environment)
    warming: str | None = None  # msg_id of the warm-up imports, until the kernel is first used
    manager = None  # the KernelManager class (see _kernel_manager_class)
    starting = None  # the thread starting the kernel, until `get` joins it
    failed: BaseException | None = None  # what stopped that thread, raised by `get`

    @classmethod
    def start(cls, kernel_name: str, cwd: str) -> None:
        """Start the kernel in a thread and queue the sheets' imports in it, without waiting.

        Finding the kernel and launching it take about half a second of this process, and the
        kernel then boots and imports (about 2 s) in its own: all of it while this process goes
        on designing the members. The first `get` waits for what is left."""
        import threading

        # Imported here, not in the thread: jupyter_client imported in two threads at once (the
        # thread, and this one reaching papermill) fails half-initialised with an ImportError.
        if cls.manager is None:
            cls.manager = _kernel_manager_class()

        cls._join()
        if cls.km is not None and not cls._fits(cwd):
            cls.shutdown()
        if cls.km is not None:
            return
        cls.cwd, cls.env = cwd, _own_environment()
        cls.starting = threading.Thread(target=cls._launch, args=(kernel_name, cwd), daemon=True)
        cls.starting.start()

    @classmethod
    def _fits(cls, cwd: str) -> bool:
        """Whether the running kernel can serve a member run from `cwd` in this environment: a kernel
        keeps the folder and the variables it was launched with (a later run's beam store)."""
        return cls.cwd == cwd and cls.env == _own_environment() and cls.km.is_alive()

    @classmethod
    def _launch(cls, kernel_name: str, cwd: str) -> None:
        try:
            km = cls.manager(kernel_name=kernel_name)
            km.start_kernel(cwd=cwd, extra_arguments=KERNEL_ARGS)
            cls.km = km
            cls.kc = km.client()
            cls.kc.start_channels()
            cls.warming = cls.kc.execute(WARM_UP, silent=True, store_history=False)
            import atexit

            atexit.register(cls.shutdown, wait=False)
        except BaseException as exc:  # noqa: BLE001 - reported by the first `get`
            cls.failed = exc

    @classmethod
    def _join(cls) -> None:
        if cls.starting is not None:
            cls.starting.join()
            cls.starting = None
        if cls.failed is not None:
            failed, cls.failed = cls.failed, None
            cls.shutdown()
            raise failed

    @classmethod
    def get(cls, kernel_name: str, cwd: str):
        """The started kernel and its client, ready to run a member with nothing left from before."""
        cls._join()
        if cls.km is not None and not cls._fits(cwd):
            cls.shutdown()
        if cls.km is None:
            cls.start(kernel_name, cwd)
            cls._join()
        if cls.warming is not None:
            # the warm-up's reply says the kernel is up and has imported; then the usual check that
            # its output channel is connected (wait_for_ready would swallow the reply if called first)
            while cls.kc.get_shell_msg(timeout=60)["parent_header"].get("msg_id") != cls.warming:
                pass
            cls.warming = None
            cls.kc.wait_for_ready(timeout=60)
        reply = cls.kc.execute_interactive(CLEAR_NAMESPACE, timeout=60, store_history=False,
                                           output_hook=lambda msg: None)
        if reply["content"].get("status") != "ok":
            cls.shutdown()
            return cls.get(kernel_name, cwd)
        return cls.km, cls.kc

    @classmethod
    def shutdown(cls, wait: bool = True) -> None:
        """Stop the kernel. At exit (`wait` False) it is killed without waiting for it to go."""
        if cls.starting is not None:
            cls.starting.join()
            cls.starting, cls.failed = None, None
        cls.warming = None
        if cls.kc is not None:
            cls.kc.stop_channels()
            cls.kc = None
        if cls.km is not None:
            try:
                process = getattr(cls.km.provisioner, "process", None)
                if not wait and process is not None:
                    process.kill()
                    cls.km.cleanup_resources()
                else:
                    cls.km.shutdown_kernel(now=True)
            except Exception:  # noqa: BLE001 - the kernel may already be gone
                pass
            cls.km = None


def _register_engine() -> None:
    """A papermill engine that runs notebooks in the worker's reused kernel."""
    from papermill.clientwrap import PapermillNotebookClient
    from papermill.engines import NBClientEngine, papermill_engines

    class ReusedKernelEngine(NBClientEngine):
        @classmethod
        def execute_managed_notebook(cls, nb_man, kernel_name, log_output=False, stdout_file=None,
                                     stderr_file=None, start_timeout=60, execution_timeout=None, **kwargs):
            import logging

            km, kc = _Kernel.get(kernel_name, os.getcwd())
            client = PapermillNotebookClient(nb_man, km=km, timeout=execution_timeout, startup_timeout=start_timeout,
                                             kernel_name=kernel_name, log=logging.getLogger("papermill"),
                                             log_output=log_output, stdout_file=stdout_file, stderr_file=stderr_file)
            client.kc = kc
            return client.execute()

    papermill_engines.register(ENGINE, ReusedKernelEngine)


def execute(template: Path, out: Path, parameters: dict[str, Any], cwd: Path, reuse_kernel: bool = True) -> str | None:
    """Run `template` with `parameters` into `out` with papermill. Returns None, or the error text.

    The output notebook is always written (to a temporary name, then renamed),
    with a failing cell's error kept in it, before the failure is reported.
    """
    import papermill
    from papermill.exceptions import PapermillExecutionError

    check_parameters(template, parameters)
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = out.with_name(f".{out.stem}.part.ipynb")
    error = None
    engine = None
    if reuse_kernel:
        _register_engine()
        engine = ENGINE
    try:
        papermill.execute_notebook(str(template), str(tmp), parameters=parameters, progress_bar=False,
                                   log_output=False, kernel_name="python3", cwd=str(cwd), engine_name=engine,
                                   request_save_on_cell_execute=False,
                                   extra_arguments=KERNEL_ARGS)
    except PapermillExecutionError as exc:
        error = f"{exc.ename}: {exc.evalue}"
    if tmp.exists():
        os.replace(tmp, out)
    return error


@lru_cache(maxsize=2)
def _latex_exporter(layouts: str):
    """One LaTeX exporter per process: a new one compiles its Jinja templates again (about 0.1 s a
    sheet, a third of a batch's Python time); nbconvert's exporters are made to be reused."""
    from nbconvert import LatexExporter

    return LatexExporter(template_name="sheet", extra_template_basedirs=[layouts])


def latex_ahead():
    """Import nbconvert and make this process's LaTeX exporter in a thread (about 0.3 s, half a
    second on a busy machine), for a batch whose notebooks are about to execute: the process mostly
    waits on its kernel meanwhile. None when there is nothing to gain (the exporter is made).

    papermill is imported first, here: the thread then imports only what nbconvert adds, never a
    module the executing thread is importing at the same moment (two threads importing one
    package at once can meet a half-made module)."""
    import threading

    def make() -> None:
        try:
            _latex_exporter(layouts)
        except Exception:  # noqa: BLE001 - only a head start: to_latex makes its own and reports
            pass

    try:
        if _latex_exporter.cache_info().currsize:
            return None
        import papermill  # noqa: F401 - see above

        layouts = str(templates_dir() / "latex")
        thread = threading.Thread(target=make, name="latex exporter", daemon=True)
        thread.start()
    except Exception:  # noqa: BLE001 - never the batch's failure: execute and to_latex report their own
        return None
    return thread


def to_latex(notebook: Path, titleblock: dict[str, str], unique_key: str = "output") -> tuple[str, dict[str, bytes]]:
    """The sheet's LaTeX source (and images, their names starting `unique_key`) with the title block set."""
    import nbformat

    nb = nbformat.read(str(notebook), as_version=4)
    nb.metadata.setdefault("timbersheets", {})["titleblock"] = {"caution": escape(SHORT_CAUTION), **titleblock}
    exporter = _latex_exporter(str(templates_dir() / "latex"))
    body, resources = exporter.from_notebook_node(nb, resources={"unique_key": unique_key})
    return body, dict(resources.get("outputs", {}))


def to_html(notebook: Path, html: Path, titleblock: dict[str, str]) -> None:
    """The HTML sheet (no TeX needed): the PDF sheet's content and title block, self-contained."""
    import nbformat

    from ..sheet.htmlsheet import sheet_html

    nb = nbformat.read(str(notebook), as_version=4)
    write_atomic(html, sheet_html(nb, titleblock))

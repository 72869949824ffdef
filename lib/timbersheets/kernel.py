"""The kernel that runs the sheets: ipykernel, ended by the system when its starter ends.

ipykernel ends itself when its parent goes (its parent poller), but only once it has
booted that far: a run killed while its kernel is still importing (the run starts one
before it designs the members) would leave it orphaned. This entry point asks for
the kernel to end with its parent first (lifetime.die_with_parent, the parent
named by JPY_PARENT_PID, which jupyter_client sets), then starts ipykernel as
``python -m ipykernel_launcher`` would.
"""

import os

from .lifetime import die_with_parent

if __name__ == "__main__":
    starter = os.environ.get("JPY_PARENT_PID", "")
    die_with_parent(int(starter) if starter.isdigit() else None)
    from ipykernel import kernelapp

    kernelapp.launch_new_instance()

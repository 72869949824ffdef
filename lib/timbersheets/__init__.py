"""timbersheets: CSA O86 timber member calculation sheets from a member schedule.

Importing the package is cheap: nothing heavy (pint, handcalcs, papermill) is
imported until a module that needs it is used.
"""

__version__ = "0.1.0"

"""splitplan: plan a night of close double stars for your telescope and site.

The package root stays light on purpose (no numpy, pandas or astropy here) so
that the command line starts fast.  Data flows one way through the modules:

    catalogs -> motion -> sky -> optics -> verdict -> plan -> report

and the public Python API lives in :mod:`planner.api`.
"""

__version__ = "0.1.0"

__all__ = ["__version__"]

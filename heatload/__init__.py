"""heatload: heat load, oil temperature and cooler sizing of hydraulic circuits.

The engine works in SI floats and numpy arrays (Pa, m^3/s, W, K, s, m, N).
Units enter and leave through :mod:`heatload.units` at the edges only.
Importing this package loads no UI library, plotly or CoolProp.
"""

from heatload.errors import HeatloadError

__version__ = "0.1.0"

__all__ = ["HeatloadError", "__version__"]

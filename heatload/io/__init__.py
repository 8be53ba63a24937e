"""Duty-cycle files and output files.

``schema`` says how every key of a duty-cycle file is read (kinds, units,
plausible ranges, the commented example); ``read`` turns TOML text into a
validated :class:`~heatload.model.Scenario`; ``write`` writes one back
losslessly; ``files`` checks output paths and writes every file atomically.
The reading and writing API is re-exported here: ``from heatload import io``
then ``io.load_scenario(path)``.
"""

from heatload.io.read import (default_scenario_path, example_paths, load_scenario,
                              loads_scenario, locate_in_file, scenario_from_dict)
from heatload.io.read import MAX_PHASES
from heatload.io.schema import SCHEMA_EXAMPLE
from heatload.io.write import dumps_scenario, save_scenario, scenario_to_dict

__all__ = [
    "SCHEMA_EXAMPLE",
    "MAX_PHASES",
    "load_scenario",
    "loads_scenario",
    "locate_in_file",
    "scenario_from_dict",
    "scenario_to_dict",
    "dumps_scenario",
    "save_scenario",
    "default_scenario_path",
    "example_paths",
]

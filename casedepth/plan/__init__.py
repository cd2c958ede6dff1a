"""Plans: the editable state (:mod:`.state`), its files (:mod:`.fileformat`) and the one evaluation
path every surface uses (:mod:`.evaluate`)."""

from .evaluate import compare_temperatures, evaluate, forward, plan_from_options
from .fileformat import SCHEMA_VERSION, PlanFileError, from_dict, load, migrate, save, to_dict
from .state import Plan

__all__ = ["Plan", "PlanFileError", "SCHEMA_VERSION", "compare_temperatures", "evaluate", "forward", "from_dict",
           "load", "migrate", "plan_from_options", "save", "to_dict"]

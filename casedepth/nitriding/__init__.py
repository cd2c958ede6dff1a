"""Gas nitriding: the validated step (:mod:`.setup`), the compound-layer models (:mod:`.layer`), the
diffusion zone beneath (:mod:`.zone`), what a soak gives and the soak for a depth (:mod:`.nitride`),
two-stage schedules (:mod:`.schedule`), the retort cycle (:mod:`.cycle`) and a plan's outcome
(:mod:`.outcome`).

The names most callers need are importable from here too (``from casedepth.nitriding import
NitridingSetup, nitriding_time``).
"""

from ..models.iron_nitrogen import (PHASE_NAMES, Bohnenkamp_1967_nitrogen_diffusivity, Lehrer_boundaries,
                                    da_Silva_McLellan_1976_nitrogen_diffusivity, nitrogen_saturation_ferrite,
                                    surface_phase)
from .layer import LAYER_MODELS, CompoundLayer
from .nitride import NitridingResult, nitride, nitriding_time
from .zone import ZONE_MODELS, Precipitate, solve_similarity
from .schedule import (LayerAdvice, TwoStageSchedule, compound_layer_advice, potential_for_compound_layer,
                       staged_layer_at, two_stage_for_depth, two_stage_schedule)
from .setup import (KN_RANGE, TEMPERATURE_RANGE, NitridingSetup, Wagner_front_factor, dissociation_for_potential,
                    nitride_capacity, nitriding_potential, nitriding_potential_from_dissociation)

__all__ = ["PHASE_NAMES", "Lehrer_boundaries", "nitrogen_saturation_ferrite", "surface_phase", "LAYER_MODELS",
           "CompoundLayer", "ZONE_MODELS", "Precipitate", "solve_similarity", "NitridingResult", "nitride",
           "nitriding_time", "LayerAdvice", "TwoStageSchedule", "compound_layer_advice", "potential_for_compound_layer",
           "staged_layer_at", "two_stage_for_depth", "two_stage_schedule", "KN_RANGE", "TEMPERATURE_RANGE",
           "Bohnenkamp_1967_nitrogen_diffusivity", "da_Silva_McLellan_1976_nitrogen_diffusivity", "NitridingSetup",
           "Wagner_front_factor", "dissociation_for_potential", "nitride_capacity", "nitriding_potential",
           "nitriding_potential_from_dissociation"]

"""Gas nitriding, forward and inverse: what a soak gives, and the soak for a nitrided hardness depth.

The compound layer grows by the setup's layer model (:mod:`casedepth.nitriding.layer`); the
diffusion zone beneath it by the setup's zone model (:mod:`casedepth.nitriding.zone`). Both advance
as √t at one temperature and K_N, so the soak for a depth needs no search.
Everything is SI inside; nitrogen in wt %, hardness in HV.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .. import formats, safety
from ..constants import ZERO_CELSIUS
from ..errors import InputError, NotReachableError
from ..units import as_number, both_lengths, length_range
from .layer import CompoundLayer
from .setup import NitridingSetup
from .zone import check_reached

#: nitrided hardness depth the models are used for, m
TARGET_RANGE = (0.02e-3, 2e-3)
#: nitriding soaks the models are used for, s
SOAK_RANGE = (60.0, 500 * 3600.0)


@dataclass
class NitridingResult:
    """A nitriding soak: time [s], compound layer [m], nitrided hardness depth [m], profiles."""

    setup: NitridingSetup
    time: float
    layer: CompoundLayer
    front: float  # internal-nitriding front below the surface [m]
    nitrided_depth: float  # depth at core + 50 HV [m]
    depth: np.ndarray  # m, from the surface
    nitrogen: np.ndarray  # wt %, dissolved + in nitrides (compound layer not included)
    hardness: np.ndarray  # HV
    warnings: list[str] = field(default_factory=list)

    @property
    def compound_layer(self) -> float:
        """Compound-layer thickness, ε + γ′ [m]."""
        return self.layer.thickness

    @property
    def window_depth(self) -> float:
        """The depth the drawing's window is about [m]: the nitrided hardness depth."""
        return self.nitrided_depth

    @property
    def uncertainty(self) -> str:
        """How sure the model is of the depth, in words (a load's spread is on top of it)."""
        return self.setup.uncertainty

    @property
    def spread_figures(self) -> dict[str, float]:
        """The figures besides the depth that a load's spread is reported for (casedepth.shop.capability)."""
        return {"compound_layer_um": self.compound_layer * 1e6}

    def to_dict(self) -> dict:
        """The JSON of ``casedepth nitride --time`` (units in the key names)."""
        from .setup import dissociation_for_potential

        s = self.setup
        return {
            "soak_time_h": self.time / 3600.0, "compound_layer_um": self.compound_layer * 1e6,
            "epsilon_layer_um": self.layer.epsilon * 1e6, "gamma_prime_layer_um": self.layer.gamma_prime * 1e6,
            "nitrided_depth_mm": self.nitrided_depth * 1e3, "surface_phase": self.layer.surface_phase,
            "nitriding_potential": s.nitriding_potential, "temperature_c": s.temperature - ZERO_CELSIUS,
            "dissociation_pct": 100.0 * dissociation_for_potential(s.nitriding_potential),
            "core_hardness_hv": s.core, "surface_hardness_hv": s.surface, "steel": s.steel.name,
            "layer_model": s.layer_model, "zone_model": s.zone_model, "nitrogen_diffusivity": s.nitrogen_diffusivity,
            "hardness_limit_hv": s.hardness_limit, "depth_uncertainty": s.uncertainty, "warnings": list(self.warnings),
            "profile": {"depth_mm": (self.depth * 1e3).tolist(), "nitrogen_pct": self.nitrogen.tolist(),
                        "hardness_hv": self.hardness.tolist()},
        }

    def text(self, units) -> str:
        """What ``casedepth nitride --time`` prints."""
        from ..models.iron_nitrogen import PHASE_NAMES
        from ..units import format_duration
        from .setup import dissociation_for_potential

        s = self.setup
        lines = [f"Nitriding for {format_duration(self.time)} at {units.format_temperature(s.temperature)}, K_N "
                 f"{formats.kn(s.nitriding_potential)} "
                 f"({formats.percent(100 * dissociation_for_potential(s.nitriding_potential))} dissociation)",
                 f"  nitrided hardness depth {units.format_length(self.nitrided_depth)} ({s.limit_text}); {s.uncertainty}",
                 f"  compound layer          {self.layer.describe()}; surface phase {PHASE_NAMES[self.layer.surface_phase]}"]
        lines += [f"Warning: {w}" for w in self.warnings]
        lines.append(safety.caution_line(safety.cautions(ammonia=True)))
        return "\n".join(lines)



def nitride(setup: NitridingSetup, time: float, layer: CompoundLayer | None = None) -> NitridingResult:
    """What a nitriding soak of ``time`` [s] gives: compound layer, nitrogen and hardness profiles, nitrided depth.

    The compound layer grows by the setup's layer model (:mod:`casedepth.nitriding.layer`) unless ``layer`` is
    given (a staged schedule). The diffusion zone starts under the compound layer and follows the setup's
    zone model (:mod:`casedepth.nitriding.zone`); the nitrided depth is where its hardness falls to the
    setup's limit (core + 50 HV unless set).
    """
    time = as_number(time, "time")
    if not (math.isfinite(time) and SOAK_RANGE[0] * (1 - 1e-9) <= time <= SOAK_RANGE[1] * (1 + 1e-9)):
        raise InputError("time", f"{time / 3600:g} h is outside 1 min–500 h")
    if layer is None:
        layer = setup.layer.layer(setup.temperature, setup.nitriding_potential, time, setup.uptake)
    s = layer.thickness
    zone = setup.zone
    length = 2.0 * math.sqrt(setup.diffusivity * time)
    reach = max(4.0 * length, 1e-4)
    depth = front_rate(setup) * math.sqrt(time)
    x = np.linspace(0.0, 1.0, 401) ** 1.5 * max(reach, 1.5 * depth)
    nitrogen, hardness = zone.profile(time, x)
    front = getattr(zone, "gamma", None)
    front = 0.0 if front is None else front * length  # the sharp front (the first release's model only)
    warnings = setup.warnings()
    return NitridingResult(setup, time, layer, s + front, s + depth, s + x, nitrogen, hardness, warnings)


def front_rate(setup: NitridingSetup) -> float:
    """Nitrided depth below the compound layer per √time [m/√s], where the zone's hardness falls to the
    setup's limit (0 if it never reaches it)."""
    return setup.zone.depth_rate()


def nitriding_time(setup: NitridingSetup, target_depth: float) -> NitridingResult:
    """The soak [s] for a nitrided hardness depth (core + 50 HV) of ``target_depth`` [m], and what it gives.

    At one temperature and K_N the compound layer and the front below it both advance as √t, so the
    soak is (target / (k_layer + k_front))², with no search.
    """
    target_depth = as_number(target_depth, "target")
    if not (math.isfinite(target_depth) and TARGET_RANGE[0] <= target_depth <= TARGET_RANGE[1]):
        raise InputError("target", f"{both_lengths(target_depth)} is outside {length_range(*TARGET_RANGE)}")
    check_reached(setup.zone, setup)
    rate = setup.layer.constants(float(setup.temperature), float(setup.nitriding_potential), float(setup.uptake))[1]
    rate += front_rate(setup)
    time = (target_depth / rate) ** 2 if rate > 0.0 else math.inf
    if time > SOAK_RANGE[1] * (1 + 1e-9):
        raise NotReachableError("target", f"{both_lengths(target_depth)} is not reached within 500 h at "
                                f"{formats.temperature(setup.temperature)}")
    return nitride(setup, max(time, SOAK_RANGE[0]))

"""Cycle-time quote: how long the furnace is busy for one load, and what a load and a part cost.

The shop's own figures (:class:`ShopDefaults`) fill in the stages that carbon does not decide:
loading, heat-up, drop and equalize, quench, wash and temper. They are the user's to edit and
save; the values here are placeholders for a demo shop, not data from any real one.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields

from .errors import InputError
from .recipe import Stage
from .units import ZERO_CELSIUS


@dataclass(frozen=True)
class ShopDefaults:
    """A shop's standard times [h], temperatures [°C] and rates. Demo values, to be edited."""

    load_h: float = 0.25
    heat_up_h: float = 1.0
    drop_temperature_c: float = 845.0
    drop_h: float = 0.5
    equalize_h: float = 0.5
    hardening_potential: float = 0.80
    quench_h: float = 0.25
    wash_h: float = 0.5
    temper_h: float = 2.0
    temper_temperature_c: float = 180.0
    carrier_co_pct: float = 20.0  # CO in the endothermic carrier gas, vol % (common practice: 20 from natural gas)
    # gas nitriding in a retort: nitrogen purges before ammonia goes in and after the load has cooled
    nitriding_purge_h: float = 0.5
    nitriding_heat_up_h: float = 3.0
    nitriding_cool_h: float = 4.0
    furnace_rate_per_h: float = 95.0
    parts_per_load: int = 120
    currency: str = ""

    def __post_init__(self):
        for f in fields(self):
            value = getattr(self, f.name)
            if f.name == "currency":
                continue
            if not (isinstance(value, (int, float)) and math.isfinite(value) and value >= 0):
                raise InputError(f"shop: {f.name}", f"{value!r} must be a number of zero or more")
        if self.parts_per_load < 1:
            raise InputError("shop: parts_per_load", "at least one part per load")
        if not (5.0 <= self.carrier_co_pct <= 50.0):
            raise InputError("shop: carrier_co_pct", f"{self.carrier_co_pct:g} % CO is outside 5–50 %")

    def to_dict(self) -> dict:
        return asdict(self)

    @classmethod
    def from_dict(cls, data: dict | None) -> "ShopDefaults":
        known = {f.name for f in fields(cls)}
        return cls(**{k: v for k, v in (data or {}).items() if k in known})

    def before(self, temperature: float, potential: float) -> list[Stage]:
        """Load and heat-up to ``temperature`` [K] in the carburizing atmosphere of ``potential`` [wt %]."""
        out = []
        if self.load_h > 0:
            out.append(Stage("load", self.load_h * 3600.0))
        if self.heat_up_h > 0:
            out.append(Stage("heat-up", self.heat_up_h * 3600.0, temperature, potential))
        return out

    def after(self, temperature: float) -> list[Stage]:
        """Drop to hardening temperature and equalize (if cooler than ``temperature`` [K]), quench, wash, temper."""
        out = []
        drop_to = self.drop_temperature_c + ZERO_CELSIUS
        if drop_to < temperature - 1e-9:
            if self.drop_h > 0:
                out.append(Stage("drop", self.drop_h * 3600.0, drop_to, self.hardening_potential))
            if self.equalize_h > 0:
                out.append(Stage("equalize", self.equalize_h * 3600.0, drop_to, self.hardening_potential))
        for kind, hours in (("quench", self.quench_h), ("wash", self.wash_h), ("temper", self.temper_h)):
            if hours > 0:
                out.append(Stage(kind, hours * 3600.0,
                                 self.temper_temperature_c + ZERO_CELSIUS if kind == "temper" else None))
        return out


@dataclass
class Quote:
    """The cycle broken down by stage, with its cost."""

    lines: list[tuple[str, float]]  # (stage label, hours)
    total_h: float
    cost_per_load: float
    cost_per_part: float
    currency: str = ""

    def to_dict(self) -> dict:
        return {"stages": [{"stage": label, "hours": hours} for label, hours in self.lines],
                "total_h": self.total_h, "cost_per_load": self.cost_per_load, "cost_per_part": self.cost_per_part,
                "currency": self.currency}

    def text(self) -> str:
        width = max(len(label) for label, _ in self.lines) if self.lines else 10
        money = f" {self.currency}" if self.currency else ""
        rows = [f"  {label:<{width}}  {hours:6.2f} h" for label, hours in self.lines]
        rows.append(f"  {'whole cycle':<{width}}  {self.total_h:6.2f} h")
        rows.append(f"  cost per load {self.cost_per_load:.2f}{money}, per part {self.cost_per_part:.3f}{money}")
        return "\n".join(rows)


def make_quote(stages: list[Stage], shop: ShopDefaults) -> Quote:
    """Hours per stage, in order, summed; cost = furnace hours × rate, per part = per load / parts per load."""
    return quote_lines([(stage.label, stage.duration / 3600.0) for stage in stages], shop)


def quote_lines(lines: list[tuple[str, float]], shop: ShopDefaults) -> Quote:
    """A quote from ``(label, hours)`` lines, costed at the shop's furnace rate."""
    total = sum(hours for _, hours in lines)
    per_load = total * shop.furnace_rate_per_h
    return Quote(list(lines), total, per_load, per_load / shop.parts_per_load, shop.currency)


#: where a nitriding retort is opened after cooling under nitrogen, about 150 °C (common practice; display only)
NITRIDING_UNLOAD = 150.0 + ZERO_CELSIUS
ROOM = 20.0 + ZERO_CELSIUS


def nitriding_cycle(soaks: list[tuple[float, float]], temperature: float,
                    shop: ShopDefaults) -> list[tuple[str, float, float, float | None]]:
    """The segments of a gas-nitriding cycle: ``(label, hours, temperature at the end [K], K_N or None)``.

    Load, nitrogen purge, heat-up to ``temperature``, the nitriding stages (``(time [s], K_N)`` each),
    cool-down under nitrogen, nitrogen purge; segments of zero length are left out. The nitrogen taken
    up while heating and cooling is not counted in the case (ammonia goes in near temperature;
    common practice).
    """
    segments = [("Load and close", shop.load_h, ROOM, None), ("Purge with nitrogen", shop.nitriding_purge_h, ROOM, None),
                ("Heat-up", shop.nitriding_heat_up_h, temperature, None)]
    segments += [(f"Nitride at K_N {kn:.2f}", time / 3600.0, temperature, kn) for time, kn in soaks]
    segments += [("Cool down", shop.nitriding_cool_h, NITRIDING_UNLOAD, None),
                 ("Purge with nitrogen", shop.nitriding_purge_h, NITRIDING_UNLOAD, None)]
    return [segment for segment in segments if segment[1] > 0]


def nitriding_quote(segments: list[tuple[str, float, float, float | None]], shop: ShopDefaults) -> Quote:
    """The quote of a gas-nitriding cycle from its segments (:func:`nitriding_cycle`)."""
    return quote_lines([(label, hours) for label, hours, _, _ in segments], shop)

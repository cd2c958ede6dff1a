"""The shop's standard times and rates, and the cycle-time quote: how long the furnace is busy for one
load, and what a load and a part cost.

The shop's own figures (:class:`ShopDefaults`) fill in the stages that the case does not decide:
loading, heat-up, drop and equalize, quench, wash and temper (and the purges and cooling of a
nitriding retort). They are the user's to edit and save; the values here are placeholders for a demo
shop, not data from any real one. Each treatment turns them into its own stages
(:func:`casedepth.carburizing.cycle.shop_stages`, :func:`casedepth.nitriding.cycle.nitriding_cycle`).
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field, fields

from .. import formats
from ..errors import InputError
from ..units import finite_number


#: the range of a shop time [h]: a stage of a week is already beyond any shop's standard
HOURS = (0.0, 168.0)


def _item(default, label: str, unit: str = "", allowed: tuple[float, float] | None = None):
    """A shop entry with what the window calls it, its unit and the range it may take (None: text)."""
    return field(default=default, metadata={"label": label, "unit": unit, "range": allowed})


@dataclass(frozen=True)
class ShopDefaults:
    """A shop's standard times [h], temperatures [°C] and rates. Demo values, to be edited.

    Each entry carries its label and unit (``dataclasses.fields(ShopDefaults)[i].metadata``): the
    window's dialog is built from them.
    """

    load_h: float = _item(0.25, "Load and close", "h", HOURS)
    heat_up_h: float = _item(1.0, "Heat-up to temperature", "h", HOURS)
    drop_temperature_c: float = _item(845.0, "Hardening temperature", "°C", (700.0, 1000.0))
    drop_h: float = _item(0.5, "Drop to hardening temperature", "h", HOURS)
    equalize_h: float = _item(0.5, "Equalize", "h", HOURS)
    hardening_potential: float = _item(0.80, "Potential at hardening temperature", "%C", (0.2, 1.4))
    quench_h: float = _item(0.25, "Quench", "h", HOURS)
    wash_h: float = _item(0.5, "Wash", "h", HOURS)
    # kept so plan files written before schema 6 read as they were; the plan's own temper (Quench and temper)
    # is what a cycle runs, so the dialog does not show these
    temper_h: float = field(default=2.0, metadata={"label": "Temper", "unit": "h", "range": HOURS, "retired": True})
    temper_temperature_c: float = field(default=180.0, metadata={"label": "Temper temperature", "unit": "°C",
                                                                 "range": (100.0, 700.0), "retired": True})
    # CO in the carrier gas, vol %: the plan's own since schema 9 (carrier_co); kept so older files read as they were
    carrier_co_pct: float = field(default=20.0, metadata={"label": "CO in the carrier gas", "unit": "%",
                                                          "range": (5.0, 50.0), "retired": True})
    # gas nitriding in a retort: nitrogen purges before ammonia goes in and after the load has cooled
    nitriding_purge_h: float = _item(0.5, "Nitriding: nitrogen purge", "h", HOURS)
    nitriding_heat_up_h: float = _item(3.0, "Nitriding: heat-up", "h", HOURS)
    nitriding_cool_h: float = _item(4.0, "Nitriding: cool-down", "h", HOURS)
    # the bands the floor holds the setpoints in (printed with them; the shop's own values, AMS 2750 furnace
    # classes run from ±3 °C to ±28 °C; common practice, from memory)
    temperature_tolerance_c: float = _item(8.0, "Temperature tolerance ±", "°C", (0.0, 50.0))
    potential_tolerance_pct: float = _item(0.05, "Carbon potential tolerance ±", "%C", (0.0, 0.5))
    kn_tolerance_pct: float = _item(10.0, "K_N tolerance ±", "%", (0.0, 100.0))
    furnace_rate_per_h: float = _item(95.0, "Furnace rate per hour", "", (0.0, 1e6))
    parts_per_load: int = _item(120, "Parts per load", "", (1, 1_000_000))
    currency: str = _item("", "Currency")

    def __post_init__(self):
        for f in fields(self):
            value = getattr(self, f.name)
            if f.name == "currency":
                if not isinstance(value, str) or len(value) > 20:
                    raise InputError("shop", f"currency: {str(value)[:40]!r} must be text of at most 20 characters")
                continue
            low, high = f.metadata["range"]
            if not finite_number(value):
                raise InputError("shop", f"{f.name}: {value!r} must be a number")
            if isinstance(f.default, int) and value != int(value):
                raise InputError("shop", f"{f.name}: {value!r} must be a whole number")
            if not low <= value <= high:
                unit = f" {f.metadata['unit']}" if f.metadata["unit"] else ""
                raise InputError("shop", f"{f.name} ({f.metadata['label']}): {value:g}{unit} is outside "
                                         f"{low:g}–{high:g}{unit}")

    def to_dict(self) -> dict:
        return asdict(self)

    @classmethod
    def from_dict(cls, data: dict | None) -> "ShopDefaults":
        """The shop from a plan file's table; missing entries take the defaults, unknown ones are refused."""
        data = dict(data or {})
        known = {f.name for f in fields(cls)}
        unknown = sorted(set(data) - known)
        if unknown:
            raise InputError("shop", f"unknown entr{'y' if len(unknown) == 1 else 'ies'} {', '.join(unknown)}; "
                             f"known: {', '.join(sorted(known))}")
        return cls(**data)


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
        rows = [f"  {label:<{width}}  {hours:6.2f} h" for label, hours in self.lines]
        rows.append(f"  {'whole cycle':<{width}}  {self.total_h:6.2f} h")
        rows.append(f"  cost per load {formats.money(self.cost_per_load, self.currency)}, "
                    f"per part {formats.piece_price(self.cost_per_part, self.currency)}")
        return "\n".join(rows)


def quote_lines(lines: list[tuple[str, float]], shop: ShopDefaults) -> Quote:
    """A quote from ``(label, hours)`` lines: cost = furnace hours × rate, per part = per load / parts per load."""
    total = sum(hours for _, hours in lines)
    per_load = total * shop.furnace_rate_per_h
    return Quote(list(lines), total, per_load, per_load / shop.parts_per_load, shop.currency)

"""What every treatment's evaluation gives: the one interface the window, the command line, the printed
documents, loads and calibration read.

A treatment (a row of :data:`casedepth.treatments.TREATMENTS`) evaluates a plan's values into an
:class:`Outcome`. Everything a surface shows comes from the outcome's methods — the headline and
facts (:meth:`Outcome.summary`), the profiles at any moment of the cycle (:meth:`Outcome.view`),
the cycle's temperature and potential (:meth:`Outcome.timeline`), the JSON and text the command line
prints, the lines of the process sheet and the columns of an exported profile — so no surface
asks which treatment it is showing.

Times in s, depths in m, temperatures in K inside; the text and JSON give the usual units.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from . import formats
from .errors import InputError
from .safety import Caution
from .shop.quote import Quote
from .units import DisplayUnits, format_duration


@dataclass
class Fact:
    """One line of the result: ``key`` (stable, for tests and layout), what it is, its value as text, and more on it
    (``detail``: the window shows it on hovering the value)."""

    key: str
    label: str
    text: str
    detail: str = ""


@dataclass
class Summary:
    """The result in words: a headline (the time to run), a line on how, and the facts."""

    headline: str
    subline: str
    facts: list[Fact]


@dataclass
class Timeline:
    """Temperature [K] and potential against time [s] through the whole cycle, for plots: one point per
    stage boundary (ramps straight between them, a stepped potential repeats its time; NaN where no
    atmosphere acts), the stages' (start, end, label), what the potential is, and the moments to mark
    (time, what happens: a purge, the atmosphere going in).

    A label that spans no time (start equal to end) is such a moment: the cycle functions give their
    moments that way among the labels, and they are moved to :attr:`markers` here."""

    times: np.ndarray
    temperatures: np.ndarray
    potentials: np.ndarray
    labels: list[tuple[float, float, str]]
    potential_name: str
    potential_floor: float  # the potential axis shows at least 0 to this
    markers: tuple[tuple[float, str], ...] = ()
    limit: tuple[float, str] | None = None  # a level on the potential's axis, and its name (a surface-carbon limit)

    def __post_init__(self) -> None:
        moments = tuple((start, label) for start, end, label in self.labels if start == end)
        if moments:
            self.labels = [entry for entry in self.labels if entry[0] != entry[1]]
            self.markers = tuple(self.markers) + moments


@dataclass
class Curve:
    """A profile against depth [m] from the surface."""

    depth: np.ndarray
    values: np.ndarray
    label: str


@dataclass
class Level:
    """A horizontal line on a profile plot: a threshold, the core, a limit."""

    value: float
    label: str
    style: str  # "threshold", "core" or "limit"


@dataclass
class Panel:
    """One profile plot: the profile at the moment shown, the final one (drawn faintly while scrubbing),
    lines, a shaded band from the surface (a compound layer) and the axis range."""

    quantity: str  # the y axis, with its unit
    curve: Curve
    final: Curve | None
    levels: list[Level]
    limits: tuple[float, float]
    caption: str
    band: tuple[float, str] | None = None  # (thickness [m], label)
    hrc_axis: bool = False  # a second axis in HRC (ASTM E140) beside HV


@dataclass
class ProfileView:
    """What the profile plots show at one moment: the main quantity (carbon or nitrogen) and hardness."""

    name: str  # "Carbon profile", "Nitrogen profile"
    main: Panel
    hardness: Panel
    reach: float  # depth [m] the plots run to
    targets: tuple[float, float, float]


@dataclass
class SheetContent:
    """What a process sheet prints of a result: lines of text and the stage table of the cycle; for the floor,
    the drawing's callout, the setpoints with their tolerances (a row per stage: stage, time h:min,
    temperature, atmosphere, probe or exhaust reading) and how the result is inspected."""

    lines: list[str]
    header: list[str]
    rows: list[list[str]]
    callout: list[str] = field(default_factory=list)
    setpoint_header: list[str] = field(default_factory=list)
    setpoints: list[list[str]] = field(default_factory=list)
    inspection: list[str] = field(default_factory=list)
    setpoint_notes: list[str] = field(default_factory=list)  # footnotes of the setpoint table


class Outcome(ABC):
    """A plan's evaluation. Subclasses set the attributes and implement the methods below."""

    treatment: str  # key of the treatment table
    values: dict[str, Any]  # the plan values it was evaluated from
    setup: Any  # the treatment's validated setup
    targets: tuple[float, float, float]  # the drawing's minimum, aim and maximum depth [m]
    quote: Quote
    cautions: list[Caution]
    warnings: list[str]
    profile_name: str  # what the main profile is: "Carbon profile", "Nitrogen profile"

    @property
    @abstractmethod
    def soak_window(self) -> tuple[float, float, float]:
        """Time at temperature [s] for the drawing's minimum, aim and maximum (as the plan counts stages)."""

    @property
    def soak_time(self) -> float:
        """Time at temperature [s] for the aim: what a shop sets on the furnace and what calibration asks for."""
        return self.soak_window[1]

    @property
    def held_stages(self) -> list[tuple[str, float]]:
        """The stages at temperature whose lengths make the aim's time at temperature (:attr:`soak_time`), in order:
        ``(name, duration [s])``. One soak unless the plan's cycle splits it (boost and diffuse, two stages)."""
        return [("soak", self.soak_time)]

    def frozen_values(self) -> dict[str, Any]:
        """The plan's values with the cycle this outcome planned written into them, where the treatment plans one
        the values do not hold (a low-pressure pulse table): what a load of the plan runs, whatever its parts'
        spread (:func:`casedepth.shop.capability.capability`)."""
        return dict(self.values)

    @property
    def held_shares(self) -> tuple[float, ...]:
        """Each held stage's share of :attr:`soak_time` (what a longer or shorter time at temperature keeps)."""
        held = self.held_stages
        total = sum(duration for _, duration in held)
        if not total > 0:
            raise InputError("stages", "the plan holds no time at temperature (no soak, boost or diffuse stage) to vary")
        return tuple(duration / total for _, duration in held)

    @property
    @abstractmethod
    def depth(self) -> float:
        """The depth [m] at the end of the cycle (for the aim), at the plan's threshold."""

    @property
    @abstractmethod
    def duration(self) -> float:
        """Time [s] the profile history covers (the soak, or the whole cycle)."""

    @abstractmethod
    def depth_after(self, soak: float, multiplier: float | None = None) -> float:
        """The depth [m] after a soak of ``soak`` [s], with the stages counted as this plan counts them
        (optionally with another calibration ``multiplier`` on the diffusivity)."""

    @abstractmethod
    def summary(self, units: DisplayUnits) -> Summary:
        """The result in words, for the window's result panel."""

    @abstractmethod
    def timeline(self) -> Timeline:
        """Temperature and potential through the whole cycle."""

    @abstractmethod
    def view(self, time: float | None = None) -> ProfileView:
        """The profiles at ``time`` [s] of :attr:`duration` (None: at the end)."""

    @abstractmethod
    def to_dict(self) -> dict:
        """The JSON the command line prints (units in the key names)."""

    @abstractmethod
    def text(self, units: DisplayUnits) -> str:
        """The result as the command line prints it."""

    @abstractmethod
    def sheet(self, units: DisplayUnits) -> SheetContent:
        """What the process sheet prints of the result."""

    def profile_columns(self) -> tuple[str, list[tuple[str, np.ndarray]]]:
        """A one-line description and the columns of the profile at the end, for export (depth first)."""
        view = self.view()
        main, hardness = view.main.curve, view.hardness.curve
        quantity = view.main.quantity.split(" [")[0]
        return self.describe_end(), [("depth_mm", main.depth * 1e3), ("depth_in", main.depth / 0.0254),
                                     (f"{quantity}_pct", main.values), ("hardness_hv", hardness.values)]

    def stage_rows(self) -> list[dict]:
        """The cycle the plan ran, as rows of a plan's own stage table (a cycle to start one's own from);
        none for a treatment whose cycle is not made of such stages."""
        return []

    #: the case carbon [wt %] whose hardenability is shown beside the core's (None: the core only)
    hardenability_case_carbon = None

    def hardenability(self) -> dict:
        """The steel's hardenability for the window and the sheet: the facts of
        :func:`casedepth.models.hardenability.hardenability_facts`, plus a Jominy curve of the core
        (``curve_distances`` [m], ``curve_hrc``) and, where the outcome has a case carbon, of the case
        (``case_curve_hrc``); ``{"error": message}`` for a steel beyond ASTM A255's factors."""
        from .errors import InputError
        from .models.hardenability import hardenability_facts, jominy_curve

        steel = self.setup.steel
        case = self.hardenability_case_carbon
        try:
            facts = hardenability_facts(steel.composition, steel.grain_size, case_carbon=case)
            distances = np.linspace(1.0, 32.0, 63) * 0.0254 / 16.0
            facts["curve_distances"] = distances
            facts["curve_hrc"] = jominy_curve(steel.composition, distances)
            facts["case_curve_hrc"] = None if case is None else jominy_curve(steel.composition, distances, carbon=case)
        except InputError as error:
            return {"error": error.message}
        return facts

    @abstractmethod
    def describe_end(self) -> str:
        """What the profile at the end is the profile of, in a few words (for exports)."""


@dataclass
class Offer:
    """A newer model or policy offered to a plan made with an older one (never applied silently)."""

    key: str  # the parameter
    value: Any  # the newer value
    text: str  # what changes, in words


def quote_fact(quote: Quote) -> Fact:
    """The whole cycle and its cost, as a fact of the result."""
    return Fact("cycle", "Whole cycle", f"{format_duration(quote.total_h * 3600)}; "
                                        f"{formats.money(quote.cost_per_load, quote.currency)} per load, "
                                        f"{formats.piece_price(quote.cost_per_part, quote.currency)} per part")

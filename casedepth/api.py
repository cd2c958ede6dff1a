"""The short Python API: build a :class:`CarburizingSetup` from what a person would type.

Every argument accepts the same text as the command line (``"925C"``, ``"1.5e-5cm/s"``,
``"50HRC"``); numbers are taken in the unit named in the parameter's description.
"""

from __future__ import annotations


from .carburizing import CarburizingSetup
from .diffusivity import Diffusivity
from .errors import InputError
from .geometry import Geometry
from .steels import Steel, steel_from_text
from .surface import DEFAULT_BETA
from .units import parse_length, parse_number, parse_temperature, parse_threshold, parse_velocity


def setup(steel: str | Steel, temperature: str | float, potential: str | float, *, at: str | float = "0.40%C",
          diffusivity: str = "tibbetts", beta: str | float = DEFAULT_BETA, alloy_factor: bool = True,
          geometry: str = "plate", diameter: str | float | None = None, thickness: str | float | None = None,
          hardness_relation: str = "tempered", d0: str | float | None = None, q: str | float | None = None,
          d_multiplier: str | float = 1.0) -> CarburizingSetup:
    """A validated carburizing setup.

    Parameters
    ----------
    steel : str or Steel
        Library grade (``"8620"``) or composition (``"C=0.20 Mn=0.80 Cr=0.50"``, wt %).
    temperature : str or float
        ``"925C"``, ``"1700F"``, ``"1198K"``; a number is °C.
    potential : str or float
        Carbon potential of the atmosphere, [wt % C].
    at : str or float
        Threshold: ``"0.40%C"``, ``"550HV"``, ``"50HRC"``; a number is wt % C.
    diffusivity : str
        ``"tibbetts"``, ``"agren"`` or ``"arrhenius"``.
    beta : str or float
        Mass-transfer coefficient: ``"1.5e-5cm/s"``, ``"inf"``; a number is m/s.
    alloy_factor : bool
        Apply the Gunnarson alloy factor.
    geometry : str
        ``"plate"``, ``"cylinder"``, ``"bore"`` or ``"sphere"``.
    diameter, thickness : str or float, optional
        ``"40mm"``; a number is mm.
    hardness_relation : str
        ``"tempered"`` or ``"as-quenched"`` (for hardness thresholds).
    d0, q : str or float, optional
        Arrhenius D0 [m²/s] and Q [kJ/mol].
    d_multiplier : float
        Calibration factor on D.
    """
    steel_obj = steel if isinstance(steel, Steel) else steel_from_text(str(steel))
    kwargs = {"method": diffusivity, "multiplier": parse_number(d_multiplier, "diffusivity multiplier")}
    if d0 is not None or q is not None:
        if diffusivity != "arrhenius":
            raise InputError("D0" if d0 is not None else "Q", "only used with the arrhenius diffusivity")
        if d0 is not None:
            kwargs["D0"] = parse_number(d0, "D0")
        if q is not None:
            kwargs["Q"] = parse_number(q, "Q") * 1e3
    if geometry == "plate":
        if diameter is not None:
            raise InputError("diameter", "a plate has a thickness, not a diameter")
        shape = Geometry("plate", None if thickness is None else parse_length(thickness, "thickness"))
    else:
        if thickness is not None:
            raise InputError("thickness", f"a {geometry} has a diameter, not a thickness")
        shape = Geometry(geometry, None if diameter is None else parse_length(diameter, "diameter"))
    return CarburizingSetup(
        steel=steel_obj,
        temperature=parse_temperature(temperature, "temperature"),
        carbon_potential=parse_number(potential, "carbon potential"),
        threshold=parse_threshold(at, "threshold"),
        diffusivity=Diffusivity(**kwargs),
        beta=parse_velocity(beta, "beta", default_unit="m/s"),
        alloy_factor_on=bool(alloy_factor),
        geometry=shape,
        hardness_relation=hardness_relation,
    )

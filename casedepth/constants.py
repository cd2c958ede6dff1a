"""Physical constants and reference temperatures, defined once for the whole library.

Everything inside casedepth is SI (K, m, s, J); these are the only literal copies of the numbers.
"""

#: molar gas constant, J/(mol K) (CODATA 2018, exact since the 2019 SI redefinition)
GAS_CONSTANT = 8.314462618
#: the gas constant in thermochemical calories, cal/(mol K), as used by Tibbetts (1980)
GAS_CONSTANT_CAL = 1.987
#: 0 °C in kelvin
ZERO_CELSIUS = 273.15
#: room temperature, where a cold load starts and a cycle ends, K (20 °C; display and ramps)
ROOM_TEMPERATURE = 20.0 + ZERO_CELSIUS

#: molar masses, g/mol (IUPAC standard atomic weights, abridged)
MOLAR_MASS = {"C": 12.011, "N": 14.007, "Fe": 55.845, "Cr": 51.996, "Al": 26.982, "V": 50.942, "Ti": 47.867,
              "Mo": 95.95}

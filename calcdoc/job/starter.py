"""Commented starter job files (``calcdoc new --system closed|flow|vessel|reciprocating``).

Each starter passes ``calcdoc check`` as written (a test makes sure); the values are placeholders of
an invented scenario, to be replaced by the engineer's own.
"""
from __future__ import annotations

__all__ = ["STARTERS", "starter"]

_HEAD = """\
# calcdoc job file: a starter written by `calcdoc new`. Replace every value with your own.
#
# Every value with a unit must carry it. Pressures are absolute unless the unit carries a gauge
# marker (barg, psig, kPag), which then needs the site atmosphere (site: atmosphere or elevation).
# Check the file with `calcdoc check FILE`, compute it with `calcdoc run FILE`.
calcdoc: 1                       # job-file schema version

calc:                            # the title block of the calc package
  number: PRJ-000-C-001
  title: {title}
  project: Project name
  purpose: >-
    Say in a sentence or two what this calculation establishes.
  revision: A
  date: 2026-01-01
  prepared_by: Your name
  checked_by: Checker's name
  drawings: [PRJ-000-M-001 General arrangement]
  history:
    - {{revision: A, date: 2026-01-01, description: Issued for review}}

units: SI                        # report units: SI or US, or per quantity: {{system: SI, pressure: barg, power: kW}}
site:
  elevation: 0 m                 # or atmosphere: 101.325 kPa (measured barometric pressure)

gas:
  fluid: {fluid}                  # a CoolProp fluid name; or mixture: {{Methane: 0.9, Ethane: 0.1}}
  model: real                    # real: CoolProp equation of state; ideal: constant k (give k and molar_mass)
"""

_CLOSED = _HEAD.format(title="Gas spring compression and return", fluid="Nitrogen") + """
system: closed                   # a fixed mass of gas (cylinder, spring, vessel)

start:                           # state 1
  pressure: 20 barg
  temperature: 20 degC
  volume: 2 L                    # or mass: 0.05 kg

legs:                            # each leg starts where the previous one ended
  - name: Compression stroke
    process: polytropic          # polytropic, isentropic, isothermal, isobaric, isochoric
    n: 1.35                      # leave n out and give pressure and volume to derive it from a measurement
    end: {volume: 1 L}           # one of pressure, temperature, volume, pressure_ratio, volume_ratio
  - name: Return stroke
    process: isentropic
    end: {volume: 2 L}

limits:                          # design limits; any failing check makes `calcdoc run` exit 1
  - name: Gas temperature
    quantity: temperature        # any state or leg quantity (calcdoc schema lists them)
    max: 120 degC                # max and/or min, in units of the quantity
    margin: 10 K                 # optional required margin: absolute, or a percent such as 10 %
    basis: Seal material datasheet (replace with your source)
  - name: Peak pressure
    quantity: pressure
    at: [Compression stroke]     # leg names (their end states) or state labels; default everywhere
    max: 60 barg
    basis: Cylinder rating (replace with your source)

assumptions:
  - Leakage past the seals is negligible.
"""

_FLOW = _HEAD.format(title="Two-stage air compressor with intercooler", fluid="Air") + """
system: flow                     # steady flow through machines and exchangers

start:                           # suction state
  pressure: 1 bara
  temperature: 25 degC
  mass_flow: 2 kg/s              # or molar_flow, volume_flow, standard_volume_flow

legs:                            # each leg starts where the previous one ended
  - name: Stage 1
    process: compressor          # compressor, expander, cooler, heater, throttle
    efficiency: {polytropic: 0.80}
    end: {pressure: 3 bara}      # one of pressure, temperature, pressure_ratio
  - name: Intercooler
    process: cooler
    pressure_drop: 2 %           # or an absolute pressure difference such as 0.05 bar
    end: {temperature: 35 degC}
  - name: Stage 2
    process: compressor
    efficiency: {polytropic: 0.80}
    end: {pressure: 8 bara}

limits:                          # design limits; any failing check makes `calcdoc run` exit 1
  - name: Discharge temperature
    quantity: discharge_temperature
    at: [Stage 1, Stage 2]
    max: 180 degC
    basis: Lubricant and valve limits (replace with your source)
  - name: Stage pressure ratio
    quantity: pressure_ratio
    at: [Stage 1, Stage 2]
    max: 4
    basis: common practice

assumptions:
  - Kinetic and potential energy changes of the gas are negligible.
"""

_VESSEL = _HEAD.format(title="Receiver blowdown and pump-up", fluid="Air") + """
system: vessel                   # a rigid vessel that fills or empties through an orifice over time

vessel:
  volume: 2 m3
  wall:                          # needed only for legs with heat: wall (the wall as one lump)
    mass: 800 kg
    specific_heat: 0.49 kJ/(kg*K)
    area: 9 m2                   # inner surface wetted by the gas
    heat_transfer_coefficient: 8 W/(m2*K)

start:                           # state 1: the gas in the vessel
  pressure: 10 barg
  temperature: 20 degC

legs:                            # each leg starts where the previous one ended
  - name: Blowdown
    process: discharge           # discharge or fill
    orifice: {diameter: 10 mm, discharge_coefficient: 0.85, back_pressure: 0 barg}
    heat: wall                   # adiabatic, isothermal or wall (uses vessel.wall)
    end: {pressure: 1 barg}      # or duration: 15 min
  - name: Pump-up
    process: fill
    supply: {mass_flow: 0.05 kg/s, temperature: 40 degC}   # or {pressure, temperature} and an orifice
    heat: adiabatic
    end: {pressure: 10 barg}

limits:                          # design limits; any failing check makes `calcdoc run` exit 1
  - name: Blowdown time
    quantity: duration
    at: [Blowdown]
    max: 15 min
    basis: Operating procedure (replace with your source)
  - name: Coldest gas
    quantity: min_temperature    # min_wall_temperature with heat: wall
    min: -46 degC
    basis: Vessel minimum design metal temperature (replace with your nameplate value)

assumptions:
  - The gas in the vessel is well mixed.
"""

_RECIP = _HEAD.format(title="Two-stage reciprocating air compressor, cylinders and rod loads", fluid="Air") + """
system: flow                     # steady flow through machines and exchangers

start:                           # suction state
  pressure: 1 bara
  temperature: 25 degC
  mass_flow: 0.12 kg/s           # the duty; leave the flow out and the first stage's cylinders set it

legs:                            # each leg starts where the previous one ended
  - name: Stage 1
    process: compressor
    machine: reciprocating       # the machine's own geometry: the cylinders decide the flow and the interstage pressure
    cylinder:
      bore: 250 mm
      stroke: 150 mm
      rod: 45 mm                 # piston-rod diameter
      speed: 600 rpm
      clearance: 12 %            # of the swept volume
      action: double             # double (both ends compress) or single (head end only)
      # re_expansion_exponent: 1.3   # default: the gas's isentropic exponent at suction
      # volumetric_loss: 4 %         # valve and ring leakage allowance; default 0
      cylinders: 1               # identical cylinders in parallel
    efficiency: {isentropic: 0.80}
    # no end: the pressure between two reciprocating stages is where both cylinders pass the same mass flow
  - name: Intercooler
    process: cooler
    pressure_drop: 2 %
    end: {temperature: 35 degC}
  - name: Stage 2
    process: compressor
    machine: reciprocating
    cylinder: {bore: 150 mm, stroke: 150 mm, rod: 45 mm, speed: 600 rpm, clearance: 14 %, action: double}
    efficiency: {isentropic: 0.80}
    end: {pressure: 10 bara}     # the end pressure of the series

limits:                          # design limits; any failing check makes `calcdoc run` exit 1
  - name: Cylinder capacity
    quantity: capacity           # cylinder flow / required flow
    at: [Stage 1]
    min: 1.0
    basis: Duty of the unit (replace with your source)
  - name: Gas rod load, compression
    quantity: rod_load_compression
    max: 40 kN
    basis: Frame rating (replace with the manufacturer's figure)
  - name: Gas rod load, tension
    quantity: rod_load_tension
    max: 40 kN
    basis: Frame rating (replace with the manufacturer's figure)
  - name: Discharge temperature
    quantity: discharge_temperature
    at: [Stage 1, Stage 2]
    max: 200 degC
    basis: Lubricant and valve limits (replace with your source)

assumptions:
  - Kinetic and potential energy changes of the gas are negligible.
"""

STARTERS = {"closed": _CLOSED, "flow": _FLOW, "vessel": _VESSEL, "reciprocating": _RECIP}


def starter(system: str) -> str:
    """The commented starter job file of a system (closed, flow or reciprocating)."""
    return STARTERS[system]

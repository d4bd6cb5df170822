"""Checks of acceptance.computations.protective_conductor against published sources.

Status tags: [S] published source (named), [M] from memory of the standard,
[P] common trade practice with no single source.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from acceptance.computations import ComputationError
from acceptance.computations.protective_conductor import (
    MATERIALS,
    adiabatic_k,
    adiabatic_minimum_cross_section,
    iec_60204_1_protective_conductor_minimum,
)

# Tabulated k and material constants are whole numbers: half a unit.
WHOLE = 0.5


@pytest.mark.parametrize(
    ("line", "protective"),
    [
        # IEC 60204-1:2016 Table 1; IEC 60364-5-54:2011 Table 54.2 (reference values §6) [M]
        (1.5, 1.5),
        (16.0, 16.0),  # S ≤ 16 mm²: S, the boundary included
        (25.0, 16.0),
        (35.0, 16.0),  # 16 < S ≤ 35 mm²: 16 mm², the boundary included
        (50.0, 25.0),  # S > 35 mm²: S/2
        (120.0, 60.0),  # S/2 = 60 mm², which the installer rounds up to 70 mm²
    ],
)
def test_protective_conductor_table(line, protective):
    assert iec_60204_1_protective_conductor_minimum(line) == protective


@pytest.mark.parametrize(
    ("material", "constant"),
    [
        # IEC 60364-5-54:2011 Table A.54.1, √(Qc(β + 20)/ρ20) (reference values §6) [M]
        ("copper", 226.0),
        ("aluminium", 148.0),
        ("steel", 78.0),
    ],
)
def test_material_constants(material, constant):
    assert MATERIALS[material].constant == pytest.approx(constant, abs=WHOLE)


@pytest.mark.parametrize(
    ("initial", "final", "k"),
    [
        # IEC 60364-5-54:2011 Annex A tabulated k for copper (reference values §6) [M]
        (70.0, 160.0, 115.0),  # core of a PVC cable (also IEC 60364-4-43 Table 43A)
        (90.0, 250.0, 143.0),  # core of an XLPE cable
        (30.0, 160.0, 143.0),  # separate PVC-insulated protective conductor
        (30.0, 250.0, 176.0),  # separate XLPE-insulated protective conductor
    ],
)
def test_adiabatic_k_reproduces_the_tables(initial, final, k):
    assert adiabatic_k(initial, final) == pytest.approx(k, abs=WHOLE)


def test_adiabatic_cross_section_example():
    # S = √(I²t)/k (IEC 60364-5-54 543.1.2 [M]); worked by hand: 1000 A for 0.1 s,
    # k = 115 → √(100 000)/115 = 316.23/115 = 2.7498 mm²
    assert adiabatic_minimum_cross_section(1000.0, 0.1, 115.0) == pytest.approx(
        2.7498, abs=5e-5
    )


@given(st.floats(min_value=1.0, max_value=1e5), st.floats(min_value=0.001, max_value=5.0),
       st.floats(min_value=50.0, max_value=250.0))
def test_adiabatic_section_carries_its_let_through_energy(current, time, k):
    # k²S² ≥ I²t is the equation's meaning: the section found meets it with equality
    section = adiabatic_minimum_cross_section(current, time, k)
    assert (k * section) ** 2 == pytest.approx(current**2 * time, rel=1e-9)


@pytest.mark.parametrize(
    ("call", "message"),
    [
        (lambda: iec_60204_1_protective_conductor_minimum(0.0),
         "line_cross_section_mm2 0 mm² must be greater than 0 mm²"),
        (lambda: adiabatic_k(160.0, 70.0),
         "final_temperature_c 70 °C must be above initial_temperature_c 160 °C"),
        (lambda: adiabatic_k(70.0, 160.0, "brass"),
         "material 'brass' has no encoded constants; use copper, aluminium, steel"),
        (lambda: adiabatic_k(-300.0, 160.0),
         "initial_temperature_c -300 °C is below absolute zero (-273.15 °C)"),
        (lambda: adiabatic_minimum_cross_section(1000.0, 6.0, 115.0),
         "disconnection_time 6 s is above 5 s: the adiabatic equation of IEC 60364-5-54 "
         "543.1.2 applies up to 5 s"),
        (lambda: adiabatic_minimum_cross_section(-1.0, 0.1, 115.0),
         "fault_current -1 A must be greater than 0 A"),
        (lambda: adiabatic_minimum_cross_section(1000.0, 0.1, math.inf),
         "k inf A·s^½/mm² must be a finite number"),
    ],
)
def test_rejects_bad_input(call, message):
    with pytest.raises(ComputationError) as caught:
        call()
    assert str(caught.value) == message

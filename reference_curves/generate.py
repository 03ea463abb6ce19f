"""Regenerate the invented reference I-V-T series from the mechid catalogue.

Every series is a scenario of our own (the fictional "Larkfield Thin-Film Laboratory"), made
by our own models with the true values written beside the data. Run from the repo root::

    python reference_curves/generate.py            # refuses to overwrite existing files
    python reference_curves/generate.py --force    # rewrite everything

Each folder gets ``data.csv`` (tidy: temperature_K, voltage_V, current_A), ``device.toml``
(what the experimenter knows, with uncertainties) and ``truth.json`` (the true parameters,
noise model, grid and seed). The first scenario is also copied into the package as the demo.
"""

from __future__ import annotations

import json
import shutil
import sys
from pathlib import Path

import numpy as np

from mechid.catalogue import get_mechanism
from mechid.data import write_series_csv
from mechid.device import device_from_values
from mechid.simulate import simulate_series

HERE = Path(__file__).resolve().parent
DEMO_DIR = HERE.parent / "mechid" / "demo_data"


def _bias(lo: float, hi: float, n: int) -> list[float]:
    """Both polarities, log-spaced magnitudes from lo to hi volts."""
    mags = np.geomspace(lo, hi, n)
    return [float(v) for v in np.concatenate([-mags[::-1], mags])]


def _sweep(lo: float, hi: float, n: int) -> list[float]:
    """A linear sweep from lo to hi volts without the zero-bias point (rectifying devices)."""
    return [float(v) for v in np.round(np.linspace(lo, hi, n), 6) if v != 0.0]


SCENARIOS: list[dict] = [
    {
        "name": "larkfield_sinx_poole_frenkel",
        "story": "PECVD silicon-nitride film (30 nm) between Al and n+ Si, measured 300-450 K "
                 "on a heated probe station; bulk trap emission expected.",
        "mechanism": "poole_frenkel",
        "params": {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                   "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0},
        "device": {"thickness_nm": 30.0, "thickness_sd_nm": 1.0, "area_cm2": 1e-4,
                   "optical_dielectric_constant": 4.0, "optical_dielectric_constant_sd": 0.4},
        "temperatures_K": [300, 325, 350, 375, 400, 425, 450],
        "voltages_V": _bias(3.0, 12.0, 24),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 101,
    },
    {
        "name": "larkfield_alox_direct_tunnelling",
        "story": "Al/AlOx/Al tunnel junction (plasma-oxidised, about 1.8 nm), 10 x 10 um, "
                 "cooled in a flow cryostat from 300 K down to 10 K.",
        "mechanism": "direct_tunnelling",
        "params": {"barrier_height_eV": 1.6, "thickness_nm": 1.8, "effective_mass_ratio": 0.45},
        "device": {"thickness_nm": 1.8, "thickness_sd_nm": 0.15, "area_cm2": 1e-6,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05},
        "temperatures_K": [10, 77, 150, 225, 300],
        "voltages_V": _bias(0.02, 0.8, 25),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 102,
    },
    {
        "name": "larkfield_sio2_fowler_nordheim",
        "story": "Thermal SiO2 gate oxide (6 nm) on p-Si, high-field ramp at four temperatures "
                 "in a cryogenic probe station; injection from the n+ poly gate.",
        "mechanism": "fowler_nordheim",
        "params": {"barrier_height_eV": 3.1, "thickness_nm": 6.0, "effective_mass_ratio": 0.45},
        "device": {"thickness_nm": 6.0, "thickness_sd_nm": 0.2, "area_cm2": 1e-4,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05},
        # Inside the Murphy-Good factor's validity: pi c kT <= 0.74 (6 V, 225 K); the earlier
        # 250-400 K ramp from 5 V reached 1.57, where the formula does not hold.
        "temperatures_K": [77, 125, 175, 225],
        "voltages_V": _bias(6.0, 9.5, 20),
        "noise_relative": 0.03, "noise_floor_A": 1e-13, "seed": 103,
    },
    {
        "name": "larkfield_hfo2_schottky",
        "story": "Sputtered HfO2 (20 nm) with a TiN bottom and Pt top electrode; interface-limited "
                 "emission over the Pt barrier, 250-400 K.",
        "mechanism": "schottky_emission",
        "params": {"barrier_height_eV": 0.75, "dielectric_constant": 4.0,
                   "richardson_constant_ratio": 0.5, "thickness_nm": 20.0},
        "device": {"thickness_nm": 20.0, "thickness_sd_nm": 1.0, "area_cm2": 1e-4,
                   "optical_dielectric_constant": 4.0, "optical_dielectric_constant_sd": 0.4},
        "temperatures_K": [250, 275, 300, 325, 350, 375, 400],
        "voltages_V": _bias(0.3, 6.0, 24),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 104,
    },
    {
        "name": "larkfield_polymer_nn_hopping",
        "story": "Doped conjugated-polymer film (80 nm) in a crossbar, activated hopping "
                 "between localised sites, 200-350 K.",
        "mechanism": "nearest_neighbour_hopping",
        "params": {"activation_energy_eV": 0.25, "hopping_distance_nm": 2.0,
                   "prefactor_A_per_cm2": 1.0e2, "thickness_nm": 80.0},
        "device": {"thickness_nm": 80.0, "thickness_sd_nm": 4.0, "area_cm2": 1e-4},
        "temperatures_K": [200, 225, 250, 275, 300, 325, 350],
        "voltages_V": _bias(0.5, 15.0, 22),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 105,
    },
    {
        "name": "larkfield_nanocrystal_mott_vrh",
        "story": "Disordered nanocrystal film between gold fingers, ohmic bias sweep from 20 K "
                 "to 300 K; variable-range hopping expected.",
        "mechanism": "mott_vrh",
        "params": {"characteristic_temperature_K": 2.0e6, "prefactor_S": 1.0e-2},
        "device": {"thickness_nm": 100.0, "area_cm2": 1e-4},
        "temperatures_K": [20, 30, 45, 70, 100, 150, 220, 300],
        "voltages_V": _bias(0.01, 0.2, 12),
        "noise_relative": 0.02, "noise_floor_A": 1e-15, "seed": 106,
    },
    {
        "name": "larkfield_bilayer_mott_vrh_2d",
        "story": "Two-layer film of a disordered layered semiconductor (about 1.5 nm, thinner "
                 "than the hop length) on SiO2, four-probe sweep from 10 K to 200 K.",
        "mechanism": "mott_vrh_2d",
        "params": {"characteristic_temperature_K": 3.0e4, "prefactor_S": 1.0e-3},
        "device": {"thickness_nm": 1.5, "area_cm2": 1e-6},
        "temperatures_K": [10, 15, 22, 33, 50, 75, 110, 150, 200],
        "voltages_V": _bias(0.005, 0.1, 12),
        "noise_relative": 0.02, "noise_floor_A": 1e-15, "seed": 108,
    },
    {
        "name": "larkfield_granular_es_vrh",
        "story": "Granular metal film near its insulating side, measured in a helium cryostat at "
                 "3-60 K; Coulomb-gap hopping expected.",
        "mechanism": "es_vrh",
        "params": {"characteristic_temperature_K": 1.0e3, "prefactor_S": 1.0e-1},
        "device": {"thickness_nm": 50.0, "area_cm2": 1e-4},
        "temperatures_K": [3, 4.5, 7, 10, 15, 25, 40, 60],
        "voltages_V": _bias(0.001, 0.02, 12),
        "noise_relative": 0.02, "noise_floor_A": 1e-15, "seed": 107,
    },
    {
        "name": "larkfield_gan_schottky_diode",
        "story": "Ni dot (0.5 mm) on n-GaN with an ohmic back contact, swept -2 to +1 V at "
                 "200-400 K; a rectifying contact with some series resistance.",
        "mechanism": "schottky_diode",
        "params": {"barrier_height_eV": 0.85, "ideality_factor": 1.08,
                   "richardson_constant_A_cm2_K2": 26.4, "series_resistance_ohm": 15.0,
                   "shunt_resistance_ohm": 5e10},
        "device": {"area_cm2": 2e-3, "richardson_constant_A_cm2_K2": 26.4,
                   "richardson_constant_sd_A_cm2_K2": 5.0},
        "temperatures_K": [200, 250, 300, 350, 400],
        "voltages_V": _sweep(-2.0, 1.0, 31),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 108,
    },
    {
        "name": "larkfield_si_patchy_schottky_diode",
        "story": "Pt on n-Si after a short silicidation anneal (patchy interface), swept -2 to "
                 "+1 V from 80 K to 320 K; barrier inhomogeneity suspected.",
        "mechanism": "inhomogeneous_schottky_diode",
        "params": {"mean_barrier_height_eV": 0.85, "barrier_variance_V2": 0.0064,
                   "voltage_coefficient_rho2": 0.05, "voltage_coefficient_rho3_V": -0.002,
                   "richardson_constant_A_cm2_K2": 112.0, "series_resistance_ohm": 30.0,
                   "shunt_resistance_ohm": 1e10},
        "device": {"area_cm2": 1e-3},
        "temperatures_K": [80, 120, 160, 200, 240, 280, 320],
        "voltages_V": _sweep(-2.0, 1.0, 31),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 109,
    },
    {
        "name": "larkfield_mos2_lateral_schottky_diode",
        "story": "Few-layer MoS2 flake edge-contacted by Au on one side, ohmic on the other, "
                 "swept -2 to +1 V at 100-300 K; thermionic injection into a 2D channel.",
        "mechanism": "lateral_2d_schottky_diode",
        "params": {"barrier_height_eV": 0.35, "ideality_factor": 1.3,
                   "prefactor_A_per_K1_5": 1e-8, "series_resistance_ohm": 1e4,
                   "shunt_resistance_ohm": 1e11},
        "device": {},
        "temperatures_K": [100, 150, 200, 250, 300],
        "voltages_V": _sweep(-2.0, 1.0, 31),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 110,
    },
    {
        "name": "larkfield_zno_ohmic",
        "story": "Lightly doped ZnO film (200 nm) between Al contacts, low-bias sweep on a heated "
                 "stage at 250-400 K; bulk conduction by thermally excited electrons expected.",
        "mechanism": "ohmic_activated",
        "params": {"activation_energy_eV": 0.35, "prefactor_S": 10.0},
        "device": {"thickness_nm": 200.0, "thickness_sd_nm": 10.0, "area_cm2": 1e-4},
        "temperatures_K": [250, 275, 300, 325, 350, 375, 400],
        "voltages_V": _bias(0.01, 0.5, 14),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 109,
    },
    {
        "name": "larkfield_pentacene_sclc",
        "story": "Evaporated organic semiconductor film (300 nm) between gold electrodes (hole "
                 "injection), swept to 30 V at 175-350 K; space-charge-limited current with "
                 "shallow traps expected.",
        "mechanism": "sclc_shallow_traps",
        "params": {"trap_depth_eV": 0.3, "permittivity_mobility_prefactor_cm2_per_Vs": 100.0,
                   "thickness_nm": 300.0},
        "device": {"thickness_nm": 300.0, "thickness_sd_nm": 15.0, "area_cm2": 1e-4},
        "temperatures_K": [175, 200, 225, 250, 275, 300, 325, 350],
        "voltages_V": _bias(0.5, 30.0, 16),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 110,
    },
    {
        "name": "larkfield_polymer_trap_limited_sclc",
        "story": "Spin-coated conjugated-polymer diode (500 nm, ohmic hole contacts), swept to "
                 "30 V at 200-350 K; trap-limited space-charge current from a tail of states.",
        "mechanism": "sclc_exponential_traps",
        "params": {"characteristic_trap_temperature_K": 1500.0, "trap_density_per_cm3": 1e18,
                   "dielectric_constant": 3.5, "mobility_band_density_per_V_s_cm": 1e21,
                   "thickness_nm": 500.0},
        "device": {"thickness_nm": 500.0, "thickness_sd_nm": 20.0, "area_cm2": 1e-4,
                   "semiconductor_dielectric_constant": 3.5,
                   "semiconductor_dielectric_constant_sd": 0.3},
        "temperatures_K": [250, 275, 300, 325, 350, 375, 400],
        "voltages_V": _bias(3.0, 30.0, 16),
        "noise_relative": 0.02, "noise_floor_A": 1e-15, "seed": 111,
    },
    {
        "name": "larkfield_hfo2_trap_assisted_tunnelling",
        "story": "Atomic-layer-deposited HfO2 (8 nm) on TiN, leakage ramp at 250-400 K; "
                 "tunnelling through oxygen-vacancy traps expected.",
        "mechanism": "trap_assisted_tunnelling",
        "params": {"trap_energy_eV": 1.2, "prefactor_A_per_cm2": 1e2, "thickness_nm": 8.0,
                   "effective_mass_ratio": 0.4},
        "device": {"thickness_nm": 8.0, "thickness_sd_nm": 0.3, "area_cm2": 1e-4,
                   "effective_mass_ratio": 0.4, "effective_mass_sd": 0.05},
        "temperatures_K": [250, 300, 350, 400],
        "voltages_V": _bias(3.0, 8.0, 20),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 112,
    },
    {
        "name": "larkfield_pt_alox_al_dissimilar_tunnelling",
        "story": "Al/AlOx/Pt tunnel junction (about 1.6 nm), 10 x 10 um, low-bias sweeps from "
                 "10 K to 300 K; the two electrodes' barriers differ.",
        "mechanism": "dissimilar_electrode_tunnelling",
        "params": {"mean_barrier_eV": 1.9, "barrier_difference_eV": 0.45, "thickness_nm": 1.6,
                   "effective_mass_ratio": 0.6},
        "device": {"thickness_nm": 1.6, "thickness_sd_nm": 0.1, "area_cm2": 1e-6,
                   "effective_mass_ratio": 0.6, "effective_mass_sd": 0.05},
        # Inside the BDR expansion: c2 V^2 <= 0.24 at 0.3 V (limit 0.5).
        "temperatures_K": [10, 77, 150, 225, 300],
        "voltages_V": _sweep(-0.3, 0.3, 31),
        "noise_relative": 0.01, "noise_floor_A": 1e-13, "seed": 111,
    },
    {
        "name": "larkfield_tin_hfo2_pt_schottky_two_barriers",
        "story": "Sputtered HfO2 (20 nm) between TiN and Pt; emission over the barrier of "
                 "whichever electrode injects, 250-400 K.",
        "mechanism": "schottky_emission_two_barriers",
        "params": {"barrier_height_positive_bias_eV": 0.75,
                   "barrier_height_negative_bias_eV": 0.9, "dielectric_constant": 4.0,
                   "richardson_constant_ratio": 0.5, "thickness_nm": 20.0},
        "device": {"thickness_nm": 20.0, "thickness_sd_nm": 1.0, "area_cm2": 1e-4,
                   "optical_dielectric_constant": 4.0, "optical_dielectric_constant_sd": 0.4},
        "temperatures_K": [250, 275, 300, 325, 350, 375, 400],
        "voltages_V": _bias(0.3, 6.0, 24),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 112,
    },
    {
        "name": "larkfield_sio2_fowler_nordheim_two_barriers",
        "story": "Thermal SiO2 (6 nm) between n+ poly-Si and Al; high-field ramps of both "
                 "polarities at four temperatures, each injecting over its own barrier.",
        "mechanism": "fowler_nordheim_two_barriers",
        "params": {"barrier_height_positive_bias_eV": 3.1,
                   "barrier_height_negative_bias_eV": 3.3, "thickness_nm": 6.0,
                   "effective_mass_ratio": 0.45},
        "device": {"thickness_nm": 6.0, "thickness_sd_nm": 0.2, "area_cm2": 1e-4,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05},
        "temperatures_K": [77, 125, 175, 225],
        "voltages_V": _bias(6.0, 9.5, 20),
        "noise_relative": 0.03, "noise_floor_A": 1e-13, "seed": 113,
    },
    # Composites: a path and a leak in parallel, or a path behind a series resistance (each
    # on its main path's grid; the leak or the resistor chosen so that it is seen on the grid).
    {
        "name": "larkfield_sinx_poole_frenkel_leaky_edge",
        "story": "The silicon-nitride film of the Poole-Frenkel series, a second die with a "
                 "damaged mesa edge: an activated leak carries the lowest biases when cold.",
        "mechanism": "poole_frenkel_with_leak",
        "params": {"trap_depth_eV": 1.2, "dielectric_constant": 4.2,
                   "prefactor_S_per_cm": 1.0, "thickness_nm": 30.0,
                   "leak_activation_energy_eV": 0.25, "leak_prefactor_S": 3e-8},
        "device": {"thickness_nm": 30.0, "thickness_sd_nm": 1.0, "area_cm2": 1e-4,
                   "optical_dielectric_constant": 4.0, "optical_dielectric_constant_sd": 0.4},
        "temperatures_K": [300, 325, 350, 375, 400, 425, 450],
        "voltages_V": _bias(3.0, 12.0, 24),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 114,
    },
    {
        "name": "larkfield_hfo2_schottky_leaky",
        "story": "The TiN/HfO2/Pt capacitor of the Schottky series after a soft stress: a weakly "
                 "activated leak (0.1 eV) takes the lowest biases at 250 K.",
        "mechanism": "schottky_emission_with_leak",
        "params": {"barrier_height_eV": 0.75, "dielectric_constant": 4.0,
                   "richardson_constant_ratio": 0.5, "thickness_nm": 20.0,
                   "leak_activation_energy_eV": 0.1, "leak_prefactor_S": 1.5e-8},
        "device": {"thickness_nm": 20.0, "thickness_sd_nm": 1.0, "area_cm2": 1e-4,
                   "optical_dielectric_constant": 4.0, "optical_dielectric_constant_sd": 0.4},
        "temperatures_K": [250, 275, 300, 325, 350, 375, 400],
        "voltages_V": _bias(0.3, 6.0, 24),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 115,
    },
    {
        "name": "larkfield_alox_tunnel_junction_warm_leak",
        "story": "An Al/AlOx/Al junction of the tunnelling series with a pinhole-like activated "
                 "path (0.2 eV) that overtakes tunnelling at low bias near room temperature.",
        "mechanism": "direct_tunnelling_with_leak",
        "params": {"barrier_height_eV": 1.6, "thickness_nm": 1.8, "effective_mass_ratio": 0.45,
                   "leak_activation_energy_eV": 0.2, "leak_prefactor_S": 2.4},
        "device": {"thickness_nm": 1.8, "thickness_sd_nm": 0.15, "area_cm2": 1e-6,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05},
        "temperatures_K": [10, 77, 150, 225, 300],
        "voltages_V": _bias(0.02, 0.8, 25),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 116,
    },
    {
        "name": "larkfield_sio2_fowler_nordheim_contact_resistance",
        "story": "The gate oxide of the Fowler-Nordheim series probed through a resistive "
                 "contact (890 ohm): the top of the ramp bends, 8 % of 9.5 V lost at 225 K.",
        "mechanism": "fowler_nordheim_series_resistance",
        "params": {"barrier_height_eV": 3.1, "thickness_nm": 6.0, "effective_mass_ratio": 0.45,
                   "series_resistance_ohm": 890.0},
        "device": {"thickness_nm": 6.0, "thickness_sd_nm": 0.2, "area_cm2": 1e-4,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05},
        "temperatures_K": [77, 125, 175, 225],
        "voltages_V": _bias(6.0, 9.5, 20),
        "noise_relative": 0.03, "noise_floor_A": 1e-13, "seed": 117,
    },
    {
        "name": "larkfield_sio2_fowler_nordheim_image_rounded",
        "story": "A second thermal SiO2 gate oxide (6 nm) whose Fowler-Nordheim ramp is read "
                 "with the image-force rounding of the barrier (optical permittivity 2.1).",
        "mechanism": "fowler_nordheim_image_force",
        "params": {"barrier_height_eV": 3.0, "thickness_nm": 6.0, "effective_mass_ratio": 0.45,
                   "dielectric_constant": 2.1},
        "device": {"thickness_nm": 6.0, "thickness_sd_nm": 0.2, "area_cm2": 1e-4,
                   "effective_mass_ratio": 0.45, "effective_mass_sd": 0.05,
                   "optical_dielectric_constant": 2.1, "optical_dielectric_constant_sd": 0.2},
        "temperatures_K": [77, 125, 175, 225],
        "voltages_V": _bias(6.0, 9.5, 20),
        "noise_relative": 0.03, "noise_floor_A": 1e-13, "seed": 118,
    },
    {
        "name": "larkfield_anthracene_crystal_trap_filled",
        "story": "Vapour-grown organic single-crystal platelet (1 um) between evaporated gold "
                 "contacts, swept to 60 V at 200-350 K; one deep trap level fills at a few "
                 "volts and the current rises steeply to the trap-free square law.",
        "mechanism": "sclc_single_trap_level",
        "params": {"trap_depth_eV": 0.45, "band_density_per_cm3": 1e20,
                   "trap_density_per_cm3": 5e15, "mobility_cm2_per_Vs": 0.05,
                   "dielectric_constant": 3.0, "thickness_nm": 1000.0},
        "device": {"thickness_nm": 1000.0, "thickness_sd_nm": 50.0, "area_cm2": 1e-4,
                   "semiconductor_dielectric_constant": 3.0,
                   "semiconductor_dielectric_constant_sd": 0.3},
        "temperatures_K": [200, 225, 250, 275, 300, 325, 350],
        "voltages_V": _bias(0.5, 60.0, 20),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 119,
    },
    {
        "name": "larkfield_gaas_heavily_doped_schottky_contact",
        "story": "Ti/Au dot (0.16 mm) on Si-doped n+ GaAs (Hall: about 2e18 cm^-3) with an "
                 "alloyed back contact, swept -2 to +1 V at 80-300 K; the ideality grows on "
                 "cooling, tunnelling through the thin depletion region is suspected.",
        "mechanism": "thermionic_field_diode",
        "params": {"barrier_height_eV": 0.78, "doping_per_cm3": 2e18,
                   "semiconductor_effective_mass_ratio": 0.067, "dielectric_constant": 12.9,
                   "richardson_constant_A_cm2_K2": 8.2, "series_resistance_ohm": 20.0,
                   "shunt_resistance_ohm": 1e9},
        "device": {"area_cm2": 2e-4, "doping_cm3": 2e18, "doping_sd_cm3": 4e17,
                   "semiconductor_dielectric_constant": 12.9,
                   "semiconductor_dielectric_constant_sd": 0.3,
                   "semiconductor_effective_mass_ratio": 0.067,
                   "semiconductor_effective_mass_sd": 0.004},
        "temperatures_K": [80, 135, 190, 245, 300],
        "voltages_V": _sweep(-2.0, 1.0, 31),
        "noise_relative": 0.02, "noise_floor_A": 1e-13, "seed": 121,
    },
    {
        "name": "larkfield_anthracene_crystal_trap_filled_ohmic",
        "story": "A second platelet of the trap-filled crystal, less pure: thermally excited "
                 "carriers give an ohmic current that carries the lowest biases.",
        "mechanism": "sclc_single_trap_level_with_leak",
        "params": {"trap_depth_eV": 0.45, "band_density_per_cm3": 1e20,
                   "trap_density_per_cm3": 5e15, "mobility_cm2_per_Vs": 0.05,
                   "dielectric_constant": 3.0, "thickness_nm": 1000.0,
                   "leak_activation_energy_eV": 0.3, "leak_prefactor_S": 1e-3},
        "device": {"thickness_nm": 1000.0, "thickness_sd_nm": 50.0, "area_cm2": 1e-4,
                   "semiconductor_dielectric_constant": 3.0,
                   "semiconductor_dielectric_constant_sd": 0.3},
        "temperatures_K": [200, 225, 250, 275, 300, 325, 350],
        "voltages_V": _bias(0.5, 60.0, 20),
        "noise_relative": 0.02, "noise_floor_A": 1e-14, "seed": 120,
    },
]


def _toml(values: dict) -> str:
    lines = []
    for key, value in values.items():
        lines.append(f'{key} = "{value}"' if isinstance(value, str) else f"{key} = {value!r}")
    return "\n".join(lines) + "\n"


def generate(scenario: dict, force: bool) -> Path:
    """Write one scenario's folder and return it."""
    folder = HERE / scenario["name"]
    folder.mkdir(exist_ok=True)
    mechanism = get_mechanism(scenario["mechanism"])
    device_values = {"name": scenario["story"].split(";")[0], **scenario["device"]}
    device = device_from_values(**device_values)
    rng = np.random.default_rng(scenario["seed"])
    sim = simulate_series(mechanism, scenario["params"], scenario["temperatures_K"],
                          scenario["voltages_V"], device,
                          noise_relative=scenario["noise_relative"],
                          noise_floor_A=scenario["noise_floor_A"], rng=rng)
    write_series_csv(sim, folder / "data.csv", overwrite=force,
                     comment=f"invented reference series '{scenario['name']}' "
                             "(mechid reference_curves/generate.py); true values in truth.json")
    (folder / "device.toml").write_text(_toml(device_values), encoding="utf-8")
    truth = {key: scenario[key] for key in
             ("name", "story", "mechanism", "params", "device", "temperatures_K", "voltages_V",
              "noise_relative", "noise_floor_A", "seed")}
    truth["generated_by"] = "reference_curves/generate.py with mechid.simulate.simulate_series"
    (folder / "truth.json").write_text(json.dumps(truth, indent=2) + "\n", encoding="utf-8")
    return folder


def main(argv: list[str]) -> int:
    """Regenerate all scenarios; copy the first into the package as the demo series."""
    force = "--force" in argv
    folders = [generate(s, force) for s in SCENARIOS]
    DEMO_DIR.mkdir(exist_ok=True)
    for name in ("data.csv", "device.toml", "truth.json"):
        shutil.copyfile(folders[0] / name, DEMO_DIR / name)
    for folder in folders:
        print(f"wrote {folder.relative_to(HERE.parent)}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))

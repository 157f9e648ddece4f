#!/usr/bin/env python3
"""Writes the invented measured curves of examples/three-tandems.yaml.

These are made-up smooth shapes for a demonstration, not measurements of any
device: a textured silicon wafer's absorptance and a CIGS film's absorptance
(both as isolated films, fraction 0-1, over wavelength in nm).

Run from this folder:  python3 make-data.py
"""
import math


def write(name, header, rows):
    with open(name, "w") as fh:
        fh.write("# INVENTED demonstration data (see README.md); not a measurement\n")
        fh.write(header + "\n")
        for lam, a in rows:
            fh.write(f"{lam:.0f},{a:.4f}\n")


def sigmoid(x):
    return 1.0 / (1.0 + math.exp(-x))


HC = 1239.841984
# Silicon wafer with texture: edge near 1.12 eV (1107 nm), plateau 0.93, soft indirect tail.
si = []
for lam in range(300, 1201, 10):
    e = HC / lam
    a = 0.93 * sigmoid((e - 1.16) / 0.035) * (1 - 0.25 * math.exp(-(lam - 300) / 60))
    si.append((lam, max(0.0, a)))
write("silicon-absorptance.csv", "wavelength_nm,absorptance", si)

# CIGS film about 2 um thick, gap near 1.10 eV (1127 nm), plateau 0.90.
cigs = []
for lam in range(300, 1251, 10):
    e = HC / lam
    a = 0.90 * sigmoid((e - 1.12) / 0.02) * (1 - 0.3 * math.exp(-(lam - 300) / 80))
    cigs.append((lam, max(0.0, a)))
write("cigs-absorptance.csv", "wavelength_nm,absorptance", cigs)

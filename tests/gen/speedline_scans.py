#!/usr/bin/env python3
"""Invented compressor-rig scans along one speed line, for the demo sheet
sheets/compressor-speedline.ron. Not data from any real rig.

The "true" state of each scan comes from known component figures: a speed
line at 11000 rpm whose pressure ratio and isentropic efficiency vary with
mass flow as simple invented curves. Exit total temperature follows from the
calorically perfect relation (gamma 1.4, as the sheet uses):
    Tt2 = Tt1 (1 + (PR^((gamma-1)/gamma) - 1) / eta)
Each channel then gets Gaussian noise with the random standard uncertainty
the sheet's channel map states (per probe scaled by sqrt(number of probes),
so that the averaged channel has the stated uncertainty). No systematic
offset is added. The true efficiency is written in the ETA_TRUE column,
which the channel map ignores.

Run: python3 tests/gen/speedline_scans.py > sheets/compressor-speedline-scans.csv
Deterministic (fixed seed), standard library only.
"""
import math
import random

GAMMA = 1.4
PSI = 6894.757293168361  # Pa per psi (lbf/in2)
INHG = 3386.38864        # Pa per inHg at 32 degF (13595.1 kg/m3 x 9.80665 x 0.0254)
LBM = 0.45359237         # kg per lbm

def f_to_k(f):
    return (f - 32.0) * 5.0 / 9.0 + 273.15

def k_to_f(k):
    return (k - 273.15) * 9.0 / 5.0 + 32.0

# Random standard uncertainties of the averaged channels (as in the sheet).
R_BARO = 0.003       # inHg
R_T1 = 0.2           # degF (2 probes)
R_P1 = 0.01          # psi (3 probes)
R_W = 0.002          # fraction of reading
R_N = 0.0002         # fraction of reading
R_P2 = 0.02          # psi (4 probes)
R_T2 = 0.5           # degF (4 probes)
W2 = [0.2, 0.3, 0.3, 0.2]  # exit rake area weights

def main():
    rnd = random.Random(20261201)
    n = 300
    cols = ["SCAN", "TIME_S", "BARO", "T1A", "T1B", "P1A", "P1B", "P1C", "W", "N",
            "P2A", "P2B", "P2C", "P2D", "T2A", "T2B", "T2C", "T2D", "ETA_TRUE", "PR_TRUE"]
    print(",".join(cols))
    for i in range(n):
        x = i / (n - 1)
        w_lbm = 24.0 + 4.0 * x                       # lbm/s along the line
        pr = 4.4 - 0.9 * x ** 2                      # choke side drops
        eta = 0.86 - 0.03 * ((x - 0.45) / 0.55) ** 2
        baro = 29.90 + 0.02 * math.sin(3 * x)        # inHg
        t1_f = 59.0 + 1.5 * x                        # degF
        p1_g = -0.12 - 0.06 * x                      # psig (inlet depression)
        n_rpm = 11000.0
        pt1 = baro * INHG + p1_g * PSI
        tt1 = f_to_k(t1_f)
        tt2 = tt1 * (1.0 + (pr ** ((GAMMA - 1.0) / GAMMA) - 1.0) / eta)
        pt2 = pr * pt1
        p2_g = (pt2 - baro * INHG) / PSI
        t2_f = k_to_f(tt2)
        g = rnd.gauss
        row = [
            str(i + 1),
            f"{10.0 * i:.1f}",
            f"{baro + g(0, R_BARO):.6f}",
        ]
        row += [f"{t1_f + g(0, R_T1 * math.sqrt(2)):.6f}" for _ in range(2)]
        row += [f"{p1_g + g(0, R_P1 * math.sqrt(3)):.6f}" for _ in range(3)]
        row += [f"{w_lbm * (1 + g(0, R_W)):.6f}", f"{n_rpm * (1 + g(0, R_N)):.4f}"]
        # Area-weighted exit rake: noise per probe so that the weighted mean
        # has the stated random uncertainty.
        s2 = R_P2 / math.sqrt(sum(w * w for w in W2))
        row += [f"{p2_g + g(0, s2):.6f}" for _ in W2]
        row += [f"{t2_f + g(0, R_T2 * 2.0):.6f}" for _ in range(4)]
        row += [f"{eta:.10f}", f"{pr:.10f}"]
        print(",".join(row))

if __name__ == "__main__":
    main()

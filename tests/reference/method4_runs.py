"""Expected values for tests/reference.rs `per_run_method4_three_run_test`: a three-run EPA
Method 2 test (English units) whose runs each carry their own barometric pressure, static
pressure, composition and Method 4 train.

An independent implementation of the published equations with their printed constants:
Method 4 eqs. 4-1 to 4-4 (K1 0.04706 ft3/mL, K2 0.04715 ft3/g, K3 17.64 R/inHg, Tm = F + 460,
Pm = Pbar + dH/13.6), Method 3 Md = 0.44 %CO2 + 0.32 %O2 + 0.28 (%N2 + %CO), Method 2
eqs. 2-6 to 2-10 (Kp 85.49, Ts = F + 460, Ps = Pbar + Pg/13.6, Tstd 528 R, Pstd 29.92 inHg,
Ms = Md (1 - Bws) + 18.0 Bws). Plain Python, no project code.

Run: python3 tests/reference/method4_runs.py
"""
import math

DP = [0.50, 0.55, 0.60, 0.62, 0.58, 0.52, 0.48, 0.54, 0.61, 0.63, 0.57, 0.51]
T_F = [300, 302, 305, 306, 304, 301, 299, 303, 305, 307, 304, 300]
D_FT = 5.0
CP = 0.84

RUNS = [
    # id, Pbar inHg, Pg inH2O, O2 %, CO2 %, impinger (mL or g), silica g, Vm dcf, Y, dH inH2O, Tm F
    ("1", 29.50, -0.50, 8.0, 10.0, 152.3, 18.7, 34.215, 0.987, 1.85, 84.0),
    ("2", 29.46, -0.50, 8.0, 10.0, 140.0, 15.2, 33.870, 0.987, 1.80, 88.0),
    ("3", 29.48, -0.55, 7.6, 10.4, 161.5, 20.1, 35.012, 0.987, 1.90, 90.0),
]

sqrt_dp = sum(math.sqrt(d) for d in DP) / len(DP)
ts = sum(t + 460.0 for t in T_F) / len(T_F)
area = math.pi * D_FT**2 / 4
for rid, pbar, pg, o2, co2, imp, sg, vm, y, dh, tm_f in RUNS:
    vwc = 0.04706 * imp
    vwsg = 0.04715 * sg
    pm = pbar + dh / 13.6
    tm = tm_f + 460.0
    vm_std = 17.64 * y * vm * pm / tm
    bws = (vwc + vwsg) / (vwc + vwsg + vm_std)
    md = 0.44 * co2 + 0.32 * o2 + 0.28 * (100.0 - o2 - co2)
    ms = md * (1 - bws) + 18.0 * bws
    ps = pbar + pg / 13.6
    vs = 85.49 * CP * sqrt_dp * math.sqrt(ts / (ps * ms))
    qsd_h = 3600 * (1 - bws) * vs * area * (528.0 / ts) * (ps / 29.92)
    print(
        f"run {rid}: Vwc {vwc:.6f} Vwsg {vwsg:.6f} Pm {pm:.6f} Vm(std) {vm_std:.6f} "
        f"Bws {bws:.7f} Md {md:.4f} Ms {ms:.6f} Ps {ps:.6f} vs {vs:.6f} ft/s "
        f"Qsd {qsd_h / 60:.3f} dscfm"
    )

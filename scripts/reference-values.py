#!/usr/bin/env python3
# Generates the independent reference values pasted into test/references.*.test.ts, from mpmath
# (F. Johansson et al., mpmath: a Python library for arbitrary-precision floating-point arithmetic, 1.3.0),
# at 30 significant digits. Run: python3 scripts/reference-values.py > /tmp/values.txt
import mpmath as mp

mp.mp.dps = 30


def w(z):
    """Faddeeva function e^{-z^2} erfc(-iz) (A&S 7.1.3)."""
    z = mp.mpc(z)
    return mp.exp(-z * z) * mp.erfc(-1j * z)


def fmt(x):
    return mp.nstr(x, 17, min_fixed=-3, max_fixed=3)


def cplx(z):
    z = mp.mpc(z)
    return f"[{fmt(z.real)}, {fmt(z.imag)}]"


print("// faddeeva grid: [x, y, Re w, Im w]")
for x in ["0", "0.3", "1", "1.7", "3", "4.5", "6", "7.9", "8.1", "20", "1e3"]:
    for y in ["0", "1e-6", "0.05", "0.7", "2.2", "4.9", "12", "50"]:
        v = w(mp.mpc(mp.mpf(x), mp.mpf(y)))
        print(f"  [{x}, {y}, {fmt(v.real)}, {fmt(v.imag)}],")

print("// faddeeva lower half-plane: [x, y, Re w, Im w]")
for x, y in [("0.5", "-0.5"), ("2", "-1"), ("-3", "-0.2"), ("5", "-0.1"), ("1", "-3"), ("-0.3", "-2")]:
    v = w(mp.mpc(mp.mpf(x), mp.mpf(y)))
    print(f"  [{x}, {y}, {fmt(v.real)}, {fmt(v.imag)}],")

print("// dawson: [x, D(x)]")
for x in ["0.5", "0.9241388730", "1", "2", "5", "10"]:
    xx = mp.mpf(x)
    print(f"  [{x}, {fmt(mp.sqrt(mp.pi) / 2 * mp.exp(-xx * xx) * mp.erfi(xx))}],")

print("// complex erfc: [x, y, Re, Im]")
for x, y in [("1", "1"), ("-1", "0.5"), ("0.2", "-3"), ("3", "2"), ("10", "0.5")]:
    v = mp.erfc(mp.mpc(mp.mpf(x), mp.mpf(y)))
    print(f"  [{x}, {y}, {fmt(v.real)}, {fmt(v.imag)}],")


def norton_f(W):
    """F(w) = 1 - j sqrt(pi w) e^{-w} erfc(j sqrt w), principal sqrt."""
    W = mp.mpc(W)
    return 1 - 1j * mp.sqrt(mp.pi * W) * mp.exp(-W) * mp.erfc(1j * mp.sqrt(W))


print("// norton F: [Re w, Im w, Re F, Im F]")
for W in [0.001, 0.1, 1, 3, 10, 100, 1000, 10 * mp.exp(-1j * mp.pi / 4), 5 * mp.exp(-1j * mp.pi / 3), 50 * mp.exp(-1j * mp.pi / 2.2)]:
    W = mp.mpc(W)
    print(f"  [{fmt(W.real)}, {fmt(W.imag)}, {cplx(norton_f(W))[1:-1]}],")

print("// bessel: [x, J0, J1, Y0, Y1]")
for x in ["1e-3", "0.1", "1", "2.5", "5", "8", "12", "17.5", "24.9", "25.1", "40", "100", "1000"]:
    xx = mp.mpf(x)
    print(f"  [{x}, {fmt(mp.besselj(0, xx))}, {fmt(mp.besselj(1, xx))}, {fmt(mp.bessely(0, xx))}, {fmt(mp.bessely(1, xx))}],")

print("// norton case 100 kHz, 5e-4 S/m, eps_r 10, 100 km: [Re F, Im F] grazing, then surface-impedance")
C0 = mp.mpf(299792458)
MU0 = 4e-7 * mp.pi
EPS0 = 1 / (MU0 * C0 ** 2)
f, s, er, d = mp.mpf(100e3), mp.mpf(5e-4), mp.mpf(10), mp.mpf(100e3)
epsc = er - 1j * s / (2 * mp.pi * f * EPS0)
k = 2 * mp.pi * f / C0
for D in [mp.sqrt(epsc - 1) / epsc, 1 / mp.sqrt(epsc)]:
    W = -1j * k * d * D ** 2 / 2
    print(f"  {cplx(norton_f(W))[1:-1]}, // w = {cplx(W)}")

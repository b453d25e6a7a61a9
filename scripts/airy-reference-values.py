#!/usr/bin/env python3
# Generates the independent reference values pasted into test/references.airy.test.ts and
# test/references.spherical-earth.test.ts, from mpmath (F. Johansson et al., mpmath: a Python library for
# arbitrary-precision floating-point arithmetic, 1.3.0) at 30 significant digits: its own Airy functions and zeros,
# and the roots of Fock's modal equation found here by mpmath's findroot with w2 = sqrt(pi)(Bi - i Ai) written
# directly (not through the rotation identity that solver/references/airy.ts uses).
# Run: python3 scripts/airy-reference-values.py > /tmp/airy-values.txt
import mpmath as mp

mp.mp.dps = 30


def fmt(x):
    return mp.nstr(x, 17, min_fixed=-3, max_fixed=3)


def cplx(z):
    z = mp.mpc(z)
    return f"{fmt(z.real)}, {fmt(z.imag)}"


print("// airy: [x, y, Ai, Ai', Bi, Bi' as re, im pairs]; z is the double nearest r*exp(i*phi)")
for r, phis in [
    ("0.3", ["0", "2.1", "-2.8"]),
    ("1.2", ["0.4", "-1.5", "3.14159"]),
    ("1.7", ["0", "1.0", "-2.5"]),
    ("3", ["0.3", "-1.2", "2.2", "3.0"]),
    ("5", ["0", "1.0472", "-2.0", "2.9"]),
    ("8.5", ["0.2", "-1.8", "2.7"]),
    ("9.5", ["-0.2", "1.5", "-2.6"]),
    ("15", ["0.5", "-2.2", "3.1"]),
    ("30", ["0.1", "-1.9", "-3.0"]),
    ("40", ["-0.05", "2.0", "-3.14159"]),
]:
    for phi in phis:
        z0 = complex(mp.mpf(r) * mp.exp(1j * mp.mpf(phi)))
        z = mp.mpc(z0.real, z0.imag)
        vals = [mp.airyai(z), mp.airyai(z, derivative=1), mp.airybi(z), mp.airybi(z, derivative=1)]
        print(f"  [{fmt(z.real)}, {fmt(z.imag)}, " + ", ".join(cplx(v) for v in vals) + "],")

print("// zeros: [s, a_s, a'_s]")
for s in [1, 2, 3, 4, 10, 50, 100]:
    print(f"  [{s}, {fmt(mp.airyaizero(s))}, {fmt(mp.airyaizero(s, derivative=1))}],")


def w2(t):
    return mp.sqrt(mp.pi) * (mp.airybi(t) - 1j * mp.airyai(t))


def w2p(t):
    return mp.sqrt(mp.pi) * (mp.airybi(t, derivative=1) - 1j * mp.airyai(t, derivative=1))


def roots(q, count, steps=40):
    """Roots of w2'(t) - q w2(t) = 0 followed from the zeros of Ai' (q = 0) along p*q, p in [0, 1]."""
    out = []
    for s in range(1, count + 1):
        t = -mp.airyaizero(s, derivative=1) * mp.exp(-1j * mp.pi / 3)
        for k in range(1, steps + 1):
            qk = q * k / steps
            t = mp.findroot(lambda u: w2p(u) - qk * w2(u), t)
        out.append(t)
    return out


C0 = mp.mpf(299792458)
MU0 = 4e-7 * mp.pi
EPS0 = 1 / (MU0 * C0 ** 2)


def case_q(f, sigma, eps_r, a):
    """q = -i m Delta, m = (ka/2)^(1/3), Delta = sqrt(eps_c - 1)/eps_c (grazing form of norton.ts)."""
    f, sigma, eps_r, a = mp.mpf(f), mp.mpf(sigma), mp.mpf(eps_r), mp.mpf(a)
    epsc = eps_r - 1j * sigma / (2 * mp.pi * f * EPS0)
    delta = mp.sqrt(epsc - 1) / epsc
    m = mp.cbrt(2 * mp.pi * f / C0 * a / 2)
    return -1j * m * delta, m


def attenuation(x, q, rts):
    return mp.exp(-1j * mp.pi / 4) * mp.sqrt(mp.pi * x) * sum(mp.exp(-1j * x * t) / (t - q * q) for t in rts)


print("// residue roots and W(x, q): q as re, im; then the first 8 roots; then W at x = 1.5 and 4 with 60 roots")
for label, q in [
    ("200 kHz, 3e-3 S/m, eps_r 15, a = 6371009 m", case_q(200e3, 3e-3, 15, 6371009)[0]),
    ("q = 5 exp(-3i pi/8)", 5 * mp.exp(-3j * mp.pi / 8)),
]:
    rts = roots(q, 60)
    print(f"// {label}: q = {cplx(q)}")
    for t in rts[:8]:
        print(f"  [{cplx(t)}],")
    for x in ["1.5", "4"]:
        print(f"  // W({x}) = {cplx(attenuation(mp.mpf(x), q, rts))}")

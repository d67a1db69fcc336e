"""Independent reference for tests/unit/rcwa.test.ts: a small RCWA of one rectangular pillar layer in numpy.

Same physics as shared/optics/rcwa.ts (Fourier modal method at normal incidence, Li's factorization rules for
crossed gratings, JOSA A 14, 2758 (1997)), but written separately: numpy/LAPACK for the eigenproblem, Kronecker
products for the permittivity matrices, and a different way of joining the layers (the whole boundary-value
problem r, c+, c-, t solved at once as one linear system) instead of enhanced transmittance matrices.

stdin: JSON {period, lambda, harmonics, eps_bg, eps_pillar: [re, im], width, length, height, n_in, n_out}
stdout: JSON {txx, tyx, txy, tyy, rxx: [re, im]} zeroth-order field ratios (not power-normalized).
"""
import json
import sys

import numpy as np

d = json.load(sys.stdin)
P, lam, N = d["period"], d["lambda"], d["harmonics"]
eb = complex(d["eps_bg"])
ep = complex(*d["eps_pillar"])
w, l, h = d["width"], d["length"], d["height"]
n_in, n_out = d["n_in"], d["n_out"]
M = N * N
orders = np.arange(N) - (N - 1) // 2
my, mx = np.meshgrid(orders, orders, indexing="ij")  # index = ix + N*iy
kx = (mx.flatten() * lam / P).astype(complex)
ky = (my.flatten() * lam / P).astype(complex)
Kx, Ky = np.diag(kx), np.diag(ky)
I, IM = np.eye(N), np.eye(M)


def interval(a, b):
    q = (orders[:, None] - orders[None, :]).astype(float)
    out = np.full(q.shape, (b - a) / P, dtype=complex)
    nz = q != 0
    out[nz] = (np.exp(-2j * np.pi * q[nz] * b / P) - np.exp(-2j * np.pi * q[nz] * a / P)) / (-2j * np.pi * q[nz])
    return out


cx, cy = interval(-w / 2, w / 2), interval(-l / 2, l / 2)
Ezz = eb * IM + (ep - eb) * np.kron(cy, cx)
A = np.linalg.inv(I / eb + (1 / ep - 1 / eb) * cx)
Exx = eb * IM + np.kron(cy, A - eb * I)
B = np.linalg.inv(I / eb + (1 / ep - 1 / eb) * cy)
Eyy = eb * IM + np.kron(B - eb * I, cx)
Ezi = np.linalg.inv(Ezz)
Pm = np.block([[Kx @ Ezi @ Ky, IM - Kx @ Ezi @ Kx], [Ky @ Ezi @ Ky - IM, -Ky @ Ezi @ Kx]])
Qm = np.block([[Kx @ Ky, Eyy - Kx @ Kx], [Ky @ Ky - Exx, -Ky @ Kx]])
mu, W = np.linalg.eig(Pm @ Qm)
kz = np.sqrt(-mu + 0j)
kz = np.where(kz.imag < -1e-10 * np.abs(kz), -kz, kz)
V = Qm @ W @ np.diag(-1j / kz)
X = np.diag(np.exp(1j * kz * 2 * np.pi / lam * h))


def half_space(n):
    e = n * n
    kzh = np.sqrt(e - kx * kx - ky * ky + 0j)
    kzh = np.where(kzh.imag < 0, -kzh, kzh)
    Q = np.block([[Kx @ Ky, e * IM - Kx @ Kx], [Ky @ Ky - e * IM, -Ky @ Kx]])
    return Q @ np.diag(np.concatenate([-1j / kzh, -1j / kzh]))


Vi, Vo = half_space(n_in), half_space(n_out)
I2, Z2 = np.eye(2 * M), np.zeros((2 * M, 2 * M))
# Unknowns [r, c+, c-, t]; top: s + r = W(c+ + X c-), Vi(s - r) = V(c+ - X c-); bottom: W(X c+ + c-) = t, V(X c+ - c-) = Vo t.
S = np.block([
    [I2, -W, -W @ X, Z2],
    [-Vi, -V, V @ X, Z2],
    [Z2, W @ X, W, -I2],
    [Z2, V @ X, -V, -Vo],
])
zero = (N - 1) // 2 * (N + 1)
out = {}
for pol, col in (("x", zero), ("y", zero + M)):
    s = np.zeros(2 * M, dtype=complex)
    s[col] = 1
    rhs = np.concatenate([-s, -Vi @ s, np.zeros(4 * M)])
    sol = np.linalg.solve(S, rhs)
    r, t = sol[: 2 * M], sol[6 * M:]
    out["t" + "x" + pol] = [t[zero].real, t[zero].imag]
    out["t" + "y" + pol] = [t[zero + M].real, t[zero + M].imag]
    out["r" + "x" + pol] = [r[zero].real, r[zero].imag]
print(json.dumps(out))

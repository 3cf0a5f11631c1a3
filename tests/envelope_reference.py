#!/usr/bin/env python3
"""Reference optimum of the side-lobe envelope problem (engine/synthesis/envelope.h),
solved as the second-order cone program it is, with exact |.|, by cvxopt
(python3-cvxopt, a general-purpose convex solver; Andersen, Dahl and Vandenberghe).

Input file (whitespace-separated numbers): N S K; the beam row f (N complex as re im);
S samples, each its E_theta row then its E_phi row; K nulls likewise; S mask levels (dB).
Variables x = [Re I, Im I, t]: minimize t subject to
||(E_theta I, E_phi I)|| <= 10^(m_i/20) t, Re f I = 1, Im f I = 0, null rows I = 0.
Prints 20 log10 t (dB): the lowest highest side lobe (or mask margin) re the beam.
"""
import math
import sys

import numpy as np
from cvxopt import matrix, solvers


def main():
    vals = np.array(open(sys.argv[1]).read().split(), dtype=float)
    n, s, k = (int(v) for v in vals[:3])
    pos = 3

    def take_row():
        nonlocal pos
        r = vals[pos:pos + 2 * n]
        pos += 2 * n
        return r[0::2] + 1j * r[1::2]

    f = take_row()
    samples = [(take_row(), take_row()) for _ in range(s)]
    nulls = [(take_row(), take_row()) for _ in range(k)]
    mask = vals[pos:pos + s]
    assert len(mask) == s and pos + s == len(vals)

    def real_rows(a):  # Re(a I) and Im(a I) as rows over x = [u, v, t]
        re = np.concatenate([a.real, -a.imag, [0.0]])
        im = np.concatenate([a.imag, a.real, [0.0]])
        return re, im

    scale = np.abs(f).max()
    c = matrix(np.concatenate([np.zeros(2 * n), [1.0]]))
    gq, hq = [], []
    for (at, ap), m in zip(samples, mask):
        rows = [np.concatenate([np.zeros(2 * n), [-10 ** (m / 20)]])]
        for a in (at, ap):
            if np.abs(a).max() > 1e-12 * scale:
                rows.extend(-r / scale for r in real_rows(a))
        g = np.array(rows)
        gq.append(matrix(g))
        hq.append(matrix(np.zeros(g.shape[0])))
    eq = list(real_rows(f / scale))
    b = [1.0, 0.0]
    for at, ap in nulls:
        for a in (at, ap):
            if np.abs(a).max() > 1e-12 * scale:
                eq.extend(real_rows(a / scale))
                b.extend([0.0, 0.0])
    # cvxopt needs independent equality rows (parallel elements give proportional
    # E_theta and E_phi rows at a null): keep an orthonormal basis of the row space.
    eq, b = np.array(eq), np.array(b)
    u, sv, vt = np.linalg.svd(eq, full_matrices=False)
    r = int(np.sum(sv > 1e-10 * sv[0]))
    eq, b = vt[:r], (u[:, :r].T @ b) / sv[:r]
    solvers.options.update(show_progress=False, abstol=1e-10, reltol=1e-9, feastol=1e-10,
                           maxiters=200)
    sol = solvers.socp(c, Gq=gq, hq=hq, A=matrix(eq), b=matrix(b))
    if sol['status'] != 'optimal':
        sys.exit('cvxopt: ' + sol['status'])
    t = sol['x'][2 * n]
    print(repr(20 * math.log10(t)))


if __name__ == '__main__':
    main()

# lwzoh.py — the zero-order-hold loop in mpmath, by partial fractions (independent of the
# state-space and aliasing-sum evaluations the CLI uses).
#
# For P(s) = k·∏(s − zᵢ)/∏(s − pᵢ) with distinct poles, strictly proper:
#   P(s) = Σ rᵢ/(s − pᵢ),   rᵢ = k·∏(pᵢ − zⱼ)/∏_{j≠i}(pᵢ − pⱼ).
# The ZOH with an input delay τ = d·T + θ (0 ≤ θ < T): the pulse u = 1 on [θ, T + θ) through
# 1/(s − p) sampled at kT (the modified z-transform, derived from the pulse response
# g(T) = (e^{p(T−θ)} − 1)/p, g(kT) = e^{p(kT−θ)}(1 − e^{−pT})/p for k ≥ 2):
#   H_p(z) = (e^{p(T−θ)} − 1)/(p z) + e^{p(T−θ)}(e^{pT} − 1)/(p z (z − e^{pT}))
# which is (e^{pT} − 1)/(p (z − e^{pT})) for θ = 0, with the limits T − θ and T for p = 0.
# The whole samples d add z^{−d}. Clustered poles make the residues large and cancelling, so
# the working precision is raised with the digits they cost (digits_needed) and the value is
# checked against a second evaluation 20 digits higher (agree()).
#
# SPDX-License-Identifier: GPL-3.0-or-later

import mpmath as mp


class ZohLoop:
    """L(e^{jωT}) = z^{−(N + d)}·C·H(z) for a factored plant and a constant controller gain."""

    def __init__(self, gain, zeros, poles, T, dead_time="0", compute_delay=1, ctrl_gain="1",
                 dps=50, ctrl_w=None):
        # ctrl_w: optional (gain, zeros, poles) of a controller in w = (2/T)(z − 1)/(z + 1)
        self.src = (gain, zeros, poles, T, dead_time, compute_delay, ctrl_gain)
        self.ctrl_w = ctrl_w
        self.base_dps = dps
        with mp.workdps(dps + 40):
            p = [mp.mpc(x) for x in poles]
            sep = min((abs(a - b) / max(abs(a), abs(b), mp.mpf(1) / mp.mpf(T))
                       for i, a in enumerate(p) for b in p[i + 1:]), default=mp.mpf(1))
        # digits lost to cancelling residues: about (order − 1)·log10(1/separation)
        loss = int(max(0, (len(poles) - 1) * float(-mp.log10(sep)))) if sep > 0 else 0
        self.dps = dps + loss + 10
        self._build()

    def _build(self):
        gain, zeros, poles, T, dead_time, compute_delay, ctrl_gain = self.src
        with mp.workdps(self.dps):
            self.T = mp.mpf(T)
            tau = mp.mpf(dead_time)
            ratio = tau / self.T
            d = int(mp.floor(ratio))
            frac = ratio - d
            # the CLI counts a ratio within 1e-9 of an integer as whole (docs/conventions.md)
            if frac > 1 - mp.mpf("1e-9"):
                d, frac = d + 1, mp.mpf(0)
            elif frac < mp.mpf("1e-9"):
                frac = mp.mpf(0)
            self.d = d
            self.theta = frac * self.T
            self.N = int(compute_delay)
            self.k = mp.mpf(gain) * mp.mpf(ctrl_gain)
            self.z = [mp.mpc(x) for x in zeros]
            self.p = [mp.mpc(x) for x in poles]
            self.terms = []
            th, T = self.theta, self.T
            for i, pi in enumerate(self.p):
                r = self.k
                for zj in self.z:
                    r *= pi - zj
                for j, pj in enumerate(self.p):
                    if j != i:
                        r /= pi - pj
                a = mp.exp(pi * T)
                if pi == 0:
                    c1, c2 = T - th, T
                else:
                    c1 = (mp.exp(pi * (T - th)) - 1) / pi
                    c2 = mp.exp(pi * (T - th)) * (a - 1) / pi
                self.terms.append((r, a, c1, c2))

    def core(self, omega):
        """H(z) (with the fraction θ, without z^−d) at z = e^{jωT}."""
        with mp.workdps(self.dps):
            z = mp.exp(mp.mpc(0, 1) * mp.mpf(omega) * self.T)
            if self.theta == 0:
                return sum(r * c2 / (a * (z - a)) for r, a, c1, c2 in self.terms)
            return sum(r * (c1 / z + c2 / (z * (z - a))) for r, a, c1, c2 in self.terms)

    def ctrl(self, z):
        if self.ctrl_w is None:
            return 1
        g, zs, ps = self.ctrl_w
        w = (2 / self.T) * (z - 1) / (z + 1)
        c = mp.mpf(g)
        for x in zs:
            c *= w - mp.mpf(x)
        for x in ps:
            c /= w - mp.mpf(x)
        return c

    def L(self, omega):
        with mp.workdps(self.dps):
            omega = mp.mpf(omega)
            z = mp.exp(mp.mpc(0, 1) * omega * self.T)
            return self.core(omega) * self.ctrl(z) * z ** (-(self.N + self.d))

    def agree(self, omega):
        """Relative difference between this evaluation and one 20 digits higher."""
        hi = ZohLoop.__new__(ZohLoop)
        hi.src, hi.base_dps, hi.dps = self.src, self.base_dps, self.dps + 20
        hi.ctrl_w = self.ctrl_w
        hi._build()
        with mp.workdps(hi.dps):
            a, b = self.L(omega), hi.L(omega)
            return abs(a - b) / abs(b) if b != 0 else abs(a)

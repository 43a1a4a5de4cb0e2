"""Fugacity-corrected equilibrium: the composition and φ(T, P, y) solved together.

With a non-ideal gas each reaction satisfies Σ_i ν_ji ln(y_i φ_i P/p°) = ln K_j, and the
fugacity coefficients φ_i depend on the composition y that the equilibrium fixes. This
module couples the extent solver (which takes ln φ fixed per point) with the vectorized
cubic equations of state of :mod:`eqconv.eos` by an outer iteration over the whole grid:

1. solve at fixed ln φ (ideal gas, ln φ = 0, at the start), deciding condensed phases
   (:func:`eqconv.condensed.solve_phases`);
2. evaluate ln φ(T, P, y) of the gas species at the new composition, every point at once;
3. a point is done when the equilibrium conditions hold with the φ of its *final*
   composition: |ln Q − ln K| ≤ tol of every reaction at equilibrium (and ln a* ≤ tol of
   every absent condensed species); otherwise go to 1 with updated φ, only for the points
   still open.

Only the combinations c_j = Σ_i ν_ji ln φ_i enter the equilibrium conditions, so the fixed
point is sought in c (nr values per point): successive substitution c ← G(c) accelerated by
one-step Anderson mixing (for one reaction the secant method), c ← G_k − γ_k (G_k − G_{k−1})
with γ_k = f_k·(f_k − f_{k−1}) / |f_k − f_{k−1}|², f = G(c) − c, falling back to plain
substitution at a point whose |f| did not decrease. Condensed species are not in the EOS
mixture.

The module also gathers the EOS inputs and their provenance (:class:`GasModelReport`):
Tc, Pc and ω from ``chemicals`` and binary interaction parameters from ``thermo``'s
database through :mod:`eqconv.eos_data`, with user overrides.

References
----------
.. [1] J. M. Smith, H. C. Van Ness and M. M. Abbott, *Introduction to Chemical Engineering
   Thermodynamics*, 7th ed., McGraw-Hill (2005), §13.8 (equilibrium with fugacity
   coefficients, iteration on φ).
.. [2] H. F. Walker and P. Ni, "Anderson acceleration for fixed-point iterations",
   SIAM J. Numer. Anal. 49, 1715-1735 (2011). doi:10.1137/10078356X
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure, as_temperature
from .condensed import (
    PhaseSolution,
    _balance_error,
    phase_residuals,
    reacting_condensed,
    solve_phases,
)
from .eos import EOS_KINDS, ln_phi_mixture
from .eos_data import (
    InteractionReport,
    PairParameter,
    critical_constants,
    interaction_parameters,
)
from .errors import InputError, MissingDataError
from .extent_solver import ExtentSolution

__all__ = [
    "EosSetup",
    "FugacitySolution",
    "GasModelReport",
    "eos_setup",
    "solve_fugacity",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]

#: Default limit of outer (φ) iterations.
MAX_OUTER = 100


# --------------------------------------------------------------------------- EOS inputs
@dataclass(frozen=True)
class GasModelReport:
    """Where every input of the cubic equation of state came from.

    Attributes
    ----------
    kind : str
        ``"peng-robinson"`` or ``"srk"``.
    keys : tuple of str
        Gas species in the EOS mixture (condensed species are excluded).
    cas : tuple of str
        Their CAS numbers.
    Tc, Pc, omega : tuple of float
        Critical temperature [K], critical pressure [Pa] and acentric factor [-] used.
    critical_sources : tuple of str
        Source of each species' constants (``chemicals`` method, or "user override").
    interactions : InteractionReport
        Every pair with its k_ij and source.
    missing_pairs : tuple of (str, str)
        Pairs (species keys) without a database value and not overridden: k_ij = 0.
    notes : tuple of str
        Remarks (quantum gases, estimates).
    """

    kind: str
    keys: tuple[str, ...]
    cas: tuple[str, ...]
    Tc: tuple[float, ...]
    Pc: tuple[float, ...]
    omega: tuple[float, ...]
    critical_sources: tuple[str, ...]
    interactions: InteractionReport
    missing_pairs: tuple[tuple[str, str], ...]
    notes: tuple[str, ...] = field(default=())

    def kij(self, a: str, b: str) -> float:
        """k_ij used for the pair of species keys `a`, `b` [-]."""
        try:
            i, j = self.keys.index(a), self.keys.index(b)
        except ValueError:
            raise InputError(
                f"{a!r} or {b!r} is not in the EOS mixture {list(self.keys)}"
            ) from None
        ca, cb = self.cas[i], self.cas[j]
        for p in self.interactions.pairs:
            if {p.cas_a, p.cas_b} == {ca, cb}:
                return p.kij
        raise InputError(f"no pair {a!r}/{b!r} (a species is not paired with itself)")

    def lines(self) -> list[str]:
        """Printable lines for :func:`eqconv.data_report` notes."""
        name = {"peng-robinson": "Peng-Robinson (1976)", "srk": "Soave-Redlich-Kwong (1972)"}
        out = [
            f"Gas model: {name.get(self.kind, self.kind)} cubic equation of state, van der "
            "Waals one-fluid mixing; condensed species excluded from the mixture"
        ]
        for k, c, tc, pc, om, src in zip(
            self.keys,
            self.cas,
            self.Tc,
            self.Pc,
            self.omega,
            self.critical_sources,
            strict=True,
        ):
            out.append(
                f"  {k} ({c}): Tc = {tc:.3f} K, Pc = {pc / 1e5:.3f} bar, omega = {om:.4f} [{src}]"
            )
        label = {c: k for k, c in zip(self.keys, self.cas, strict=True)}
        table = "thermo's interaction-parameter database"
        if self.interactions.table is None:
            out.append(f"  k_ij: {table} has no {self.kind} table; every pair 0 unless set")
        else:
            out.append(f"  k_ij from {table} ({self.kind} table) where a pair exists")
        for p in self.interactions.pairs:
            src = {"database": "database", "override": "user override", "missing": "MISSING"}
            out.append(
                f"    {label[p.cas_a]}–{label[p.cas_b]}: k_ij = {p.kij:+.4f} "
                f"[{src.get(p.source, p.source)}]"
            )
        if self.missing_pairs:
            out.append(
                "  pairs missing from the database, k_ij = 0 used: "
                + ", ".join(f"{a}–{b}" for a, b in self.missing_pairs)
            )
        out += [f"  note: {n}" for n in self.notes]
        return out

    def __str__(self) -> str:
        return "\n".join(self.lines())


@dataclass(frozen=True)
class EosSetup:
    """Arrays the outer iteration needs (gas species only, in species order).

    Attributes
    ----------
    kind : str
        Cubic equation of state.
    gas_index : ndarray of int
        Species indices of the EOS components.
    Tc, Pc, omega : ndarray
        Critical constants [K], [Pa], [-].
    kij : ndarray (ng, ng)
        Binary interaction parameters [-].
    report : GasModelReport
        Provenance.
    """

    kind: str
    gas_index: IntArray
    Tc: FloatArray
    Pc: FloatArray
    omega: FloatArray
    kij: FloatArray
    report: GasModelReport


def eos_setup(
    kind: str,
    keys: Sequence[str],
    cas: Sequence[str],
    gas_mask: ArrayLike,
    *,
    kij: Mapping[tuple[str, str], float] | None = None,
    critical: Mapping[str, tuple[float, float, float]] | None = None,
) -> EosSetup:
    """Gather Tc, Pc, ω and k_ij of the gas species of a problem.

    Parameters
    ----------
    kind : {"peng-robinson", "srk"}
        Cubic equation of state.
    keys : sequence of str
        Species keys, in the order of the species axis.
    cas : sequence of str
        CAS numbers of the species ("" allowed for condensed species only, or for a gas
        species whose constants are given in `critical`).
    gas_mask : array_like of bool
        True for gas species (the EOS mixture).
    kij : mapping of (str, str) to float, optional
        k_ij overrides [-], pairs of species keys or CAS numbers, each in (-1, 1).
    critical : mapping of str to (Tc [K], Pc [Pa], omega [-]), optional
        Critical-constant overrides by species key (e.g. effective constants of H2, or a
        user species without a CAS number).

    Returns
    -------
    EosSetup

    Raises
    ------
    InputError
        Unknown `kind`, a bad override, or an override naming a species not in the gas.
    MissingDataError
        A gas species without a CAS number and without `critical` constants, or without
        data in ``chemicals``.
    """
    if kind not in EOS_KINDS:
        raise InputError(f"kind must be one of {EOS_KINDS}; got {kind!r}")
    gas = np.asarray(gas_mask, dtype=bool)
    g = np.flatnonzero(gas)
    gkeys = [keys[int(i)] for i in g]
    gcas = [cas[int(i)] for i in g]
    crit = dict(critical or {})
    for k, v in crit.items():
        if k not in gkeys:
            raise InputError(
                f"critical constants given for {k!r}, which is not a gas species of this "
                f"problem; gas species are {gkeys}"
            )
        if not (isinstance(v, Sequence) and len(v) == 3):
            raise InputError(f"critical[{k!r}] must be (Tc [K], Pc [Pa], omega [-]); got {v!r}")
        t_c, p_c, om_c = (float(x) for x in v)
        if not (t_c > 0.0 and p_c > 0.0 and np.isfinite(om_c) and np.isfinite(t_c * p_c)):
            raise InputError(
                f"critical[{k!r}] needs Tc > 0 K, Pc > 0 Pa and a finite omega; got {v!r}"
            )
    for k, c in zip(gkeys, gcas, strict=True):
        if not c and k not in crit:
            raise MissingDataError(
                f"gas species {k!r} has no CAS number, so the equation of state has no "
                f"critical constants for it; pass critical={{{k!r}: (Tc, Pc, omega)}}"
            )
    # species with a CAS get chemicals' data; the placeholder CAS of a user species without
    # one is never looked up (its constants are overridden)
    look = [c for k, c in zip(gkeys, gcas, strict=True) if k not in crit]
    cc = critical_constants(look) if look else None
    src_of = {} if cc is None else {s.cas: s.describe().split(": ", 1)[1] for s in cc.sources}
    tc_l: list[float] = []
    pc_l: list[float] = []
    om_l: list[float] = []
    srcs: list[str] = []
    for k, c in zip(gkeys, gcas, strict=True):
        if k in crit:
            vals = [float(x) for x in crit[k]]
            src = "user override"
        else:
            assert cc is not None
            i = cc.cas.index(c)
            vals = [float(cc.Tc[i]), float(cc.Pc[i]), float(cc.omega[i])]
            src = src_of[c]
        tc_l.append(vals[0])
        pc_l.append(vals[1])
        om_l.append(vals[2])
        srcs.append(src)
    # user species without CAS: give them a unique placeholder label for the kij lookup
    ip_cas = [c if c else f"0-00-{n}" for n, c in enumerate(gcas)]
    k_mat, ip_rep = _interactions(ip_cas, kind, kij, gkeys, gcas)
    label = dict(zip(ip_cas, gkeys, strict=True))
    missing = tuple((label[a], label[b]) for a, b in ip_rep.missing)
    notes = list(cc.notes) if cc is not None else []
    overridden = {c for k, c in zip(gkeys, gcas, strict=True) if k in crit and c}
    notes = [n for n in notes if not any(f"({c})" in n for c in overridden)]
    report = GasModelReport(
        kind=kind,
        keys=tuple(gkeys),
        cas=tuple(ip_cas),
        Tc=tuple(tc_l),
        Pc=tuple(pc_l),
        omega=tuple(om_l),
        critical_sources=tuple(srcs),
        interactions=ip_rep,
        missing_pairs=missing,
        notes=tuple(notes),
    )
    return EosSetup(
        kind,
        g.astype(np.int64),
        np.array(tc_l),
        np.array(pc_l),
        np.array(om_l),
        np.asarray(k_mat),
        report,
    )


def _interactions(
    ip_cas: list[str],
    kind: str,
    kij: Mapping[tuple[str, str], float] | None,
    gkeys: list[str],
    gcas: list[str],
) -> tuple[FloatArray, InteractionReport]:
    """k_ij from thermo's database (real CAS numbers only) with user overrides."""
    if kij is not None and not isinstance(kij, Mapping):
        raise InputError(f"kij must be a mapping {{(a, b): value}}; got {kij!r}")
    real = [i for i, c in enumerate(gcas) if c]
    if len(real) == len(gcas):
        return interaction_parameters(ip_cas, kind, overrides=kij, keys=gkeys)
    # some species lack a CAS number: the real ones from the database, the others 0 or
    # overridden
    nc = len(gcas)
    pos = {k: i for i, k in enumerate(gkeys)} | {c: i for i, c in enumerate(ip_cas)}
    user: dict[tuple[int, int], float] = {}
    for pair, v in (kij or {}).items():
        try:
            i, j = pos[pair[0]], pos[pair[1]]
        except (KeyError, TypeError, IndexError):
            raise InputError(f"kij override {pair!r} names a species not in the gas") from None
        val = float(v)
        if i == j or not (-1.0 < val < 1.0):
            raise InputError(f"kij override {pair!r} = {v!r}: need two species and |k_ij| < 1")
        user[(min(i, j), max(i, j))] = val
    k_mat = np.zeros((nc, nc))
    by: dict[tuple[str, str], PairParameter] = {}
    table = None
    if len(real) >= 2:
        sub_over = {
            (ip_cas[i], ip_cas[j]): v for (i, j), v in user.items() if i in real and j in real
        }
        ks, rep = interaction_parameters(
            [ip_cas[i] for i in real], kind, overrides=sub_over or None
        )
        table = rep.table
        for ra, i in enumerate(real):
            for rb, j in enumerate(real):
                k_mat[i, j] = ks[ra, rb]
        by = {(p.cas_a, p.cas_b): p for p in rep.pairs}
    pairs: list[PairParameter] = []
    miss: list[tuple[str, str]] = []
    for i in range(nc):
        for j in range(i + 1, nc):
            ca, cb = ip_cas[i], ip_cas[j]
            if i in real and j in real:
                pairs.append(by[(ca, cb)])
                if by[(ca, cb)].source == "missing":
                    miss.append((ca, cb))
            elif (i, j) in user:
                k_mat[i, j] = k_mat[j, i] = user[(i, j)]
                pairs.append(PairParameter(ca, cb, user[(i, j)], "override", "user species"))
            else:
                pairs.append(PairParameter(ca, cb, 0.0, "missing", "user species: no data"))
                miss.append((ca, cb))
    return k_mat, InteractionReport(kind, table, tuple(pairs), tuple(miss))


# --------------------------------------------------------------------------- outer loop
@dataclass(frozen=True)
class FugacitySolution:
    """Result of :func:`solve_fugacity` (flat or grid leading dimensions).

    Attributes
    ----------
    phases : PhaseSolution
        Amounts, extents, convergence, residuals with the final φ, condensed phases.
    ln_phi : ndarray (..., ns)
        ln φ at the final composition [-] (0 for condensed species; NaN where failed).
    Z : ndarray (...)
        Compressibility factor of the gas at the final state [-].
    liquid_like, three_roots, gas_metastable : ndarray (...) of bool
        Root flags of :class:`eqconv.eos.FugacityResult` at the final state.
    outer_iterations : ndarray (...) of int
        φ updates used at each point.
    """

    phases: PhaseSolution
    ln_phi: FloatArray
    Z: FloatArray
    liquid_like: BoolArray
    three_roots: BoolArray
    gas_metastable: BoolArray
    outer_iterations: IntArray


def _gas_fractions(n: FloatArray, gi: IntArray) -> FloatArray:
    ng = n[:, gi]
    return ng / ng.sum(axis=1, keepdims=True)


def solve_fugacity(
    nu: ArrayLike,
    ln_K: ArrayLike,
    n0: ArrayLike,
    T: ArrayLike,
    P: ArrayLike,
    standard_pressure: float,
    *,
    gas_mask: ArrayLike,
    eos: EosSetup,
    tol: float = 1e-10,
    max_outer: int = MAX_OUTER,
    max_iter: int = 200,
    chunk: int = 16384,
) -> FugacitySolution:
    """Equilibrium with fugacity coefficients from a cubic EOS, at every grid point.

    Parameters
    ----------
    nu : array_like (nr, ns)
        Stoichiometric matrix, products > 0 [-].
    ln_K : array_like (..., nr)
        ln K at p° [-].
    n0 : array_like (..., ns)
        Feed amounts [mol], ≥ 0.
    T : array_like (...)
        Temperature [K], > 0.
    P : array_like (...)
        Absolute pressure [Pa], > 0.
    standard_pressure : float
        p° [Pa] of `ln_K`.
    gas_mask : array_like (ns,) of bool
        False for pure condensed species.
    eos : EosSetup
        EOS kind and constants (:func:`eos_setup`).
    tol : float
        Required |ln Q − ln K| with φ at the final composition [-], ≥ 4e-13.
    max_outer : int
        Limit of φ updates; points still open after it are reported as not converged.
    max_iter, chunk : int
        Passed to the extent solver.

    Returns
    -------
    FugacitySolution
        Broadcast grid shape of the inputs.

    Raises
    ------
    InputError
        Bad arrays or options.

    Notes
    -----
    See the module notes. Each inner solve is asked for tol/4 so that the check with the
    final φ, |r_inner + Σ_i ν_ji Δln φ_i| ≤ tol, can be met. The fixed point need not be
    unique for a non-ideal gas (G is then not convex in general); the iteration starts from
    the ideal-gas answer and finds the solution connected to it.
    """
    nu_a = np.asarray(nu, dtype=float)
    gas = np.asarray(gas_mask, dtype=bool)
    nr, ns = nu_a.shape
    if not (isinstance(max_outer, int | np.integer) and max_outer >= 1):
        raise InputError(f"max_outer must be an integer >= 1; got {max_outer!r}")
    if not tol >= 4e-13:
        raise InputError(f"tol must be >= 4e-13 with a fugacity model; got {tol!r}")
    if not (np.isfinite(standard_pressure) and standard_pressure > 0.0):
        raise InputError(f"standard_pressure must be > 0 Pa; got {standard_pressure!r}")
    lnK = np.asarray(ln_K, dtype=float)
    feed = np.asarray(n0, dtype=float)
    T_a = as_temperature(T)
    P_a = as_pressure(P)
    if lnK.shape[-1:] != (nr,) or feed.shape[-1:] != (ns,):
        raise InputError(
            f"ln_K must end in {nr} and n0 in {ns}; got shapes {lnK.shape} and {feed.shape}"
        )
    try:
        shape = np.broadcast_shapes(lnK.shape[:-1], feed.shape[:-1], T_a.shape, P_a.shape)
    except ValueError as exc:
        raise InputError("ln_K, n0, T and P do not broadcast") from exc
    N = int(np.prod(shape))
    lnK_f = np.ascontiguousarray(np.broadcast_to(lnK, (*shape, nr)).reshape(N, nr))
    n0_f = np.ascontiguousarray(np.broadcast_to(feed, (*shape, ns)).reshape(N, ns))
    T_f = np.ascontiguousarray(np.broadcast_to(T_a, shape).reshape(N))
    P_f = np.ascontiguousarray(np.broadcast_to(P_a, shape).reshape(N))
    lnP_f = np.log(P_f / standard_pressure)
    condensed = reacting_condensed(nu_a, gas)
    nc = len(condensed)
    gi = eos.gas_index
    nu_g = nu_a[:, gi]  # (nr, ng)
    pinv_g = np.linalg.pinv(nu_g)  # (ng, nr): ln φ correction for a change of c
    tol_in = max(1e-13, 0.25 * tol)

    # outputs
    n_out = np.full((N, ns), np.nan)
    res_out = np.full((N, nr), np.nan)
    blk_out = np.zeros((N, nr), dtype=bool)
    conv_out = np.zeros(N, dtype=bool)
    it_out = np.zeros(N, dtype=np.int64)
    outer_out = np.zeros(N, dtype=np.int64)
    lnact_out = np.full((N, nc), np.nan)
    codes_out = np.full(N, -1, dtype=np.int64)
    phi_out = np.full((N, ns), np.nan)
    Z_out = np.full(N, np.nan)
    flags_out = np.zeros((3, N), dtype=bool)

    # state of the open points
    act = np.arange(N)
    lnphi = np.zeros((N, ns))  # ln φ used by the next inner solve (open points)
    codes = np.zeros(N, dtype=np.int64)
    have_prev = np.zeros(N, dtype=bool)
    f_prev = np.zeros((N, nr))
    G_prev = np.zeros((N, nr))
    fn_prev = np.full(N, np.inf)

    for k in range(1, max_outer + 1):
        ps = solve_phases(
            nu_a,
            lnK_f[act],
            n0_f[act],
            lnP_f[act],
            gas_mask=gas,
            ln_phi=lnphi[act],
            tol=tol_in,
            start=codes[act],
            max_iter=max_iter,
            chunk=chunk,
        )
        sol = ps.solution
        it_out[act] += sol.iterations
        outer_out[act] = k
        failed = ~sol.converged
        keep = ~failed
        if np.any(failed):  # inner solve failed: report there, with its last residual
            res_out[act[failed]] = sol.residual[failed]
            act = act[keep]
        if act.size == 0:
            break
        n = sol.amounts[keep]
        cds = ps.codes[keep]
        y = _gas_fractions(n, gi)
        fr = ln_phi_mixture(
            T_f[act],
            P_f[act],
            y,
            eos.Tc,
            eos.Pc,
            eos.omega,
            eos.kij,
            kind=eos.kind,  # type: ignore[arg-type]
        )
        phi_new = np.zeros((act.size, ns))
        phi_new[:, gi] = fr.ln_phi
        ok, r_full, blk, lnact = phase_residuals(
            nu_a, lnK_f[act], n, lnP_f[act], gas, phi_new, cds, condensed, tol
        )
        done = act[ok]
        n_out[done], res_out[done], blk_out[done] = n[ok], r_full[ok], blk[ok]
        conv_out[done], lnact_out[done], codes_out[done] = True, lnact[ok], cds[ok]
        phi_out[done], Z_out[done] = phi_new[ok], fr.Z[ok]
        flags_out[:, done] = np.stack([fr.liquid_like, fr.three_roots, fr.gas_metastable])[:, ok]
        op = ~ok
        if not np.any(op):
            act = act[:0]
            break
        a = act[op]
        res_out[a] = r_full[op]
        # Anderson(1) update of c = ν·ln φ at the open points
        c_used = lnphi[a][:, gi] @ nu_g.T
        G = phi_new[op][:, gi] @ nu_g.T
        f = G - c_used
        fn = np.abs(f).max(axis=1)
        acc = have_prev[a] & (fn < fn_prev[a])
        df = f - f_prev[a]
        den = np.einsum("ij,ij->i", df, df)
        gam = np.where(
            acc & (den > 0.0), np.einsum("ij,ij->i", f, df) / np.where(den > 0, den, 1.0), 0.0
        )
        c_next = G - gam[:, None] * (G - G_prev[a])
        new_phi = phi_new[op].copy()
        new_phi[:, gi] += (c_next - G) @ pinv_g.T
        lnphi[a] = new_phi
        f_prev[a], G_prev[a], fn_prev[a], have_prev[a] = f, G, fn, True
        codes[a] = cds[op]
        act = a

    # points still open after max_outer stay not converged (NaN amounts, last residual)
    xi = np.where(conv_out[:, None], (n_out - n0_f) @ np.linalg.pinv(nu_a.T).T, np.nan)
    berr = np.full(N, np.nan)
    if np.any(conv_out):
        c_idx = np.flatnonzero(conv_out)
        berr[c_idx] = _balance_error(nu_a, n0_f[c_idx], n_out[c_idx])
    present = np.zeros((N, nc), dtype=bool)
    for j, c in enumerate(condensed):
        present[:, j] = conv_out & (n_out[:, c] > 0.0)
    sol_out = ExtentSolution(
        extents=xi.reshape(*shape, nr),
        amounts=n_out.reshape(*shape, ns),
        converged=conv_out.reshape(shape),
        iterations=it_out.reshape(shape),
        residual=res_out.reshape(*shape, nr),
        balance_error=berr.reshape(shape),
        blocked=blk_out.reshape(*shape, nr),
    )
    phases = PhaseSolution(
        sol_out,
        condensed,
        present.reshape(*shape, nc),
        lnact_out.reshape(*shape, nc),
        codes_out.reshape(shape),
    )
    return FugacitySolution(
        phases=phases,
        ln_phi=phi_out.reshape(*shape, ns),
        Z=Z_out.reshape(shape),
        liquid_like=flags_out[0].reshape(shape),
        three_roots=flags_out[1].reshape(shape),
        gas_metastable=flags_out[2].reshape(shape),
        outer_iterations=outer_out.reshape(shape),
    )

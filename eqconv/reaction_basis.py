"""Independent reaction sets from a species list, and rank checks of stoichiometry.

A set of species with atom matrix ``A`` (species × elements) admits exactly
``ns − rank(A)`` independent reactions: the null space of ``Aᵀ``. This module derives such a
set with the smallest integer coefficients, writes it as equations
(``"H2O + CO = CO2 + H2"``), and tells whether a given set of reactions is independent —
and, if it is not, which reaction is which combination of the others. All of it uses exact
rational arithmetic (:class:`fractions.Fraction`) on the small integer matrices involved, so
a rank never depends on a floating-point tolerance.

Examples
--------
>>> atoms = {"CH4": {"C": 1, "H": 4}, "H2O": {"H": 2, "O": 1}, "CO": {"C": 1, "O": 1},
...          "CO2": {"C": 1, "O": 2}, "H2": {"H": 2}}
>>> derive_reactions(atoms)
['CO + 3 H2 = CH4 + H2O', 'H2O + CO = CO2 + H2']
>>> rank_of_stoichiometry([[-1, -1, 1, 0, 3], [0, -1, -1, 1, 1], [-1, -2, 0, 1, 4]])
2
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .errors import DependentReactionsError, InputError

__all__ = [
    "ComponentBases",
    "Dependency",
    "atom_matrix",
    "check_independent",
    "component_bases",
    "derive_reactions",
    "find_dependencies",
    "independent_reactions",
    "matrix_rank_exact",
    "rank_of_stoichiometry",
    "reaction_equations",
    "rref",
]

FracMatrix = list[list[Fraction]]

#: Largest number of component choices tried by ``components="auto"``.
_MAX_AUTO_CHOICES = 2000


def _exact(x: Any, what: str) -> Fraction:
    """Convert a number to a Fraction; floats must be close to a ratio of small integers."""
    if isinstance(x, Fraction):
        return x
    if isinstance(x, int | np.integer):
        return Fraction(int(x))
    value = float(x)
    if not math.isfinite(value):
        raise InputError(f"{what} must be finite; got {x!r}")
    f = Fraction(value).limit_denominator(1000)
    if abs(float(f) - value) > 1e-14 * max(1.0, abs(value)):
        raise InputError(
            f"{what} = {value!r} is not a ratio of small integers (denominator <= 1000); "
            "exact rank checks need rational coefficients"
        )
    return f


def _as_fractions(M: ArrayLike | Sequence[Sequence[Any]], what: str) -> FracMatrix:
    arr = np.asarray(M, dtype=object)
    if arr.size == 0:
        return []
    if arr.ndim != 2:
        raise InputError(f"{what} must form a rectangular 2-D matrix; got shape {arr.shape}")
    return [[_exact(v, what) for v in r] for r in arr.tolist()]


def rref(M: ArrayLike | Sequence[Sequence[Any]]) -> tuple[FracMatrix, tuple[int, ...]]:
    """Reduced row echelon form of a rational matrix, computed exactly.

    Parameters
    ----------
    M : array_like, shape (m, n)
        Integers, Fractions, or floats that are ratios of small integers.

    Returns
    -------
    R : list of list of Fraction
        The reduced row echelon form (zero rows dropped).
    pivots : tuple of int
        Pivot column of each row of `R`.

    Examples
    --------
    >>> R, piv = rref([[1, 2], [2, 4]])
    >>> piv, [[str(v) for v in row] for row in R]
    ((0,), [['1', '2']])
    """
    A = _as_fractions(M, "matrix entry")
    m = len(A)
    n = len(A[0]) if m else 0
    pivots: list[int] = []
    row = 0
    for col in range(n):
        pr = next((i for i in range(row, m) if A[i][col] != 0), None)
        if pr is None:
            continue
        A[row], A[pr] = A[pr], A[row]
        inv = 1 / A[row][col]
        A[row] = [v * inv for v in A[row]]
        for i in range(m):
            if i != row and A[i][col] != 0:
                f = A[i][col]
                A[i] = [a - f * b for a, b in zip(A[i], A[row], strict=True)]
        pivots.append(col)
        row += 1
        if row == m:
            break
    return A[:row], tuple(pivots)


def matrix_rank_exact(M: ArrayLike | Sequence[Sequence[Any]]) -> int:
    """Rank of a rational matrix by exact elimination (no tolerance)."""
    return len(rref(M)[1])


def _primitive(v: Sequence[Fraction]) -> list[int]:
    """Scale a rational vector to the smallest integer vector with the same direction."""
    den = math.lcm(*(f.denominator for f in v)) if v else 1
    ints = [int(f * den) for f in v]
    g = math.gcd(*ints) or 1
    return [i // g for i in ints]


def atom_matrix(
    atoms: Sequence[Mapping[str, int | float]], elements: Sequence[str] | None = None
) -> tuple[NDArray[Any], tuple[str, ...]]:
    """Atom matrix ``A[i, j]`` = atoms of element j in species i.

    Parameters
    ----------
    atoms : sequence of mapping
        Element counts of each species, e.g. ``[{"C": 1, "H": 4}, {"H": 2}]``.
    elements : sequence of str, optional
        Column order; default: order of first appearance.

    Returns
    -------
    A : ndarray, shape (ns, ne)
        int64 when every count is an integer, else float64.
    elements : tuple of str

    Raises
    ------
    InputError
        A negative or non-finite count, a species with no atoms, or an element of a species
        missing from `elements`.
    """
    if elements is None:
        seen: dict[str, None] = {}
        for a in atoms:
            seen.update(dict.fromkeys(a))
        elements = tuple(seen)
    elements = tuple(elements)
    col = {el: j for j, el in enumerate(elements)}
    A = np.zeros((len(atoms), len(elements)))
    for i, a in enumerate(atoms):
        if not any(float(v) != 0 for v in a.values()):
            raise InputError(f"species {i} has no atoms: {dict(a)!r}")
        for el, v in a.items():
            if el not in col:
                raise InputError(f"element {el!r} of species {i} is not in {elements!r}")
            if not math.isfinite(float(v)) or float(v) < 0:
                raise InputError(
                    f"atom count of {el} in species {i} must be finite and >= 0; got {v!r}"
                )
            A[i, col[el]] = float(v)
    if np.all(A == np.round(A)):
        return A.astype(np.int64), elements
    return A, elements


def _nullspace_rows(A: FracMatrix, order: Sequence[int]) -> list[list[int]]:
    """Integer basis of {ν : ν·A = 0}, pivots taken in `order`; free species get ν > 0."""
    ns = len(A)
    ne = len(A[0]) if ns else 0
    At = [[A[order[k]][j] for k in range(ns)] for j in range(ne)]  # ne × ns, permuted
    R, piv = rref(At) if ne else ([], ())
    free = [k for k in range(ns) if k not in piv]
    out: list[tuple[int, list[int]]] = []
    for f in free:
        v = [Fraction(0)] * ns
        v[order[f]] = Fraction(1)
        for r, p in enumerate(piv):
            v[order[p]] = -R[r][f]
        out.append((order[f], _primitive(v)))
    return [row for _, row in sorted(out)]


def independent_reactions(
    A: ArrayLike, *, components: Sequence[int] | str = "auto"
) -> NDArray[np.int64]:
    """An independent reaction set for species with atom matrix `A`, smallest integers.

    Parameters
    ----------
    A : array_like, shape (ns, ne)
        Atom matrix (species × elements), rational entries.
    components : sequence of int, "auto" or "first"
        Species (indices) used as building blocks: every reaction forms one other species
        from them, with that species' coefficient positive. They must span the element
        space (rank(A) species). ``"auto"`` picks the choice with the smallest total
        |coefficients| (ties: the earliest species), trying at most 2000 choices and
        otherwise taking the first independent species in order; ``"first"`` always takes
        the first independent species (fast).

    Returns
    -------
    ndarray of int64, shape (ns − rank(A), ns)
        Row k is a reaction ν with ν·A = 0; rows are linearly independent.

    Raises
    ------
    InputError
        Non-rational entries, or `components` that are not rank(A) independent species.

    Notes
    -----
    The reactions form a basis of the null space of Aᵀ, found by exact reduced row echelon
    form; the count ns − rank(A) is the number of independent reactions (common practice,
    e.g. Smith & Missen, *Chemical Reaction Equilibrium Analysis*, Wiley 1982, ch. 2).
    """
    F = _as_fractions(np.asarray(A).tolist(), "atom count")
    ns = len(F)
    r = matrix_rank_exact(F) if ns else 0
    if isinstance(components, str):
        if components not in ("auto", "first"):
            raise InputError(
                f"components must be 'auto', 'first' or species indices; got {components!r}"
            )
        if components == "first":
            return np.array(_nullspace_rows(F, list(range(ns))), dtype=np.int64).reshape(-1, ns)
        choices = itertools.combinations(range(ns), r)
        best: tuple[int, list[list[int]]] | None = None
        tried = 0
        for comb in choices:
            tried += 1
            if tried > _MAX_AUTO_CHOICES:
                break
            if matrix_rank_exact([F[i] for i in comb]) < r:
                continue
            rows = _nullspace_rows(F, list(comb) + [i for i in range(ns) if i not in comb])
            cost = sum(abs(v) for row in rows for v in row)
            if best is None or cost < best[0]:
                best = (cost, rows)
        if best is None or tried > _MAX_AUTO_CHOICES:
            rows = _nullspace_rows(F, list(range(ns)))
        else:
            rows = best[1]
    else:
        comp = [int(c) for c in components]
        if len(set(comp)) != len(comp) or any(c < 0 or c >= ns for c in comp):
            raise InputError(f"components must be distinct species indices < {ns}; got {comp}")
        if len(comp) != r or matrix_rank_exact([F[i] for i in comp]) < r:
            raise InputError(
                f"components {comp} must be {r} species whose atom vectors are "
                f"independent (rank of the atom matrix is {r})"
            )
        rows = _nullspace_rows(F, comp + [i for i in range(ns) if i not in comp])
    return np.array(rows, dtype=np.int64).reshape(len(rows), ns)


def _fmt_coef(c: Fraction) -> str:
    return "" if c == 1 else (f"{c.numerator}" if c.denominator == 1 else f"{c}")


def reaction_equations(nu: ArrayLike, keys: Sequence[str]) -> list[str]:
    """Write reactions as equations, e.g. ``[[-1, -3, 2]]`` → ``["N2 + 3 H2 = 2 NH3"]``.

    Parameters
    ----------
    nu : array_like, shape (nr, ns)
        Coefficients (products > 0), rational.
    keys : sequence of str
        Species labels, in column order.
    """
    F = _as_fractions(np.atleast_2d(np.asarray(nu, dtype=object)).tolist(), "coefficient")
    out = []
    for row in F:
        if len(row) != len(keys):
            raise InputError(f"a reaction has {len(row)} coefficients for {len(keys)} species")
        left = " + ".join(
            f"{_fmt_coef(-c)} {k}".strip() for c, k in zip(row, keys, strict=True) if c < 0
        )
        right = " + ".join(
            f"{_fmt_coef(c)} {k}".strip() for c, k in zip(row, keys, strict=True) if c > 0
        )
        out.append(f"{left} = {right}")
    return out


def derive_reactions(
    species: Sequence[Any] | Mapping[str, Mapping[str, int]],
    *,
    components: Sequence[str] | str = "auto",
    as_mapping: bool = False,
) -> list[Any]:
    """Derive an independent reaction set from a species list.

    Parameters
    ----------
    species : sequence of Species or mapping
        Objects with ``.key`` and ``.atoms`` (e.g. from :func:`eqconv.get_species`), or a
        mapping key → element counts.
    components : sequence of str or "auto"
        Keys of the building-block species (see :func:`independent_reactions`).
    as_mapping : bool
        Return ``{key: coefficient}`` dicts (integers, products > 0) instead of equations.

    Returns
    -------
    list of str or list of dict
        ``ns − rank(A)`` reactions; an empty list when the species cannot react.

    Examples
    --------
    >>> derive_reactions({"N2": {"N": 2}, "H2": {"H": 2}, "NH3": {"N": 1, "H": 3}})
    ['N2 + 3 H2 = 2 NH3']
    """
    if isinstance(species, Mapping):
        keys = [str(k) for k in species]
        atoms = [species[k] for k in species]
    else:
        keys = [str(s.key) for s in species]
        atoms = [s.atoms for s in species]
    if len(set(keys)) != len(keys):
        raise InputError(f"species keys must be distinct; got {keys}")
    A, _ = atom_matrix(atoms)
    comp: Sequence[int] | str
    if isinstance(components, str):
        comp = components
    else:
        missing = [c for c in components if c not in keys]
        if missing:
            raise InputError(f"components {missing} are not among the species {keys}")
        comp = [keys.index(c) for c in components]
    nu = independent_reactions(A, components=comp)
    if as_mapping:
        return [{k: int(v) for k, v in zip(keys, row, strict=True) if v != 0} for row in nu]
    return reaction_equations(nu, keys)


def rank_of_stoichiometry(nu: ArrayLike) -> int:
    """Exact rank of a stoichiometric matrix (reactions × species).

    Parameters
    ----------
    nu : array_like, shape (nr, ns)
        Rational coefficients (integers, Fractions or floats such as 0.5 or 1/3).

    Raises
    ------
    InputError
        A coefficient that is not a ratio of small integers.
    """
    arr = np.atleast_2d(np.asarray(nu, dtype=object))
    return matrix_rank_exact(arr.tolist())


@dataclass(frozen=True)
class Dependency:
    """Reaction `index` equals Σ coefficients[k] × reaction k over earlier reactions."""

    index: int
    combination: dict[int, Fraction]
    explanation: str


def find_dependencies(nu: ArrayLike, labels: Sequence[str] | None = None) -> list[Dependency]:
    """Find every reaction that is a linear combination of the reactions before it.

    Parameters
    ----------
    nu : array_like, shape (nr, ns)
        Rational coefficients, one reaction per row.
    labels : sequence of str, optional
        Text for each reaction in explanations (e.g. its equation).

    Returns
    -------
    list of Dependency
        Empty when the set is independent. The reactions not listed form a maximal
        independent subset (in the given order).

    Examples
    --------
    >>> dep = find_dependencies([[-1, -1, 1, 0, 3], [0, -1, -1, 1, 1], [-1, -2, 0, 1, 4]])
    >>> dep[0].explanation
    'reaction 3 = reaction 1 + reaction 2'
    """
    F = _as_fractions(np.atleast_2d(np.asarray(nu, dtype=object)).tolist(), "coefficient")
    names = list(labels) if labels is not None else [f"reaction {k + 1}" for k in range(len(F))]
    if len(names) != len(F):
        raise InputError(f"{len(names)} labels for {len(F)} reactions")
    basis: list[int] = []
    deps: list[Dependency] = []
    for k, row in enumerate(F):
        if not any(row):
            deps.append(Dependency(k, {}, f"{names[k]} has no non-zero coefficient"))
            continue
        # columns: earlier independent reactions, then this one (augmented); rows: species
        aug = [[F[b][i] for b in basis] + [row[i]] for i in range(len(row))]
        R, piv = rref(aug)
        if len(basis) in piv:  # pivot in the augmented column: not in the span
            basis.append(k)
            continue
        comb = {basis[p]: R[r][-1] for r, p in enumerate(piv) if R[r][-1] != 0}
        terms = []
        for b, c in comb.items():
            mag = abs(c)
            coef = "" if mag == 1 else f"{mag} × "
            sign = "−" if c < 0 else "+"
            terms.append((sign, f"{coef}{names[b]}"))
        text = " ".join(f"{s} {t}" for s, t in terms)
        text = text[2:] if text.startswith("+ ") else "−" + text[2:]
        deps.append(Dependency(k, comb, f"{names[k]} = {text}"))
    return deps


def check_independent(nu: ArrayLike, labels: Sequence[str] | None = None) -> None:
    """Raise :class:`DependentReactionsError` if the reactions are linearly dependent.

    The message names each dependent reaction and the combination of the others it equals.
    """
    deps = find_dependencies(nu, labels)
    if deps:
        n = len(np.atleast_2d(np.asarray(nu, dtype=object)))
        raise DependentReactionsError(
            f"the {n} reactions are linearly dependent (rank {n - len(deps)}): "
            + "; ".join(d.explanation for d in deps)
            + ". Remove the dependent reaction(s); the equilibrium is the same without them."
        )


# ---------------------------------------------------------------------- component bases
_SPLIT = 134217729.0  # 2**27 + 1, Veltkamp splitting constant


@dataclass(frozen=True)
class ComponentBases:
    """Every component basis of a species set and its vertex of the composition space.

    A basis is a set of r = rank(A) species whose atom vectors are independent; every
    species is then a combination of them, ``A_i = Σ_j C_ij A_Bj``, and a feed fixes the
    amounts of the basis species that would make it alone (the vertex of the feasible set
    {n >= 0 : Aᵀn = b} spanned by that basis).

    Attributes
    ----------
    cols : ndarray of int, shape (r,)
        Independent element columns (the others are combinations of them).
    bases : ndarray of int, shape (nb, r)
        Species of each basis.
    Binv : ndarray, shape (nb, r, r)
        Inverse of each basis' atom matrix (rows: basis species, columns: `cols`).
    C : ndarray, shape (nb, ns, r)
        Each species in terms of the basis species (exact rationals for integer A).
    numerators, den : ndarray or None
        For integer A: C = numerators / den (integer-valued floats, |value| < 2**26), and
        the same for Binv (`binv_numerators`), so feeds can be resolved exactly.
    """

    cols: NDArray[np.intp]
    bases: NDArray[np.intp]
    Binv: NDArray[np.float64]
    C: NDArray[np.float64]
    numerators: NDArray[np.float64] | None
    binv_numerators: NDArray[np.float64] | None
    den: NDArray[np.float64] | None

    def vertex_amounts(
        self, f: ArrayLike, *, elements: bool = False
    ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """Amounts of the basis species of every basis that reproduce a feed.

        Parameters
        ----------
        f : array_like, shape (u, ns) or (u, r)
            Feed amounts of the species [mol], or (``elements=True``) element totals on
            `cols` [mol].

        Returns
        -------
        V : ndarray, shape (u, nb, r)
            Basis amounts [mol] (negative: the basis cannot make the feed). Values that
            nearly cancel are recomputed exactly (compensated dot product, Ogita, Rump &
            Oishi, SIAM J. Sci. Comput. 26, 1955 (2005)), so an exact zero stays zero.
        T : ndarray, shape (u, nb, r)
            Σ |terms| of each value (its scale) [mol].
        """
        f = np.atleast_2d(np.asarray(f, dtype=float))
        Cf = self.Binv if elements else self.C
        num = self.binv_numerators if elements else self.numerators
        V = np.einsum("uf,kfr->ukr", f, Cf)
        T = np.einsum("uf,kfr->ukr", np.abs(f), np.abs(Cf))
        if num is not None and self.den is not None:
            u, k, j = np.nonzero(np.abs(V) <= 1e-6 * T)
            if len(u):
                V[u, k, j] = _exact_dot(f[u], num[k, :, j]) / self.den[k]
        return V, T

    def feasible(
        self, V: NDArray[np.float64], T: NDArray[np.float64]
    ) -> tuple[NDArray[np.bool_], NDArray[np.bool_]]:
        """Feasible bases (u, nb) and species that some feasible vertex makes positive (u, ns).

        A species outside the second set is zero in every composition with the feed's
        element totals (the feed lies on an edge of the composition space).
        """
        zt = 1e-20 if self.den is not None else 1e-13
        feas = np.all(V >= -zt * T, axis=2)
        pos = (V > zt * T) & feas[:, :, None]
        support = np.zeros((V.shape[0], self.C.shape[1]), dtype=bool)
        for k, basis in enumerate(self.bases):
            support[:, basis] |= pos[:, k, :]
        return feas, support


def _exact_dot(x: NDArray[np.float64], p: NDArray[np.float64]) -> NDArray[np.float64]:
    """Σ_f x_f p_f (rows) with integer-valued |p| < 2**26, in twice the working precision."""
    c = _SPLIT * x
    hi = c - (c - x)
    lo = x - hi
    s = np.zeros(x.shape[0])
    e = np.zeros(x.shape[0])
    for f in range(x.shape[1]):
        for term in (hi[:, f] * p[:, f], lo[:, f] * p[:, f]):  # both products are exact
            t = s + term
            z = t - s
            e += (s - (t - z)) + (term - z)
            s = t
    return s + e


def component_bases(A: ArrayLike, *, max_bases: int = 20000) -> ComponentBases:
    """Enumerate the component bases of a species set with atom matrix `A` (ns, ne).

    Raises
    ------
    NotImplementedError
        If there are more than `max_bases` candidate sets C(ns, rank).
    """
    A = np.asarray(A, dtype=float)
    integral = bool(np.all(A == np.round(A)))
    ns = A.shape[0]
    _, piv = rref(A.astype(np.int64).tolist() if integral else A.tolist())
    cols = np.array(piv, dtype=np.intp)
    r = len(cols)
    n_comb = math.comb(ns, r)
    if n_comb > max_bases:
        raise NotImplementedError(
            f"{ns} species with {r} independent elements give {n_comb} "
            f"candidate component bases; at most {max_bases} are tried"
        )
    cand = np.array(list(itertools.combinations(range(ns), r)), dtype=np.intp).reshape(-1, r)
    Ared = A[:, cols]
    Bs = Ared[cand]
    det = np.linalg.det(Bs)
    ok = np.abs(det) > (0.5 if integral else 1e-9 * np.prod(np.linalg.norm(Bs, axis=2), axis=1))
    bases, Bs, det = cand[ok], Bs[ok], det[ok]
    Binv = np.linalg.inv(Bs)
    C = np.einsum("ij,kjl->kil", Ared, Binv)
    num = bnum = den = None
    if integral:
        d = np.round(np.abs(det))[:, None, None]
        Cn, Bn = np.round(C * d), np.round(Binv * d)
        if (
            np.max(np.abs(C * d - Cn)) < 1e-6
            and np.max(np.abs(Binv * d - Bn)) < 1e-6
            and max(np.max(np.abs(Cn)), np.max(np.abs(Bn))) < 2.0**26
        ):
            C, Binv, num, bnum, den = Cn / d, Bn / d, Cn, Bn, d[:, 0, 0]
    return ComponentBases(
        cols=cols, bases=bases, Binv=Binv, C=C, numerators=num, binv_numerators=bnum, den=den
    )

"""Independent reaction sets, exact ranks, dependency explanations and component bases."""

from __future__ import annotations

from fractions import Fraction

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from eqconv import Reaction
from eqconv.errors import DependentReactionsError, InputError
from eqconv.reaction_basis import (
    atom_matrix,
    check_independent,
    component_bases,
    derive_reactions,
    find_dependencies,
    independent_reactions,
    matrix_rank_exact,
    rank_of_stoichiometry,
    reaction_equations,
)

SMR_ATOMS = {
    "CH4": {"C": 1, "H": 4},
    "H2O": {"H": 2, "O": 1},
    "CO": {"C": 1, "O": 1},
    "CO2": {"C": 1, "O": 2},
    "H2": {"H": 2},
}
NH3_ATOMS = {"N2": {"N": 2}, "H2": {"H": 2}, "NH3": {"N": 1, "H": 3}}


def _balance(eq: dict[str, int], atoms: dict[str, dict[str, int]]) -> dict[str, int]:
    net: dict[str, int] = {}
    for sp, nu in eq.items():
        for el, n in atoms[sp].items():
            net[el] = net.get(el, 0) + nu * n
    return {el: v for el, v in net.items() if v != 0}


# ---------------------------------------------------------------------- known systems
def test_steam_reforming_species_give_two_independent_reactions():
    # common practice: 5 species, 3 elements (C, H, O) of rank 3 -> 5 - 3 = 2 reactions
    rx = derive_reactions(SMR_ATOMS, as_mapping=True)
    assert len(rx) == 2
    for eq in rx:
        assert _balance(eq, SMR_ATOMS) == {}
    assert rank_of_stoichiometry([[eq.get(k, 0) for k in SMR_ATOMS] for eq in rx]) == 2
    # "auto" picks the set with the smallest coefficients: methanation and shift
    assert derive_reactions(SMR_ATOMS) == ["CO + 3 H2 = CH4 + H2O", "H2O + CO = CO2 + H2"]


def test_components_chosen_by_the_user_give_reforming_equations():
    eqs = derive_reactions(SMR_ATOMS, components=["CH4", "H2O", "H2"])
    assert eqs == ["CH4 + H2O = CO + 3 H2", "CH4 + 2 H2O = CO2 + 4 H2"]
    with pytest.raises(InputError, match="must be 3 species"):
        derive_reactions(SMR_ATOMS, components=["CH4", "H2O"])  # rank 3 needs 3 components
    with pytest.raises(InputError, match="not among"):
        derive_reactions(SMR_ATOMS, components=["CH4", "H2O", "N2"])


def test_ammonia_species_give_one_reaction_with_smallest_integers():
    assert derive_reactions(NH3_ATOMS) == ["N2 + 3 H2 = 2 NH3"]
    assert derive_reactions(NH3_ATOMS, as_mapping=True) == [{"N2": -1, "H2": -3, "NH3": 2}]


def test_derived_equation_is_accepted_by_reaction():
    eq = derive_reactions(SMR_ATOMS)[0]
    rxn = Reaction(eq, data="janaf")  # atom balance checked by Reaction itself
    assert rxn.coefficients == {"CO": -1.0, "H2": -3.0, "CH4": 1.0, "H2O": 1.0}


def test_species_objects_are_accepted():
    from eqconv import get_species

    sps = [get_species(k, data="janaf") for k in ("N2", "H2", "NH3")]
    assert derive_reactions(sps) == ["N2 + 3 H2 = 2 NH3"]


def test_no_reaction_possible():
    assert derive_reactions({"N2": {"N": 2}, "Ar": {"Ar": 1}}) == []
    assert independent_reactions([[2, 0], [0, 1]]).shape == (0, 2)


# ---------------------------------------------------------------------- properties
atom_matrices = st.integers(2, 7).flatmap(
    lambda ns: st.integers(1, 4).flatmap(
        lambda ne: st.lists(
            st.lists(st.integers(0, 4), min_size=ne, max_size=ne).filter(any),
            min_size=ns,
            max_size=ns,
        )
    )
)


@settings(max_examples=80, deadline=None)
@given(atom_matrices)
def test_independent_reactions_balance_every_element_and_have_full_rank(A):
    A = np.array(A)
    nu = independent_reactions(A)
    r = matrix_rank_exact(A.tolist())
    assert nu.shape == (A.shape[0] - r, A.shape[0])
    assert np.all(nu @ A == 0)  # exact integer arithmetic: every element balances
    if len(nu):
        assert rank_of_stoichiometry(nu) == len(nu)  # independent
        assert all(np.gcd.reduce(np.abs(row)) == 1 for row in nu)  # smallest integers
    assert np.array_equal(
        independent_reactions(A, components="first") @ A,
        np.zeros((len(nu), A.shape[1]), dtype=np.int64),
    )


SMR_A = np.array([[SMR_ATOMS[k].get(e, 0) for e in ("C", "H", "O")] for k in SMR_ATOMS])


@settings(max_examples=60, deadline=None)
@given(st.lists(st.integers(-3, 3), min_size=2, max_size=2), st.integers(0, 2))
def test_a_combination_of_reactions_is_found_and_explained_exactly(coeffs, where):
    base = independent_reactions(SMR_A)
    combo = [Fraction(c, 2) for c in coeffs]  # half-integer multiples stay rational
    extra = [sum(c * int(base[j, i]) for j, c in enumerate(combo)) for i in range(5)]
    rows: list[list[Fraction | int]] = [list(map(int, base[0])), list(map(int, base[1]))]
    rows.insert(where, extra)
    deps = find_dependencies(rows)
    assert len(deps) == 1  # three reactions of rank 2: exactly one is explained
    d = deps[0]
    rebuilt = [
        sum((c * Fraction(rows[j][i]) for j, c in d.combination.items()), Fraction(0))
        for i in range(5)
    ]
    assert rebuilt == [Fraction(v) for v in rows[d.index]]
    assert all(j < d.index for j in d.combination)  # in terms of earlier reactions


def test_dependent_set_is_reported_with_its_combination():
    rows = [[-1, -1, 1, 0, 3], [0, -1, -1, 1, 1], [-1, -2, 0, 1, 4]]
    labels = ["CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2", "CH4 + 2 H2O = CO2 + 4 H2"]
    deps = find_dependencies(rows, labels)
    assert len(deps) == 1 and deps[0].index == 2
    assert deps[0].combination == {0: Fraction(1), 1: Fraction(1)}
    with pytest.raises(DependentReactionsError) as exc:
        check_independent(rows, labels)
    msg = str(exc.value)
    assert "CH4 + 2 H2O = CO2 + 4 H2 = CH4 + H2O = CO + 3 H2 + CO + H2O = CO2 + H2" in msg
    assert isinstance(exc.value, ValueError)
    check_independent(rows[:2])  # an independent set passes silently


def test_negative_and_fractional_combinations_are_written_out():
    deps = find_dependencies([[-1, -3, 2], [Fraction(1, 2), Fraction(3, 2), -1]])
    assert deps[0].combination == {0: Fraction(-1, 2)}
    assert deps[0].explanation == "reaction 2 = −1/2 × reaction 1"


def test_rank_is_exact_with_rational_floats_and_rejects_irrational_ones():
    nu = [[-0.5, -1.5, 1.0], [-1.0, -3.0, 2.0]]  # the same reaction written twice
    assert rank_of_stoichiometry(nu) == 1
    with pytest.raises(InputError, match="ratio of small integers"):
        rank_of_stoichiometry([[np.pi, 1.0]])


def test_equations_and_atom_matrix_formatting_and_errors():
    assert reaction_equations([[1, -2, 3]], ["A", "B", "C"]) == ["2 B = A + 3 C"]
    A, els = atom_matrix([{"C": 1, "H": 4}, {"H": 2, "O": 1}])
    assert els == ("C", "H", "O") and A.dtype == np.int64
    assert A.tolist() == [[1, 4, 0], [0, 2, 1]]
    with pytest.raises(InputError, match=">= 0"):
        atom_matrix([{"C": -1}])
    with pytest.raises(InputError, match="no atoms"):
        atom_matrix([{"C": 0}])


# ---------------------------------------------------------------------- component bases
def test_component_bases_resolve_a_feed_exactly():
    # ammonia from N2 + H2 in the basis (N2, NH3): the N2 component of the feed is
    # n_N2 - n_H2/3, which cancels; it must equal the exact value for the float inputs
    cb = component_bases([[2, 0], [0, 2], [1, 3]])
    k = next(i for i, b in enumerate(cb.bases.tolist()) if b == [0, 2])
    for feed in ([1.0, 3.0, 0.0], [0.1, 0.3, 0.0], [1.0 / 3.0, 1.0, 0.0]):
        V, _ = cb.vertex_amounts([feed])
        exact = sum(
            Fraction(f) * Fraction(c).limit_denominator(100)
            for f, c in zip(feed, cb.C[k][:, 0], strict=True)
        )
        assert V[0, k, 0] == float(exact)  # (0.0 for the first feed, 9.25e-18 for 0.1:0.3)
    _, support = cb.feasible(*cb.vertex_amounts([[1.0, 3.0, 0.0]]))
    assert support.all()  # every species can be present


def test_edge_of_composition_space_forces_species_to_zero():
    # CO, CO2, O2 fed with CO only (C:O = 1): no composition can hold CO2 or O2
    cb = component_bases([[1, 1], [1, 2], [0, 2]])
    V, T = cb.vertex_amounts([[1.0, 0.0, 0.0]])
    _, support = cb.feasible(V, T)
    assert support.tolist() == [[True, False, False]]
    V, T = cb.vertex_amounts([[1.0, 0.0, 1e-9]])
    assert cb.feasible(V, T)[1].all()


def test_docstring_examples_run():
    import doctest

    import eqconv.reaction_basis

    result = doctest.testmod(eqconv.reaction_basis)
    assert result.attempted >= 6 and result.failed == 0

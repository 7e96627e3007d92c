"""Problems and schedules from files and from Python objects, and the error path.

The dict and array routes must give the problem the file reader gives (the
module renders them to the documented TOML and reads that); a QUBO is converted
exactly as the reader converts it (x_i = z_i = (1 - s_i)/2, the mapping in
the physics conventions), checked here on every basis state by brute force.
"""
import itertools

import numpy as np
import pytest

import gapwise


def energies(p):
    return np.array([p.energy(b) for b in range(2 ** p.qubits)])


def test_file_dict_and_arrays_give_the_same_problem(source_dir):
    from_file = gapwise.problem(source_dir / "data-samples" / "dinner-tables.toml")
    as_dict = gapwise.problem({
        "qubits": 6, "fields": [[0, 0.1]],
        "couplings": {(0, 3): 1.0, (0, 5): 1.0, (1, 2): 1.0, (1, 5): 1.0, (2, 3): 1.0, (4, 5): 1.0,
                      (3, 4): -1.0, (0, 2): 0.5}})
    J = np.zeros((6, 6))
    for (i, j), v in {(0, 3): 1.0, (0, 5): 1.0, (1, 2): 1.0, (1, 5): 1.0, (2, 3): 1.0, (4, 5): 1.0,
                      (3, 4): -1.0, (0, 2): 0.5}.items():
        J[i, j] = v
    h = np.zeros(6)
    h[0] = 0.1
    as_arrays = gapwise.ising(h=h, J=J)
    for p in (as_dict, as_arrays):
        assert p.qubits == 6
        np.testing.assert_array_equal(p.h, from_file.h)
        np.testing.assert_array_equal(p.J, from_file.J)
    # Same couplings in the same order: the same sums, bit for bit.
    np.testing.assert_array_equal(energies(as_dict), energies(from_file))
    # The matrix lists the pairs by (i, j), another summation order: equal to rounding.
    np.testing.assert_allclose(energies(as_arrays), energies(from_file), rtol=0, atol=1e-14)


def test_coupling_matrix_entries_on_both_sides_add_up():
    # x^T M x convention: M[i, j] and M[j, i] both count toward the pair i < j.
    M = np.array([[0.0, 0.25, 0.0], [0.25, 0.0, -0.7], [0.0, 0.0, 0.0]])
    p = gapwise.ising(h=[0.0, 0.3, 0.0], J=M)
    assert p.J[0, 1] == 0.5 and p.J[1, 2] == -0.7 and p.J[1, 0] == 0.0


def test_qubo_matches_the_reader_and_brute_force(source_dir):
    # The garden-beds QUBO of data-samples, given as an upper-triangular matrix.
    Q = np.array([[-3.6, 2.0, 2.0], [0.0, -3.5, 2.0], [0.0, 0.0, -3.3]])
    p = gapwise.qubo(Q, offset=4.0)
    ref = gapwise.problem(source_dir / "data-samples" / "garden-beds-qubo.toml")
    np.testing.assert_array_equal(energies(p), energies(ref))
    assert p.kind == "qubo"
    # E_QUBO(x) = x^T Q x + offset with x_i = bit i of b, by brute force.
    for bits in itertools.product([0, 1], repeat=3):
        x = np.array(bits, dtype=float)
        b = sum(bit << i for i, bit in enumerate(bits))
        assert p.energy(b) == pytest.approx(x @ Q @ x + 4.0, abs=1e-12)
    # Ground state 110 (tomatoes and beans), energy -1.1 (the sample file's own comment).
    assert int(np.argmin(energies(p))) == 0b011
    assert energies(p).min() == pytest.approx(-1.1, abs=1e-12)


def test_schedule_dict_equals_file(source_dir):
    d = {"scales": {"kind": "linear", "a_max_ghz": 5.0, "b_max_ghz": 5.0},
         "path": {"time": "fraction", "duration_ns": 20.0, "points": [[0.0, 0.0], [1.0, 1.0]]}}
    s = gapwise.schedule(d)
    f = gapwise.schedule(source_dir / "schedules" / "linear.toml")
    assert s.duration_ns == f.duration_ns == 20.0
    for x in (0.0, 0.3, 1.0):
        assert s.a_ghz(x) == f.a_ghz(x) and s.b_ghz(x) == f.b_ghz(x)
    p = gapwise.problem(f"{source_dir}/data-samples/triangle.toml")
    assert gapwise.anneal(p, s)["ground_probability"] == gapwise.anneal(p, f)["ground_probability"]


@pytest.mark.parametrize("bad, key, words", [
    ({"qubits": 3, "couplings": [[0, 5, 1.0]]}, "couplings[0]", "out of range"),
    ({"qubits": 2, "colour": "red"}, "colour", "unknown key"),
    ({"qubits": 2, "fields": [0.1, float("nan")]}, "fields[1]", "not finite"),
    ({"fields": [0.1]}, "qubits", "missing"),
    ({"qubits": 2, "couplings": {(0, 0): 1.0}}, "couplings[0]", ""),
])
def test_bad_problem_dict_raises_input_error_naming_the_key(bad, key, words):
    with pytest.raises(gapwise.InputError) as err:
        gapwise.problem(bad)
    e = err.value
    assert isinstance(e, ValueError)
    assert e.key == key
    assert f"key '{key}'" in str(e) and words in str(e)
    assert str(e).startswith("<problem dict>: ") and "Fix: " in str(e)
    assert e.line == 0  # lines of the rendered TOML mean nothing to the caller


def test_diagonal_of_an_ising_coupling_matrix_is_refused():
    with pytest.raises(gapwise.InputError, match=r"key 'couplings\[1\]\[1\]'"):
        gapwise.ising(h=[0, 0], J=np.array([[0.0, 1.0], [0.0, 2.0]]))


def test_bad_schedule_dict_names_the_nested_key():
    with pytest.raises(gapwise.InputError) as err:
        gapwise.schedule({"scales": {"kind": "linear", "a_max_ghz": -1.0, "b_max_ghz": 5.0},
                          "path": {"time": "fraction", "duration_ns": 10, "points": [[0, 0], [1, 1]]}})
    assert err.value.key == "scales.a_max_ghz"


def test_file_errors_carry_the_command_lines_text(tmp_path, gapwise_exe, source_dir):
    import subprocess
    bad = tmp_path / "bad.toml"
    bad.write_text('format = "gapwise-problem"\nqubits = 2\ncouplings = [[0, 1, "x"]]\n')
    with pytest.raises(gapwise.InputError) as err:
        gapwise.problem(bad)
    cli = subprocess.run([gapwise_exe, "gap", str(bad)], capture_output=True, text=True)
    assert cli.returncode == 2
    assert cli.stderr.strip() == f"gapwise: error: {err.value}"
    assert err.value.file == str(bad) and err.value.line == 3


def test_keyword_arguments_are_checked(source_dir):
    p = gapwise.problem(source_dir / "data-samples" / "triangle.toml")
    s = source_dir / "schedules" / "linear.toml"
    with pytest.raises(gapwise.InputError, match="gapwise.anneal: key 'tolerance'"):
        gapwise.anneal(p, s, 10, tolerance=1.0)
    with pytest.raises(gapwise.InputError, match="key 'propagator'"):
        gapwise.anneal(p, s, 10, propagator="euler")
    with pytest.raises(gapwise.InputError, match="key 'duration_ns'"):
        gapwise.anneal(p, s, -3)
    with pytest.raises(gapwise.InputError, match="key 'target'"):
        gapwise.duration_study(p, s, [1, 2], target=1.5)
    with pytest.raises(gapwise.InputError, match="key 'sector'"):
        gapwise.gap_scan(p, sector="even")  # the triangle has fields
    with pytest.raises(TypeError):
        gapwise.problem(42)


def test_a_list_of_triples_keeps_the_files_meaning_even_when_square():
    # Three couplings of a 3-qubit problem form a 3 x 3 list: in a problem dict a
    # list means [[i, j, J_ij], ...] as in the file; only ising(J=...) reads matrices.
    triples = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]
    p = gapwise.problem({"qubits": 3, "couplings": triples})
    assert p.J[0, 1] == 1.0 and p.J[1, 2] == 1.0 and p.J[0, 2] == 1.0
    m = gapwise.ising(h=[0, 0, 0], J=[[0, 1.0, 0], [0, 0, 2.0], [0, 0, 0]])  # a matrix given as lists
    assert m.J[0, 1] == 1.0 and m.J[1, 2] == 2.0 and m.J[0, 2] == 0.0


def test_a_non_square_coupling_matrix_is_refused():
    with pytest.raises(gapwise.InputError, match=r"key 'couplings': the matrix is of shape \(2, 3\)"):
        gapwise.ising(h=[0, 0], J=np.zeros((2, 3)))


def test_utf8_text_survives_the_dict_route():
    p = gapwise.ising(h=[0.1], description="Straßenlaternen — 6 Lampen", labels=["Schule ☀"])
    assert p.description == "Straßenlaternen — 6 Lampen" and p.labels == ["Schule ☀"]


def test_embedding_from_a_dict_equals_the_file(source_dir):
    path = source_dir / "data-samples" / "garden-beds-square-embedding.toml"
    f = gapwise.embedding(path)
    d = gapwise.embedding({"physical_qubits": f.physical_qubits, "chains": f.chains,
                           "couplers": [[0, 1], [1, 2], [2, 3], [3, 0]]})
    assert d.chains == f.chains and d.physical_qubits == f.physical_qubits
    with pytest.raises(gapwise.InputError) as err:
        gapwise.embedding({"chains": [[0, 1], [1, 2]]})
    assert err.value.key == "chains[1]" and str(err.value).startswith("<embedding dict>: ")

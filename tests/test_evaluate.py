import mpmath
import numpy as np
import sympy

from numag.numeric.evaluate import BatchEvaluator, PrecisionEvaluator
from numag.numeric.minors import LinearFormProduct
from numag.system.polynomial import Polynomial
from numag.system.parse import parse_system


def random_system(rng, n_variables, n_equations, degree, n_terms):
    names = [f"x{j}" for j in range(n_variables)]
    equations = []
    for _ in range(n_equations):
        terms = []
        for _ in range(n_terms):
            exponents = rng.multinomial(int(rng.integers(0, degree + 1)), [1 / n_variables] * n_variables)
            coefficient = f"({int(rng.integers(-9, 10))} + {int(rng.integers(-9, 10))}*I)/{int(rng.integers(1, 7))}"
            monomial = "*".join(f"{n}^{e}" for n, e in zip(names, exponents) if e) or "1"
            terms.append(f"{coefficient}*{monomial}")
        equations.append(" + ".join(terms))
    return names, equations


def test_batched_values_and_jacobian_match_sympy():
    # sympy (Meurer et al., PeerJ CS 2017) as the reference library for differentiation and evaluation
    rng = np.random.default_rng(7)
    for trial in range(4):
        n, m = int(rng.integers(1, 5)), int(rng.integers(1, 4))
        names, equations = random_system(rng, n, m, degree=4, n_terms=6)
        system = parse_system(equations, names)
        points = rng.standard_normal((5, n)) + 1j * rng.standard_normal((5, n))
        values, jacobians = BatchEvaluator(system.polynomials).evaluate(points)
        symbols = sympy.symbols(names)
        exprs = [sympy.sympify(e.replace("^", "**"), locals=dict(zip(names, symbols))) for e in equations]
        jac = sympy.Matrix(exprs).jacobian(symbols)
        f_num = sympy.lambdify(symbols, exprs, "numpy")
        j_num = sympy.lambdify(symbols, jac, "numpy")
        for p, point in enumerate(points):
            expected_values = np.array(f_num(*point), dtype=complex)
            expected_jac = np.array(j_num(*point), dtype=complex)
            scale = 1 + np.abs(expected_values).max()
            assert np.abs(values[p] - expected_values).max() < 1e-12 * scale
            assert np.abs(jacobians[p] - expected_jac).max() < 1e-12 * (1 + np.abs(expected_jac).max())


def test_precision_evaluation_matches_sympy_at_50_digits():
    # sympy exact evaluation at a rational point as reference (reference library)
    system = parse_system(["(1 + sqrt(5))/2*x^3*y - 1/3*y^2 + I"], ["x", "y"])
    x, y = sympy.symbols("x y")
    expr = (1 + sympy.sqrt(5)) / 2 * x**3 * y - sympy.Rational(1, 3) * y**2 + sympy.I
    point = {x: sympy.Rational(1, 7), y: sympy.Rational(-2, 3)}
    exact_value = complex(sympy.N(expr.subs(point), 60))
    with mpmath.mp.workdps(50):
        values, jac = PrecisionEvaluator(system.polynomials).evaluate(
            [mpmath.mpf(1) / 7, mpmath.mpf(-2) / 3], mpmath.mp)
        reference = sympy.N(expr.subs(point), 55)
        assert abs(values[0] - mpmath.mpc(str(sympy.re(reference)), str(sympy.im(reference)))) < mpmath.mpf(10) ** -45
        dx = sympy.N(sympy.diff(expr, x).subs(point), 55)
        assert abs(jac[0, 0] - mpmath.mpc(str(sympy.re(dx)), str(sympy.im(dx)))) < mpmath.mpf(10) ** -45
    assert abs(complex(values[0]) - exact_value) < 1e-14


def test_many_points_one_call_agree_with_one_at_a_time():
    system = parse_system(["x^3 - 2*x*y + 1", "y^2 - x"], ["x", "y"])
    evaluator = BatchEvaluator(system.polynomials)
    rng = np.random.default_rng(3)
    points = rng.standard_normal((1000, 2)) + 1j * rng.standard_normal((1000, 2))
    values, jacobians = evaluator.evaluate(points)
    for k in (0, 500, 999):
        v, j = evaluator.evaluate(points[k:k + 1])
        assert np.allclose(v[0], values[k]) and np.allclose(j[0], jacobians[k])


def test_product_of_linear_forms_matches_sympy_and_its_expansion():
    # sympy (Meurer et al., PeerJ CS 2017) differentiates the product; a point where one form vanishes
    # checks the gradient there (the product rule leaves the other forms' product)
    rng = np.random.default_rng(3)
    for degree, size in ((1, 2), (3, 4), (5, 6)):
        rows = rng.integers(-5, 6, size=(degree, size)) + 1j * rng.integers(-5, 6, size=(degree, size))
        product = LinearFormProduct(rows)
        written_out = Polynomial.linear(rows[0])
        for row in rows[1:]:
            written_out = written_out * Polynomial.linear(row)
        symbols = sympy.symbols(f"x0:{size}")
        expression = sympy.Mul(*[sum(sympy.Integer(int(c.real)) * s + sympy.I * int(c.imag) * s
                                     for c, s in zip(row, symbols)) for row in rows])
        gradient = [sympy.diff(expression, s) for s in symbols]
        points = rng.standard_normal((4, size)) + 1j * rng.standard_normal((4, size))
        points[0, -1] = -(rows[0, :-1] @ points[0, :-1]) / rows[0, -1] if rows[0, -1] else points[0, -1]
        values, jacobian = product.evaluate(points)
        expanded_values, expanded_jacobian = BatchEvaluator([written_out]).evaluate(points)
        for p, point in enumerate(points):
            at = dict(zip(symbols, point))
            expected = complex(expression.subs(at))
            expected_gradient = np.array([complex(g.subs(at)) for g in gradient])
            scale = 1 + np.abs(expected_gradient).max()
            assert abs(values[p, 0] - expected) <= 1e-12 * scale
            assert np.abs(jacobian[p, 0] - expected_gradient).max() <= 1e-12 * scale
            assert abs(expanded_values[p, 0] - expected) <= 1e-12 * scale
            assert np.abs(expanded_jacobian[p, 0] - expected_gradient).max() <= 1e-12 * scale
        assert np.allclose(product.evaluate(points, jacobian=False), values, rtol=0, atol=0)


def test_values_and_weighted_jacobian_from_their_own_monomials_match_sympy():
    # sympy (Meurer et al., PeerJ CS 2017) as the reference library for differentiation and evaluation. The
    # systems make every group of monomials appear: homogeneous quadrics (F's and J's monomials disjoint), mixed
    # degrees (shared monomials), a constant equation (no Jacobian monomial) and a linear one (J constant).
    rng = np.random.default_rng(11)
    names = ["x", "y", "z"]
    systems = [["2*x^2 - 3*x*y + z^2", "x*z + 5*y^2 - 7*y*z", "x^2 + y^2 + z^2"],
               ["x^3*y - 2*z + 1", "x*y*z - 4", "y^2 - x + 3*z^4"],
               ["7", "x - 2*y + 3*z", "x*y^2 - z"]]
    symbols = sympy.symbols(names)
    for equations in systems:
        evaluator = BatchEvaluator(parse_system(equations, names).polynomials, spare_columns=2)
        points = rng.standard_normal((4, 3)) + 1j * rng.standard_normal((4, 3))
        weights = rng.standard_normal(4) + 1j * rng.standard_normal(4)
        raw = evaluator.raw(points, jacobian_weights=weights)
        alone = evaluator.evaluate(points, jacobian=False)
        exprs = [sympy.sympify(e.replace("^", "**"), locals=dict(zip(names, symbols))) for e in equations]
        f_num = sympy.lambdify(symbols, exprs, "numpy")
        j_num = sympy.lambdify(symbols, sympy.Matrix(exprs).jacobian(symbols), "numpy")
        for p, point in enumerate(points):
            expected_values = np.array(f_num(*point), dtype=complex)
            expected_jacobian = weights[p] * np.array(j_num(*point), dtype=complex)
            value_scale = 1 + np.abs(expected_values).max()
            assert np.abs(raw[p, :3] - expected_values).max() < 1e-12 * value_scale
            assert np.abs(alone[p] - expected_values).max() < 1e-12 * value_scale
            assert np.abs(raw[p, 3:12].reshape(3, 3) - expected_jacobian).max() < 1e-12 * (
                1 + np.abs(expected_jacobian).max())
            assert np.all(raw[p, 12:] == 0)  # the spare columns a caller fills in place


def test_monomial_table_rows_as_numpy_orders_them():
    # numpy's np.unique(rows, axis=0) as the reference (common practice, no source): the evaluator's monomials
    # come from sorted_unique_rows (decision 0094) and must be numpy's rows, order and inverse exactly
    from numag.system.polynomial import sorted_unique_rows
    for seed in (1, 2, 3):
        rng = np.random.default_rng(seed)
        for _ in range(30):
            rows, columns = int(rng.integers(1, 80)), int(rng.integers(1, 12))
            table = rng.integers(0, int(rng.integers(1, 6)), size=(rows, columns))
            unique, inverse = sorted_unique_rows(table)
            expected, expected_inverse = np.unique(table, axis=0, return_inverse=True)
            assert np.array_equal(unique, expected)
            assert np.array_equal(inverse, expected_inverse.reshape(-1))
        names, equations = random_system(rng, 3, 2, degree=3, n_terms=5)
        evaluator = BatchEvaluator(parse_system(equations, names).polynomials)
        assert np.array_equal(evaluator.monomials[np.lexsort(evaluator.monomials.T[::-1])],
                              np.unique(evaluator.monomials, axis=0))

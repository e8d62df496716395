"""Units for the numerical work: scale the variables and equations so that coefficients are near 1.

Every threshold numag uses (rank, residual, clustering, trace, membership, "at infinity") is
relative to numbers of order one. A linkage in millimetres has constants like 90000, a circle of
radius 1e-12 has the constant 1e-24: measured against those, the thresholds decide wrongly. So
before any numerical work the problem is rewritten in units of its own (Meintjes and Morgan,
"A methodology for solving chemical equilibrium systems", Appl. Math. Comput. 1987; Morgan,
"Solving Polynomial Systems Using Continuation for Engineering and Scientific Problems",
Prentice-Hall 1987, chapter on scaling):

    x_j = 10^(c_j) y_j,        g_i(y) = 10^(r_i) f_i(10^c y),

with integers c_j and r_i chosen by linear least squares so that
log10|a_ik| + r_i + sum_j e_ikj c_j is as close to 0 as possible over all terms a_ik x^e_ik.
The minimum-norm solution is rounded to integers: powers of ten keep exact (rational) input
exact, and a change of units by a power of ten changes the solution by exactly that power, so
the scaled problem, and with it every decision, is the same in millimetres and in metres.

Points are reported in the user's coordinates; :class:`Scaling` maps them both ways, together
with slicing hyperplanes and homogeneous points at infinity.

Examples
--------
>>> from numag.system.parse import parse_system
>>> system = parse_system(["x^2 + y^2 - 1/10^24"], ["x", "y"])
>>> scaling = Scaling.balancing(system)
>>> scaling.variable_exponents, scaling.equation_exponents
((-12, -12), (24,))
>>> scaling.scale_system(system).to_texts()
['x^2 + y^2 - 1']
"""

from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..errors import InputError
from ..system.exact import ExactCoefficient
from ..system.polynomial import Polynomial, PolynomialSystem

__all__ = ["Scaling"]


#: Largest power of ten a scaling may use (10^e and its square root stay doubles).
_MAX_EXPONENT = 300
#: A term below this fraction of its equation's largest (in the balanced units) does not set the units (decision 0102).
TINY_TERM = 1e-5
#: Up to this many matrix entries (terms times unknowns) the balancing is solved dense (8 MB).
_DENSE_BALANCING_ENTRIES = 1_000_000

@dataclass(frozen=True)
class Scaling:
    """Powers of ten relating the user's problem to the one numag computes with.

    Attributes
    ----------
    variable_exponents : tuple of int
        c_j: the user's x_j is 10^c_j times the computed y_j.
    equation_exponents : tuple of int
        r_i: the computed equation i is 10^r_i times the user's (in the variables y).
    """

    variable_exponents: tuple
    equation_exponents: tuple

    # -- construction ---------------------------------------------------------------------------
    @classmethod
    def identity(cls, system):
        """No change of units."""
        return cls((0,) * system.n_variables, (0,) * system.n_equations)

    @classmethod
    def balancing(cls, system, floor=None, ignore_tiny=False, fixed=None):
        """The least-squares balancing of the system's coefficient magnitudes (see the module notes).

        Parameters
        ----------
        system : PolynomialSystem
        floor : float, optional
            Leave out terms whose coefficient is below ``floor`` times the largest of their polynomial. A system
            centred at a point known to 12 digits (decision 0084) has constant and linear terms of that rounding's
            size where F and J vanish at the point; fitted like the others, they set the units (1e-8 of the
            features' size seen at a crossing of a plane and a line).
        ignore_tiny : bool, default False
            Fit a second time without the terms below :data:`TINY_TERM` of their equation's largest in the first
            fit's units (decision 0102; `solve`'s first run). Not with a ``floor``.
        fixed : dict, optional
            Variable index -> power of ten given beforehand (a parameter's unit from its range, decision 0102);
            the other powers are fitted around them.

        Returns
        -------
        Scaling
        """
        fitted = cls._fitted(system, floor, fixed=fixed)
        if not ignore_tiny or floor is not None:
            return fitted
        # Tiny terms do not set the units (decision 0102): terms below TINY_TERM of their equation's largest, in
        # the fitted units (ratios there are the same in any units), are left out of a second fit, unless an
        # unknown is in no other term. A perturbation of 1e-6 beside terms of 1 put the solutions of
        # p = x^4 - 5 x^2 + 4 + (tiny terms) at p = 4000 in the computed units, where the endgame merged them with
        # the point at infinity (every path "at infinity", exit 0).
        tiny = fitted._tiny_terms(system)
        if not any(np.any(t) for t in tiny):
            return fitted
        return cls._fitted(system, None, tiny, fixed=fixed)

    def _tiny_terms(self, system):
        """Per polynomial, a mask of the terms below :data:`TINY_TERM` of the largest in these units (an unknown
        whose every term is tiny keeps them: nothing else would fix its unit)."""
        variable = np.asarray(self.variable_exponents, dtype=float)
        masks, exponent_arrays = [], []
        held = np.zeros(system.n_variables, dtype=bool)  # unknowns in some term that stays
        for i, p in enumerate(system.polynomials):
            exponents = np.asarray(p.exponents, dtype=float).reshape(-1, system.n_variables)
            with np.errstate(divide="ignore"):
                sizes = np.log10(np.abs(np.asarray(p.numeric_coefficients(), dtype=complex))) \
                    + self.equation_exponents[i] + exponents @ variable
            finite = np.isfinite(sizes)
            top = float(np.max(sizes[finite])) if np.any(finite) else 0.0
            mask = finite & (sizes < top + np.log10(TINY_TERM))
            held |= np.any(exponents[finite & ~mask] > 0, axis=0)
            masks.append(mask)
            exponent_arrays.append(exponents)
        if not np.all(held):
            for mask, exponents in zip(masks, exponent_arrays):
                mask &= ~np.any(exponents[:, ~held] > 0, axis=1)
        return masks

    @classmethod
    def _fitted(cls, system, floor, left_out=None, fixed=None):
        """The least-squares fit itself, without the terms ``floor`` or ``left_out`` (masks per polynomial) leave out,
        with the powers of ``fixed`` (variable index -> power) given."""
        n, m = system.n_variables, system.n_equations
        fixed = {int(j): int(c) for j, c in (fixed or {}).items()}
        rows, cols, data, rhs = [], [], [], []
        count = 0
        for i, p in enumerate(system.polynomials):
            magnitudes = np.abs(p.numeric_coefficients())
            least = floor * float(np.max(magnitudes, initial=0.0)) if floor else 0.0
            for k, (exponents, magnitude) in enumerate(zip(p.exponents, magnitudes)):
                if not magnitude > least or not np.isfinite(magnitude):
                    continue
                if left_out is not None and left_out[i][k]:
                    continue
                rows.append(count)
                cols.append(i)
                data.append(1.0)
                given = 0.0
                for j in np.nonzero(exponents)[0]:
                    if int(j) in fixed:  # its power is known: its share moves to the right-hand side
                        given += float(exponents[j]) * fixed[int(j)]
                        continue
                    rows.append(count)
                    cols.append(m + int(j))
                    data.append(float(exponents[j]))
                rhs.append(-np.log10(magnitude) - given)
                count += 1
        if count == 0:
            return cls.identity(system)
        # Both solvers give the minimum-norm least-squares solution: unknowns the terms do not fix
        # (a variable in no equation; the common factor of a projective system) stay at 0.
        if count * (m + n) <= _DENSE_BALANCING_ENTRIES:
            # numpy's SVD-based solver: no scipy import (a third of a small solve's start; decision 0051)
            matrix = np.zeros((count, m + n))
            np.add.at(matrix, (np.array(rows), np.array(cols)), np.array(data))
            solution = np.linalg.lstsq(matrix, np.array(rhs), rcond=None)[0]
        else:
            from scipy.sparse import csr_matrix  # imported where used: `import numag` stays fast
            from scipy.sparse.linalg import lsqr

            matrix = csr_matrix((data, (rows, cols)), shape=(count, m + n))
            # lsqr from zero converges to the minimum-norm solution
            solution = lsqr(matrix, np.array(rhs), atol=1e-12, btol=1e-12, iter_lim=50 * (m + n) + 100)[0]
        exponents = np.rint(solution).astype(np.int64)
        for j, power in fixed.items():  # their columns were empty: the minimum-norm solution left them at 0
            exponents[m + j] = power
        return cls(tuple(int(c) for c in exponents[m:]), tuple(int(r) for r in exponents[:m]))

    # -- queries --------------------------------------------------------------------------------
    @property
    def is_identity(self):
        """True when nothing is scaled."""
        return not any(self.variable_exponents) and not any(self.equation_exponents)

    @property
    def variable_factors(self):
        """10^c_j as floats: x = variable_factors * y."""
        return 10.0 ** np.array(self.variable_exponents, dtype=float)

    # -- the system -----------------------------------------------------------------------------
    def scale_system(self, system):
        """The system in the computed units: g_i(y) = 10^r_i f_i(10^c y); exact input stays exact.

        Parameters
        ----------
        system : PolynomialSystem

        Returns
        -------
        PolynomialSystem
            Same variable names, kind and name.
        """
        if len(self.variable_exponents) != system.n_variables or len(self.equation_exponents) != system.n_equations:
            raise InputError("the scaling does not fit the system (other numbers of variables or equations)")
        if self.is_identity:
            return system
        c = np.array(self.variable_exponents, dtype=np.int64)
        scaled = []
        for r, p in zip(self.equation_exponents, system.polynomials):
            powers = p.exponents @ c + int(r)  # the power of ten each term is multiplied by
            if p.is_exact:
                # one exact factor per power of ten; a term multiplied by 10^0 is kept as it is
                factors = {k: ExactCoefficient.rational(Fraction(10) ** k) for k in set(powers.tolist()) if k}
                coefficients = np.array([a * factors[k] if k else a for a, k in zip(p.coefficients, powers.tolist())],
                                        dtype=object)
            else:
                coefficients = p.numeric_coefficients() * 10.0 ** powers.astype(float)
            scaled.append(Polynomial(p.exponents, coefficients, p.n_variables))
        balanced = PolynomialSystem(system.variables, scaled, system.projective, system.name)
        # the numbers as written decide whether the input is exact (decision 0062); powers of ten keep their digits,
        # and the expanded exact coefficients times 10^k would otherwise read as printed doubles (decision 0109)
        balanced.literal_digits = getattr(system, "literal_digits", None)
        return balanced

    # -- points and hyperplanes -----------------------------------------------------------------
    def to_user(self, points):
        """Points in the computed units (rows y) -> the user's coordinates x = 10^c y."""
        return np.asarray(points, dtype=complex) * self.variable_factors

    def to_computed(self, points):
        """The user's points x -> computed coordinates y = 10^-c x."""
        return np.asarray(points, dtype=complex) / self.variable_factors

    def homogeneous_to_user(self, points):
        """Homogeneous points (w, y) of affine input (the homogenising coordinate first) -> (w, 10^c y)."""
        points = np.asarray(points, dtype=complex)
        return points * np.concatenate([[1.0], self.variable_factors])

    def hyperplanes_to_user(self, rows):
        """Hyperplanes a . (1, y) = 0 in computed units -> the same hyperplanes as b . (1, x) = 0.

        Rows keep unit norm (the hyperplane does not change).

        Examples
        --------
        >>> s = Scaling((3,), (0,))
        >>> rows = np.array([[1.0, -1.0]])             # y = 1, i.e. x = 1000
        >>> back = s.hyperplanes_to_user(rows)
        >>> round(float((-back[0, 0] / back[0, 1]).real))
        1000
        """
        rows = np.asarray(rows, dtype=complex) / np.concatenate([[1.0], self.variable_factors])
        return _unit_rows(rows)

    def hyperplanes_to_computed(self, rows):
        """Hyperplanes b . (1, x) = 0 in the user's coordinates -> a . (1, y) = 0 (unit rows)."""
        rows = np.asarray(rows, dtype=complex) * np.concatenate([[1.0], self.variable_factors])
        return _unit_rows(rows)

    # -- reports --------------------------------------------------------------------------------
    def to_json(self, variables):
        """The ``scaling`` block of a report."""
        return {"base": 10,
                "variables": {name: int(c) for name, c in zip(variables, self.variable_exponents)},
                "equations": [int(r) for r in self.equation_exponents],
                "meaning": "x = 10^variables[x] * y for each unknown; equation i is multiplied by "
                           "10^equations[i]; every tolerance applies to the problem in y"}

    @classmethod
    def from_json(cls, block, variables):
        """Read a ``scaling`` block back (see :meth:`to_json`)."""
        try:
            exponents = tuple(int(block["variables"][name]) for name in variables)
            equations = tuple(int(r) for r in block["equations"])
        except (KeyError, TypeError, ValueError) as err:
            raise InputError(f"the report's scaling block is malformed ({err})") from None
        if any(abs(e) > _MAX_EXPONENT for e in exponents + equations):  # 10^e must be a double
            raise InputError(f"the report's scaling block has a power of ten beyond 10^{_MAX_EXPONENT}")
        return cls(exponents, equations)


def _unit_rows(rows):
    norms = np.linalg.norm(rows, axis=1, keepdims=True)
    return rows / np.where(norms > 0, norms, 1.0)

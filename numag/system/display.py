"""Short text and HTML tables for the results' ``repr`` and notebooks' ``_repr_html_``.

Every result type (check reports, solutions, decompositions, singular loci, comparisons,
certificates) shows itself in one or two lines, and as an HTML table in a notebook. The helpers
sit in the lowest package so that every result type, whatever its package, uses the same ones.

Examples
--------
>>> short_point([1 + 1e-17j, -0.5 + 2j, 1e-20])
'(1, -0.5+2i, 0)'
>>> html_table("2 points", ["#", "verdict"], [[1, "smooth"], [2, "<off>"]])[:61]
'<table><caption>2 points</caption><thead><tr><th>#</th><th>ve'
"""

import math

__all__ = ["counted", "short_number", "short_point", "html_table"]

#: Parts of a coordinate below this, relative to the point, are rounding noise in a short display.
_NOISE = 1e-12


def counted(count, noun, plural=None):
    """A count with its noun in the right number: ``1 equation``, ``2 equations``, ``0 batches``.

    Examples
    --------
    >>> counted(1, "equation"), counted(3, "batch", "batches"), counted(0, "singular point")
    ('1 equation', '3 batches', '0 singular points')
    """
    return f"{count} {noun if count == 1 else (plural or noun + 's')}"


def short_number(z, floor=0.0, digits=6):
    """A complex number in a few significant digits; parts at most ``floor`` shown as 0.

    Examples
    --------
    >>> short_number(3 - 1e-15j, floor=1e-12), short_number(-2j)
    ('3', '-2i')
    """
    z = complex(z)
    real = 0.0 if abs(z.real) <= floor else z.real
    imag = 0.0 if abs(z.imag) <= floor else z.imag
    if imag == 0.0:
        return f"{real + 0.0:.{digits}g}"
    if real == 0.0:
        return f"{imag:.{digits}g}i"
    return f"{real:.{digits}g}{'+' if imag > 0 else '-'}{abs(imag):.{digits}g}i"


def short_point(point, digits=6):
    """A point in parentheses, a few digits per coordinate, rounding noise shown as 0."""
    values = [complex(v) for v in point]
    size = math.sqrt(1.0 + sum(abs(v) ** 2 for v in values))
    return "(" + ", ".join(short_number(v, _NOISE * size, digits) for v in values) + ")"


def html_table(caption, header, rows):
    """An HTML table (every cell escaped) with a caption, for ``_repr_html_``."""
    import html  # here: the html package loads its entity table, and only notebooks ask for HTML

    def cells(tag, values):
        return "".join(f"<{tag}>{html.escape(str(v))}</{tag}>" for v in values)
    body = "".join(f"<tr>{cells('td', row)}</tr>" for row in rows)
    return (f"<table><caption>{html.escape(str(caption))}</caption><thead><tr>{cells('th', header)}</tr></thead>"
            f"<tbody>{body}</tbody></table>")

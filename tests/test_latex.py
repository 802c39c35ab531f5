"""The LaTeX of the result types and their display in a notebook.

Each formula is read back (tests/latex_support.py: a parser of our subset
and a reader of numbers into sympy) and compared with something outside the
package: sympy's continued fractions and arithmetic, brute-force searches,
published values. The notebook display goes through IPython's own formatter.
"""

from __future__ import annotations

import importlib.util
import re
from fractions import Fraction
from pathlib import Path
from types import ModuleType

import mpmath
import pytest
import sympy
from hypothesis import example, given
from hypothesis import strategies as st
from sympy.ntheory.continued_fraction import continued_fraction_periodic

from realquad import latex
from realquad.cfrac import continued_fraction
from realquad.classgroup import class_group
from realquad.core.forms import Form
from realquad.core.ideals import Ideal
from realquad.core.numbers import QuadraticNumber
from realquad.equations.conics import solve_quadratic
from realquad.equations.norm import solve_norm_equation
from realquad.equations.pell import pell
from realquad.errors import RealquadError
from realquad.splitting import form_primes
from realquad.units import fundamental_unit, regulator, unit_group
from tests.latex_support import (
    check_latex,
    compile_document,
    compile_latex,
    latex_engine,
    to_sympy,
)

# -- integers, as the terminal summarises them ---------------------------------------------


@pytest.mark.parametrize("n", [7**500, -(3**2000), 10**60, 2**200 - 1])
def test_long_integers_keep_their_ends_and_length(n: int) -> None:
    # Python's own decimal conversion is the reference (all these have < 4300 digits)
    text = str(abs(n))
    out = latex.integer(n, max_digits=40)
    m = re.fullmatch(r"(-?)\\underbrace\{(\d+)\\ldots (\d+)\}_\{(\d+)\\text\{ digits\}\}", out)
    assert m is not None, out
    assert (m[1] == "-") == (n < 0)
    assert (m[2], m[3], int(m[4])) == (text[:20], text[-20:], len(text))
    assert latex.integer(n, max_digits=0) == str(n)


def test_short_integers_are_written_in_full() -> None:
    # the terminal never summarises an integer of at most 18 digits (cli.output.Sizer)
    assert latex.integer(10**17, max_digits=5) == str(10**17)


# -- surds, forms, ideals: read back and compared with sympy --------------------------------


@given(
    st.integers(-(10**12), 10**12),
    st.integers(-(10**12), 10**12),
    st.integers(1, 50),
    st.sampled_from([2, 3, 5, 13, 61, -1, -3, -14]),
)
def test_a_number_reads_back_as_itself(x: int, y: int, c: int, d: int) -> None:
    number = QuadraticNumber(x, y, c, d)
    value = (number.x + number.y * sympy.sqrt(d)) / number.c  # sympy's arithmetic
    assert sympy.simplify(to_sympy(number.to_latex()) - value) == 0


@given(st.integers(-50, 50), st.integers(-50, 50), st.integers(-50, 50))
def test_a_form_reads_back_as_its_polynomial(a: int, b: int, c: int) -> None:
    D = b * b - 4 * a * c
    if D == 0 or (D < 0 and a < 0) or (D > 0 and sympy.sqrt(D).is_integer):
        return
    x, y = sympy.symbols("x y")
    written = to_sympy(Form(a, b, c).to_latex(), x=x, y=y)
    assert sympy.expand(written - (a * x**2 + b * x * y + c * y**2)) == 0


def test_an_ideal_is_its_two_generators() -> None:
    I = Ideal(316, 1, 3, 2)
    m = re.fullmatch(r"\\left\[(\d+), (.*)\\right\]", I.to_latex())
    assert m is not None
    assert int(m[1]) == 3
    assert sympy.simplify(to_sympy(m[2]) - (-2 + sympy.sqrt(316)) / 2) == 0


# -- continued fractions: the period under the bar, against sympy ---------------------------


def _read_expansion(text: str) -> tuple[list[int], list[int]]:
    """``[a_0; a_1, \\overline{…}]`` back to (pre-period, period)."""
    m = re.fullmatch(r"\[(.*?)(?:; (.*?))?\]", text.split(" = ", 1)[1])
    assert m is not None, text
    head = (m[1] + (", " + m[2] if m[2] else "")).replace(r"\overline{", "|").rstrip("}")
    pre_text, _, per_text = head.partition("|")
    numbers = [int(t) for t in re.split(r"[,;]\s*", pre_text.strip(", ")) if t.strip()]
    period = [int(t) for t in per_text.split(", ")] if per_text else []
    return numbers, period


@pytest.mark.parametrize(
    ("expression", "P", "Q", "D"),
    [("61", 0, 1, 61), ("(1+sqrt(13))/2", 1, 2, 13), ("94", 0, 1, 94), ("(3+sqrt(7))/2", 3, 2, 7)],
)
def test_the_bar_covers_exactly_sympys_period(expression: str, P: int, Q: int, D: int) -> None:
    cf = continued_fraction(expression)
    pre, period = _read_expansion(cf.to_latex())
    expected = continued_fraction_periodic(P, Q, D)  # sympy: [a0, …, [period]]
    assert pre == expected[:-1] and period == expected[-1]
    assert sympy.simplify(to_sympy(cf.to_latex().split(" = ")[0]) - (P + sympy.sqrt(D)) / Q) == 0


def test_a_rational_number_has_no_bar() -> None:
    cf = continued_fraction("-7/3")
    assert r"\overline" not in cf.to_latex()
    assert _read_expansion(cf.to_latex()) == ([-3, 1, 2], [])
    # -7/3 = -3 + 1/(1 + 1/2), by hand
    assert Fraction(-3) + 1 / (1 + Fraction(1, 2)) == Fraction(-7, 3)


def test_a_long_period_is_written_over_rows() -> None:
    cf = continued_fraction("1051")
    expected = continued_fraction_periodic(0, 1, 1051)  # sympy: [a0, [period of length 50]]
    period = len(expected[-1])
    out = cf.to_latex(max_terms=0)
    check_latex(out)
    rows = out.removeprefix(r"\begin{gathered}").removesuffix(r"\end{gathered}").split("\\\\\n")
    assert rows[0] == rf"\sqrt{{1051}} = [a_{{0}}; \overline{{a_{{1}}, \ldots, a_{{{period}}}}}]"
    written = " ".join(rows[1:]).split(" = (", 1)[1]
    assert [int(t) for t in re.findall(r"\d+", written)] == expected[:-1] + expected[-1]
    assert rf"\ldots\ ({1 + period}\text{{ in all}})" in cf.to_latex(max_terms=5)


# -- units, class groups, Pell and norm equations -------------------------------------------


def test_the_unit_of_94() -> None:
    out = fundamental_unit(4 * 94).to_latex(regulator_digits=12)
    unit = re.search(r"\\varepsilon = (.*?),\\quad", out)
    assert unit is not None
    value = to_sympy(unit[1])
    assert value == 2143295 + 221064 * sympy.sqrt(94)  # from memory; norm checked next
    assert sympy.expand(value * (2143295 - 221064 * sympy.sqrt(94))) == 1
    assert r"N(\varepsilon) = 1" in out
    # log(2143295 + 221064√94) by mpmath directly
    assert r"\log\varepsilon = 15.2710021030" in out
    assert mpmath.nstr(mpmath.log(2143295 + 221064 * mpmath.sqrt(94)), 12) == "15.271002103"


def test_a_compact_form_is_the_unit() -> None:
    # 2143295 + 221064√94 (from memory, its norm checked above), found here in the infrastructure
    unit = fundamental_unit(4 * 94, method="bsgs")
    product = to_sympy(unit.compact().to_latex())
    assert sympy.simplify(product - (2143295 + 221064 * sympy.sqrt(94))) == 0


def test_roots_of_unity() -> None:
    out = unit_group(-4).to_latex()
    assert r"\cong C_{4}" in out and to_sympy(out.split(r"\zeta = ")[1]) == sympy.I


def _reduced_forms(D: int) -> int:
    """Brute force: reduced positive definite forms of discriminant D < 0 (|b| ≤ a ≤ c, b ≥ 0 at the edges)."""
    count = 0
    a = 1
    while 3 * a * a <= -D:
        for b in range(-a + 1, a + 1):
            if (b * b - D) % (4 * a) == 0:
                c = (b * b - D) // (4 * a)
                if c >= a and not (b < 0 and a == c) and sympy.gcd(sympy.gcd(a, b), c) == 1:
                    count += 1
        a += 1
    return count


@pytest.mark.parametrize(
    ("D", "group"),
    [
        (-56, "C_{4}"),  # h(−56) = 4 by the brute force; cyclic: 3x² + 2xy + 5y² has order 4
        (-84, r"C_{2} \times C_{2}"),  # 21 is idoneal (OEIS A000926): one class per genus
        (-23, "C_{3}"),  # h(−23) = 3, OEIS A006641 lists −23 (from memory)
    ],
)
def test_imaginary_class_groups(D: int, group: str) -> None:
    out = class_group(D).to_latex()
    h = _reduced_forms(D)
    assert rf"\operatorname{{Cl}}({D}) \cong {group},\quad h = {h}," in out


def test_a_real_class_group_and_its_narrow_group() -> None:
    # h(Q(√79)) = 3 (from memory); ε = 80 + 9√79 has norm 80² − 79·9² = +1, so h⁺ = 2h
    assert 80**2 - 79 * 9**2 == 1
    out = class_group(4 * 79).to_latex()
    check_latex(out)
    assert r"\operatorname{Cl}(316) \cong C_{3},\quad h = 3" in out
    assert r"\operatorname{Cl}^{+}(316) \cong C_{6},\quad h^{+} = 6" in out
    assert r"N(\varepsilon) = 1" in out


def _brute_force(d: int, n: int, box: int) -> set[tuple[int, int]]:
    """Every (x, y) with |x|, |y| ≤ box and x² − dy² = n, by search."""
    found = set()
    for y in range(-box, box + 1):
        r = n + d * y * y
        if r >= 0:
            x = sympy.integer_nthroot(r, 2)
            if x[1] and x[0] <= box:
                found |= {(x[0], y), (-x[0], y)}
    return found


def _members(line: str, d: int, box: int) -> set[tuple[int, int]]:
    """The points of a family ``x + y√d = ±(α)(ε)^{k}`` (or ``±(ε)^{2k+1}``) read from its LaTeX."""
    left, right = line.split(",\\quad k")[0].split(" = ", 1)
    k = sympy.Symbol("k")
    half = left.startswith(r"\frac")
    found = set()
    for j in range(-6, 7):
        value = sympy.expand(sympy.radsimp(to_sympy(right.replace(r"\pm", ""), k=k).subs(k, j)))
        x, rest = value.as_independent(sympy.sqrt(d))
        y = sympy.expand(rest / sympy.sqrt(d))
        if half:
            x, y = 2 * x, 2 * y
        for s in (1, -1):
            if abs(x) <= box and abs(y) <= box:
                found.add((int(s * x), int(s * y)))
    return found


@pytest.mark.parametrize(("d", "n"), [(2, -1), (13, -4), (2, 1), (13, 4)])
def test_pell_families_are_every_solution(d: int, n: int) -> None:
    out = pell(d, n).to_latex()
    check_latex(out)
    family = [row for row in out.split("\\\\\n") if r"k \in \mathbb{Z}" in row]
    assert len(family) == 1
    box = 2000
    assert _members(family[0].removesuffix(r"\end{gathered}"), d, box) == _brute_force(d, n, box)


@pytest.mark.parametrize(("d", "n"), [(13, -4), (6, 3), (7, 9), (10, -9)])
def test_norm_equation_families_are_every_solution(d: int, n: int) -> None:
    out = solve_norm_equation(d, n).to_latex()
    check_latex(out)
    rows = [r.removesuffix(r"\end{gathered}") for r in out.split("\\\\\n")]
    assert rows[0].endswith(f"y^{{2}} = {n}:")
    box = 3000
    found: set[tuple[int, int]] = set()
    for row in rows[1:]:
        found |= _members(row, d, box)
    assert found == _brute_force(d, n, box)


def test_primes_of_the_form_x2_plus_5y2() -> None:
    out = form_primes(Form(1, 0, 5), 100).to_latex()
    check_latex(out)
    listed = {int(p) for p in re.findall(r"(\d+) = F\(", out)}
    # brute force: the primes p ≤ 100 with p = x² + 5y²
    expected = {x * x + 5 * y * y for x in range(11) for y in range(5)}
    assert listed == {p for p in expected if p <= 100 and sympy.isprime(p)}
    # p = x² + 5y² ⇔ p ≡ 1, 9 (mod 20) for p ∤ 20: D. A. Cox, Primes of the form x² + ny² (1989), §1
    assert r"p \equiv 1, 9 \pmod{20}" in out


# -- the notebook: IPython's formatter, and short reprs ---------------------------------------


def _results() -> list[object]:
    return [
        QuadraticNumber(1, 1, 2, 5),
        Form(3, 7, -2),
        Ideal(316, 1, 3, 2),
        continued_fraction("(1+sqrt(13))/2"),
        fundamental_unit(4 * 94),
        regulator(4 * 94, 12),
        unit_group(-3),
        class_group(4 * 79),
        pell(61),
        pell(3, -1),
        solve_norm_equation(13, -4),
        form_primes(Form(1, 0, 14), 50),
    ]


@pytest.mark.parametrize("result", _results(), ids=lambda r: type(r).__name__)
def test_the_notebook_shows_latex_and_html(result: object) -> None:
    formatters = pytest.importorskip("IPython.core.formatters")
    data, _ = formatters.DisplayFormatter().format(result)
    shown = data["text/latex"]
    assert shown.startswith("$$") and shown.endswith("$$")
    check_latex(shown[2:-2], ascii_only=False)
    assert data["text/html"].startswith('<div class="realquad">$$')
    if getattr(result, "method", None) is not None:
        assert f"proof: {result.proof}" in data["text/html"]  # type: ignore[attr-defined]
    assert data["text/plain"] == repr(result) and len(repr(result)) < 600


def test_a_repr_stays_short_whatever_the_size() -> None:
    s = pell(10**9 + 7)
    assert s.x is not None and s.x > 10**5000  # more than Python's str() converts
    assert len(repr(s)) < 400 and "digits)" in repr(s)
    assert "digits)" in repr(QuadraticNumber(s.x, s.y, 1, 10**9 + 7))


# -- the LaTeX compiles (with an engine), or at least parses ----------------------------------


def test_every_result_compiles(tmp_path: Path) -> None:
    fragments = [r.to_latex_display() for r in _results()]  # type: ignore[attr-defined]
    for fragment in fragments:
        check_latex(fragment)
    if latex_engine() is None:
        pytest.skip("no LaTeX engine (pdflatex, lualatex, tectonic) installed; parsed only")
    compile_latex(fragments, tmp_path)


# -- the example set: the seminar handout on Q(√79) (docs/examples/latex_note.py) ------------


def _handout_module() -> ModuleType:
    path = Path(__file__).resolve().parents[1] / "docs" / "examples" / "latex_note.py"
    spec = importlib.util.spec_from_file_location("latex_note", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_the_handout(tmp_path: Path) -> None:
    handout = _handout_module()
    formulas = handout.formulas()
    assert len(formulas) == 6
    for formula in formulas:
        check_latex(formula)
    # sympy: √79 = [8; (1, 7, 1, 16)]
    assert _read_expansion(formulas[0].split("\n")[1]) == ([8], [1, 7, 1, 16])
    assert continued_fraction_periodic(0, 1, 79) == [8, [1, 7, 1, 16]]
    if latex_engine() is None:
        pytest.skip("no LaTeX engine installed; the formulas were parsed one by one")
    document = handout.handout()
    (tmp_path / "q79.tex").write_text(document, encoding="utf-8")
    log = compile_document(tmp_path / "q79.tex")
    assert "Overfull \\hbox" not in log  # every formula of the handout fits the page


# -- any equation: the solutions read back from the LaTeX are the brute-force ones -----------


def _column(text: str) -> tuple[int, ...]:
    return tuple(int(v) for v in re.findall(r"-?\d+", text))


def _read_solutions(out: str, box: int) -> set[tuple[int, int]]:
    """Every solution in the box that the LaTeX of an equation's solutions describes."""
    found: set[tuple[int, int]] = set()
    t, k = sympy.symbols("t k")
    body = out.removeprefix(r"\begin{gathered}").removesuffix(r"\end{gathered}")
    in_set = False
    for row in body.split("\\\\\n"):
        listed = re.search(r"\(x, y\) \\in \\\{(.*)\\\}$", row)
        if row.startswith("S = \\{") or in_set:  # a set too long for one row, over rows
            found |= {(int(a), int(b)) for a, b in re.findall(r"\((-?\d+), (-?\d+)\)", row)}
            in_set = not row.endswith("\\}")
        elif row.endswith(r"(x, y) \in S") or row.endswith(":"):
            continue  # a set named on the rows below, or the equation itself
        elif listed:
            found |= {(int(a), int(b)) for a, b in re.findall(r"\((-?\d+), (-?\d+)\)", listed[1])}
        elif row.startswith("(x, y) = ("):
            X, Y = row.removeprefix("(x, y) = (").split(r"),\quad t")[0].split(", ")
            x_of, y_of = (sympy.lambdify(t, to_sympy(Z, t=t)) for Z in (X, Y))
            found |= {(int(x_of(j)), int(y_of(j))) for j in range(-4 * box, 4 * box + 1)}
        elif row.startswith("x + y"):
            d = int(re.match(r"x \+ y\\sqrt\{(-?\d+)\}", row)[1])  # type: ignore[index]
            found |= _members(row, d, 10**9)
        elif row.startswith(r"\begin{pmatrix} x \\ y \end{pmatrix}"):
            M = re.search(r"T\(v\) = \\begin\{pmatrix\}(.*?)\\end\{pmatrix\}v", row)
            shift = re.search(r"v \+ \\begin\{pmatrix\}(.*?)\\end\{pmatrix\}", row)
            start = re.search(r"T\^\{k\}\\begin\{pmatrix\}(.*?)\\end\{pmatrix\}", row)
            mirror = re.search(
                r"\\text\{or\}\\ (?:\\begin\{pmatrix\}(.*?)\\end\{pmatrix\} )?-T", row
            )
            assert M and start
            a, b, c, e = _column(M[1])
            s1, s2 = _column(shift[1]) if shift else (0, 0)
            for step in (sympy.Matrix([[a, b], [c, e]]), sympy.Matrix([[a, b], [c, e]]).inv()):
                p = sympy.Matrix(_column(start[1]))
                v = sympy.Matrix([s1, s2])
                shift_step = v if step[0, 0] == a and step[0, 1] == b else -step * v
                for _ in range(12):
                    found.add((int(p[0]), int(p[1])))
                    if mirror:
                        twice = _column(mirror[1]) if mirror[1] else (0, 0)
                        found.add((twice[0] - int(p[0]), twice[1] - int(p[1])))
                    p = step * p + shift_step
        else:
            assert row.endswith(":") or "has no integer solution" in row, row
    return {(x, y) for x, y in found if abs(x) <= box and abs(y) <= box}


@given(st.lists(st.integers(-4, 4), min_size=6, max_size=6))
@example([1, 0, -2, 0, 0, 1])  # x² − 2y² = −1: a norm equation, x + y√2 = ±(1 + √2)(3 + 2√2)^k
@example([1, -2, 1, -1, 0, 0])  # (x − y)² = x: a parabola
@example([0, 1, 0, 1, 1, 0])  # xy + x + y = 0: (x + 1)(y + 1) = 1, finitely many
@example([1, 0, -4, 0, 0, -5])  # x² − 4y² = 5: the square case
@example([1, 0, 1, 0, 0, -25])  # x² + y² = 25: twelve points, a set over two rows
def test_any_equation_reads_back_as_its_solutions(coefficients: list[int]) -> None:
    a, b, c, d, e, f = coefficients
    try:
        solutions = solve_quadratic(a, b, c, d, e, f)
    except RealquadError:
        return  # refused inputs (no x and y, every pair a solution, …) have no LaTeX
    out = solutions.to_latex()
    check_latex(out)
    box = 25
    expected = {
        (x, y)
        for x in range(-box, box + 1)
        for y in range(-box, box + 1)
        if a * x * x + b * x * y + c * y * y + d * x + e * y + f == 0
    }
    assert _read_solutions(out, box) == expected

# Type stub of the compiled kernels; each matches its pure-Python twin (the .py file named like its .c file).

MAX_WORD_DISCRIMINANT: int
MAX_CFRAC_DISCRIMINANT: int
LONG_DOUBLE_MANTISSA_BITS: int

def principal_half_cycle(D: int, max_steps: int) -> tuple[list[int], int, int, int] | None: ...
def principal_period(D: int, max_steps: int) -> tuple[int, int, int] | None: ...
def principal_regulator(D: int, max_steps: int) -> tuple[int, int, int, int, int, float] | None: ...
def convergent_leaves(quotients: list[int], chunk: int) -> list[tuple[int, int, int, int]]: ...
def kronecker_symbols(a: int, moduli: list[int]) -> list[int]: ...
def form_rho_b(b: int, c: int, r: int) -> int: ...
def form_is_reduced(a: int, b: int, r: int) -> bool: ...
def form_reduce(a: int, b: int, c: int, D: int, r: int) -> tuple[int, int, int]: ...
def form_cycle(
    a: int, b: int, c: int, D: int, r: int, max_steps: int
) -> list[tuple[int, int]] | None: ...
def extended_gcd(x: int, y: int) -> tuple[int, int, int]: ...
def form_compose(a1: int, b1: int, a2: int, b2: int, D: int) -> tuple[int, int, int]: ...
def form_compose_reduce(
    a1: int, b1: int, a2: int, b2: int, D: int, r: int
) -> tuple[int, int, int]: ...
def form_class_numbers(
    D: int, conductor: int, primes: list[int], max_forms: int
) -> tuple[int, int] | None: ...
def prime_form_b(D: int, p: int) -> int: ...
def form_class_candidates(
    D: int, conductor: int, primes: list[int]
) -> list[tuple[int, int, int]]: ...
def infrastructure_baby_steps(
    D: int, r: int, sq: float, a: int, b: int, dist: float, count: int
) -> tuple[list[int], list[float], int, int, float, int]: ...
def form_class_table(
    D: int, candidates: list[tuple[int, int, int]], max_forms: int, progress: object = None
) -> tuple[dict, list, list, list, list] | None: ...
def infrastructure_giant_step(
    D: int, r: int, sq: float, a: int, b: int, a2: int, b2: int
) -> tuple[int, int, float]: ...
def survey_numbers(
    radicands: list[int], primes: list[int], max_period: int, max_forms: int
) -> list[tuple[int, int, int, int, int, tuple[int, int, int, int, int, float] | None] | None]: ...
def form_class_relations(
    D: int, conductor: int, primes: list[int], max_forms: int
) -> tuple[int, int, list[tuple[int, int, int]], list[list[int]]] | None: ...

# positive definite forms and the class groups of D < 0
def definite_reduce(a: int, b: int, c: int) -> tuple[int, int, int]: ...
def definite_compose_reduce(a1: int, b1: int, a2: int, b2: int, D: int) -> tuple[int, int, int]: ...
def definite_class_candidates(
    D: int, conductor: int, primes: list[int]
) -> list[tuple[int, int, int]]: ...
def definite_class_table(
    D: int, candidates: list[tuple[int, int, int]], max_forms: int, progress: object = None
) -> tuple[dict, list, list, list, list] | None: ...
def definite_class_relations(
    D: int, conductor: int, primes: list[int], max_forms: int, target: int = 0, power: int = 1
) -> tuple[int, list[tuple[int, int, int]], list[list[int]]] | None: ...
def definite_class_number(D: int, primes: list[int]) -> int: ...
def definite_structures(
    Ds: list[int],
    class_numbers: list[int],
    two_ranks: list[int],
    conductor: int,
    primes: list[int],
    first: int,
) -> tuple[list[int], list[tuple[int, ...]]]: ...

# infrastructure: the baby-step table (a capsule) and the giant-step search
def infrastructure_table_new(D: int, r: int, sq: float, capacity: int) -> object: ...
def infrastructure_table_size(table: object) -> tuple[int, int]: ...
def infrastructure_table_get(table: object, a: int, b: int) -> float | None: ...
def infrastructure_table_extend(
    table: object, a: int, b: int, hi: float, lo: float, count: int
) -> tuple[int, int, float, float, int]: ...
def infrastructure_giant_search(
    table: object,
    a: int,
    b: int,
    aG: int,
    bG: int,
    s: float,
    lo_step: float,
    hi_step: float,
    base: float,
    e0: float,
    e1: float,
    clog: float,
    stop: float,
    budget: int,
    progress: object,
) -> tuple[int, int, int, int, float, float, float]: ...

# the relation search: sieving a family of polynomials
def sieve_family(
    primes: list[int],
    logs: list[int],
    roots1: list[int],
    roots2: list[int],
    shifts: list[list[int]],
    steps: list[int],
    M: int,
    threshold: int,
) -> list[tuple[int, int, list[int]]]: ...

# the linear algebra of index calculus: structured Gaussian elimination
def eliminate_rows(
    rows: list[dict[int, int]], n: int, entry_limit: int, cost_limit: int, density: float
) -> tuple[
    list[int],
    list[int],
    list[list[tuple[int, int]]],
    list[dict[int, int]],
    list[int],
    list[int],
    list[int],
]: ...

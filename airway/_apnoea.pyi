"""Types of the compiled time loop (``_apnoea.c``); see ``oxygenation.loops_python``."""

def run(
    states: tuple[tuple[float, ...], ...],
    constants: tuple[float, ...],
    horizon_s: float,
    curves: tuple[bool, ...],
    curve_every: float,
) -> tuple[tuple[float | None, float | None, float | None, tuple[tuple[int, float], ...]], ...]: ...
def round_percent(sao2: float) -> float: ...

"""Types of the compiled time loop (``_apnoea.c``); see ``oxygenation.loop_python``."""

def run(
    state: tuple[float, ...],
    constants: tuple[float, ...],
    horizon_s: float,
    curve: bool,
    curve_every: float,
) -> tuple[float | None, float | None, float | None, tuple[tuple[int, float], ...]]: ...
def round_percent(sao2: float) -> float: ...

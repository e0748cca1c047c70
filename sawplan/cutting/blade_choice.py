"""Which blade type to buy next for a cut: cost per cut at each type's own cheapest speed.

Each blade type the log knows for a material group gets its own life relation
(fitted, or a published exponent), its own price and its own cut time (its
pitch on this saw), so each is compared at the speed that is cheapest *for
it*.  The cheapest per cut is the one to buy; the report says how much it saves
per cut and per m² against the runner-up, and whether the ranking rests on the
shop's own fits or on published exponents.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from sawplan.cutting.cut_cost import CutEconomics, RunSpeed


@dataclass(frozen=True)
class BladeOption:
    """One blade type on this cut, at its cheapest speed."""

    blade_type: str
    pitch: str
    blades: int  # blades of this type behind its life relation
    failures: int
    economics: CutEconomics

    @property
    def best(self) -> RunSpeed:
        return self.economics.run("cost")

    @property
    def cost_per_cut(self) -> float:
        return self.best.cost.total

    @property
    def cost_per_m2(self) -> float:
        return self.best.cost.cost_per_m2

    @property
    def fitted(self) -> bool:
        return self.economics.life.fitted


@dataclass(frozen=True)
class BladeChoice:
    """Blade types from cheapest to dearest per cut, and the one to buy."""

    material_group: str
    options: tuple[BladeOption, ...]
    buy: str | None  # the cheapest blade type, None when nothing could be costed
    saving_per_cut: float | None  # against the runner-up
    saving_share: float | None  # of the runner-up's cost per cut
    runner_up: str | None
    on_fits: bool  # True when the winner and runner-up both rest on fits of the log
    not_costed: tuple[str, ...]  # blade types left out, with the reason


def choose_blade(
    material_group: str, options: Sequence[BladeOption], not_costed: Sequence[str] = ()
) -> BladeChoice:
    """Rank ``options`` by cost per cut at each one's cheapest speed."""
    ranked = tuple(sorted(options, key=lambda o: (o.cost_per_cut, o.blade_type)))
    if not ranked:
        return BladeChoice(material_group, (), None, None, None, None, False, tuple(not_costed))
    best = ranked[0]
    if len(ranked) == 1:
        return BladeChoice(
            material_group, ranked, best.blade_type, None, None, None, best.fitted,
            tuple(not_costed),
        )  # fmt: skip
    second = ranked[1]
    saving = second.cost_per_cut - best.cost_per_cut
    return BladeChoice(
        material_group=material_group,
        options=ranked,
        buy=best.blade_type,
        saving_per_cut=saving,
        saving_share=saving / second.cost_per_cut,
        runner_up=second.blade_type,
        on_fits=best.fitted and second.fitted,
        not_costed=tuple(not_costed),
    )

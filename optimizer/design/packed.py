"""Packed beds as internals: the least shell, the beds at a shell, the separation they give, and their cost lines.

A packed design is a candidate, an agent rate and a shell diameter for one
``[[packing]]`` of the case. Its packed height is not a separate decision:
at the design's fluxes each solute s has its HETP (from the Onda film
heights through H_OG = H_G + lambda H_L, or from a given H_OG, H_OL or
HETP), and the packed height is the least that meets every spec,

    Z = max_s N_s HETP_s,      N_s from the Kremser inverse at the design's factor,

which is max_s N_OG,s H_OG,s by the Colburn relation (N_OL H_OL when
stripping): the two routes agree for straight lines. Each solute then has
Z / HETP_s theoretical stages and leaves at the Kremser outlet of that
cascade. The rates offered are those of the trays' enumeration: the least
rate for each whole number of theoretical stages in ``[column] stages``
(exact Kremser inverse) and the ratio levels above the least rate of the
most stages; the design's count is the stages its rate needs, rounded up.

Capacity and pressure drop are the Stichlmair, Bravo and Fair model's
(``towercost.models.packing``): the least standard shell meets the design
fraction of flood, the pressure-drop limit per metre and the least diameter
over packing size; a wider shell only wets the packing less, so the diameter
search stops where the minimum wetting rate fails.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from towercost.design import cascade
from towercost.design.case import Case, PackingChoice
from towercost.design.costlines import ItemCost, ItemSpec
from towercost.models import hydraulics, kremser
from towercost.models import packing as pk

#: The equipment rows of a packed column, after the tower shell (tags of the usual trade form).
PACKING_TAG, DISTRIBUTOR_TAG, SUPPORT_TAG = "PK-101", "DR-101", "SP-101"


@dataclasses.dataclass(frozen=True)
class OwnSpec(ItemSpec):
    """An equipment row priced here rather than by a row of ``equipment_cost.toml``.

    Its size basis, unit, source and cost basis are its own; ``correlation``
    is a key naming the pricing (unique among a row's variants).
    """

    size_name: str = ""
    unit: str = ""
    reference: str = ""
    index_basis: float = 1.0
    description: str = ""
    material: str = ""           # what the item is made of (a packing's own material)

    @property
    def size_basis(self) -> str:
        return self.size_name

    @property
    def size_unit(self) -> str:
        return self.unit

    @property
    def source(self) -> str:
        return self.reference

    @property
    def basis(self) -> float:
        return self.index_basis


def _internals_table() -> dict:
    return pk._table()["internals"]


def packing_spec(choice: PackingChoice) -> OwnSpec:
    """The packing row of one [[packing]] entry: packed volume times its price."""
    data = choice.data
    price = (f"price {choice.price_per_m3 * 1:.4g} USD/m3 at index {choice.price_index_basis:g}, "
             + ("given in the scenario (moved to that index)" if choice.price_given else data["price_source"]))
    return OwnSpec("packing", PACKING_TAG, f"packing, {choice.name}", f"packing:{choice.key}:{choice.name}",
                   size_name="volume", unit="m3", reference=price, index_basis=choice.price_index_basis,
                   description=f"{data['kind']}, {data['material']}, {1000 * data['nominal_size']:g} mm, dumped",
                   material=data["material"])


def distributor_spec() -> OwnSpec:
    table = _internals_table()
    return OwnSpec("distributors", DISTRIBUTOR_TAG, "liquid distributor and redistributors", "packed_distributors",
                   size_name="diameter squared x distributors", unit="m2", reference=table["distributor_source"],
                   index_basis=float(table["distributor_index_basis"]),
                   description="liquid distributor (top) and one redistributor between beds", material="ss304")


def support_spec() -> OwnSpec:
    table = _internals_table()
    return OwnSpec("supports", SUPPORT_TAG, "packing support plates", "packed_supports",
                   size_name="diameter squared x beds", unit="m2", reference=table["support_source"],
                   index_basis=float(table["distributor_index_basis"]), description="one support plate per bed",
                   material="ss304")


def unused_spec(spec: ItemSpec, what: str) -> OwnSpec:
    """The variant of a row at a design that has no such item (costs nothing; left out of the reports)."""
    return OwnSpec(spec.key, spec.tag, f"no {what}", f"unused:{spec.key}", size_name="-", unit="-",
                   reference="not part of this design", index_basis=spec.basis)


def zero_row(spec: ItemSpec, variants: tuple, n: int, material: str) -> ItemCost:
    """A row costing nothing at n points, priced by ``spec`` (one of ``variants``)."""
    zero = np.zeros(n)
    return ItemCost(spec, zero, zero, zero, zero, np.ones(n, bool), material, variants,
                    np.full(n, variants.index(spec), dtype=np.int8))


# --------------------------------------------------------------------------- the separation of packed beds


def theoretical_case(case: Case) -> Case:
    """The case with one theoretical stage per count (efficiency 1): the cascade of a packed bed's stages."""
    return dataclasses.replace(case, efficiency=np.ones_like(case.efficiency), murphree=None)


def stage_least_rates(case: Case, agent, stages):
    """Least agent rate [mol/s] meeting every spec with ``stages`` theoretical stages (exact Kremser inverse)."""
    return cascade.least_rate(theoretical_case(case), agent, stages)


def stages_needed(case: Case, agent, factor):
    """Theoretical stages each solute needs at its factor, (n, solutes): 0 with no spec to meet, inf out of reach."""
    phi = cascade.target_fraction(case, agent)                   # (n, s); >= 1 (inf): nothing to remove
    need = np.isfinite(phi) & (phi < 1.0)
    reach = need & (phi > 0.0)
    count = kremser.stages_for_fraction(np.where(reach, phi, 0.5), np.where(reach, factor, 1.0), strict=False)
    return np.where(need, np.where(reach, count, np.inf), 0.0)


def stage_count(needed) -> np.ndarray:
    """The design's count: the most stages any solute needs, rounded up (a hair above a whole number is that number)."""
    most = np.max(needed, axis=-1)
    return np.maximum(1, np.ceil(np.where(np.isfinite(most), most, 0.0) - 1e-9)).astype(int)


# --------------------------------------------------------------------------- one packing


class PackedBeds:
    """The beds of one [[packing]] entry: least shell, sizing at a shell, and cost lines."""

    def __init__(self, case: Case, choice: PackingChoice, index: int):
        self.case = case
        self.choice = choice
        self.index = index                    # internals index (after the tray types)
        data = choice.data
        self.geometry = dict(voidage=data["voidage"], specific_area=data["specific_area"],
                             c1=data["stichlmair_c1"], c2=data["stichlmair_c2"], c3=data["stichlmair_c3"])
        self.size_nominal = float(data["nominal_size"])
        self.min_diameter = float(data["min_diameter_ratio"]) * self.size_nominal
        self.spec = packing_spec(choice)

    # -- hydraulics

    def _phases(self, separation):
        case, agent, loads = self.case, separation.agent, separation.loads
        return (loads.gas_mass_flow, loads.liquid_mass_flow, loads.gas_density, loads.liquid_density,
                case.gas_viscosity[agent])

    def least(self, separation) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Flood diameter, least shells by flood and by pressure drop, and the least standard shell [m].

        D = standard(max(D_flood / sqrt(f), D at the pressure-drop limit, ratio x d_p)).
        """
        gas, liquid, rho_g, rho_l, mu_g = self._phases(separation)
        size = pk.packed_diameter(gas, liquid, rho_g, rho_l, mu_g, **self.geometry,
                                  flood_fraction=self.choice.flood_fraction,
                                  max_pressure_drop=self.choice.pressure_drop_per_m)
        least = np.maximum(size.standard, hydraulics.standard_diameter(self.min_diameter))
        return size.flood, size.by_flood, size.by_pressure_drop, least

    def size(self, separation, diameter, least=None, *, warnings: list[str] | None = None) -> dict:
        """Every figure of the packed designs in shells of ``diameter`` [m] (NaN: the least shell)."""
        case, choice, data = self.case, self.choice, self.choice.data
        if least is None:     # the least shells do not change with the shell priced: found once per point
            least = separation.cache.arrays(("packed", self.index), 4, lambda local: self.least(separation.take(local)))
        flood, by_flood, by_pressure, least_shell = least
        shell = np.where(np.isnan(diameter), least_shell, diameter)
        gas, liquid, rho_g, rho_l, mu_g = self._phases(separation)
        area = math.pi / 4.0 * shell**2
        u_g, u_l = gas / (rho_g * area), liquid / (rho_l * area)
        fraction = (flood / shell) ** 2
        local: list[str] | None = None if warnings is None else []
        gradient = pk.irrigated_pressure_drop(u_g, u_l, rho_g, rho_l, mu_g, **self.geometry, warnings=local)
        flooded = ~np.isfinite(gradient)    # at or past flood (a given shell too narrow): the flood point's figure
        if flooded.any():
            at_flood = pk.flood_pressure_drop(u_g, u_l, rho_g, rho_l, mu_g, **self.geometry)
            gradient = np.where(flooded, at_flood, gradient)
        wetting = u_l / pk.minimum_wetting_velocity(data["specific_area"], self.size_nominal)
        factor = separation.figures["factor"]                          # (n, s)
        slope = case.service.slope_ratio(factor)
        heights = self._heights(separation, u_g * rho_g, u_l * rho_l, slope, local)
        needed = separation.figures["stages_needed"]
        with np.errstate(invalid="ignore"):
            packed = np.max(np.where(needed > 0.0, needed * heights["hetp"], 0.0), axis=-1)
        finite = np.isfinite(packed)
        packed_safe = np.where(finite, packed, 0.0)
        split = pk.bed_split(packed_safe, choice.max_bed_height)
        height = pk.packed_column_height(packed_safe, split.beds)
        with np.errstate(invalid="ignore"):
            stages = packed_safe[:, None] / heights["hetp"]
        treated, agent_out = self._outlets(separation, factor, stages)
        volume = area * packed_safe
        if warnings is not None:
            local += self._doubts()
            warnings.extend(f"{choice.name}: {m}" for m in local)
        flooding_velocity = np.where(fraction > 0.0, u_g / np.where(fraction > 0.0, fraction, 1.0), np.inf)
        figures = dict(
            flow_parameter=hydraulics.flow_parameter(liquid, gas, rho_l, rho_g), flooding_velocity=flooding_velocity,
            diameter_required=np.maximum(by_flood, by_pressure), diameter_flooding=hydraulics.standard_diameter(
                by_flood), diameter_pressure_drop=by_pressure, diameter_least=least_shell, fraction_of_flood=fraction,
            height=height, packed_height=np.where(finite, packed, np.inf),
            beds=split.beds.astype(np.int16), bed_height=split.bed_height, pressure_drop_per_m=gradient,
            pressure_drop=gradient * packed_safe, wetting_ratio=wetting, diameter_ratio=shell / self.size_nominal,
            transfer_units=heights["transfer_units_of"](packed_safe), htu=heights["htu"], hetp=heights["hetp"],
            film_gas_htu=heights["gas"], film_liquid_htu=heights["liquid"], wetted_area=heights["wetted"],
            packing_weight=pk.packing_weight(volume, data["voidage"], data["solid_density"]),
            packing_volume=volume, stages=stages, outlet=treated, agent_outlet=agent_out,
            meets_spec=cascade.meets_spec(case, treated), efficiency=np.full(stages.shape, np.nan),
            controlling=_controlling(case, treated), can_widen=wetting >= 1.0,
        )
        return dict(diameter=shell, figures=figures)

    def _doubts(self) -> list[str]:
        """What every output of this packing must say about its data."""
        out = []
        if not self.choice.constants_checked:
            out.append("its Stichlmair constants C1..C3 are estimates, not read from the paper's table "
                       "(models/data/packings.toml): its diameter, fraction of flood and pressure drop are indicative")
        if not self.choice.price_given:
            out.append(f"its price ({self.choice.price_per_m3:.4g} USD/m3 at cost index "
                       f"{self.choice.price_index_basis:g}) is an order of magnitude ({self.choice.data['price_source']});"
                       " give [[packing]] price from a quote")
        return out

    def _heights(self, separation, gas_flux, liquid_flux, slope, warnings) -> dict:
        """H_OG, HETP and the film heights per solute (n, s), and the treated phase's transfer units for a height."""
        case, choice, data = self.case, self.choice, self.choice.data
        agent = separation.agent
        shape = slope.shape
        gas_h = liquid_h = np.full(shape, np.nan)
        wetted = np.full(shape[:1], np.nan)
        if choice.hetp is not None:
            hetp = np.full(shape, choice.hetp)
            h_og = hetp * _log_ratio(slope)
        elif choice.h_og is not None or choice.h_ol is not None:
            h_og = np.full(shape, choice.h_og) if choice.h_og is not None else slope * choice.h_ol
            hetp = pk.hetp(h_og, slope)
        else:
            films = pk.onda_film_heights(
                gas_flux[:, None], liquid_flux[:, None], separation.loads.gas_density[:, None],
                separation.loads.liquid_density[:, None], case.gas_viscosity[agent][:, None],
                case.liquid_viscosity[agent][:, None], case.gas_diffusivity[agent], case.liquid_diffusivity[agent],
                case.surface_tension[agent][:, None], data["specific_area"], self.size_nominal,
                data["critical_surface_tension"], warnings=warnings)
            gas_h, liquid_h = films.gas, films.liquid
            wetted = np.broadcast_to(films.wetted_area, shape)[:, 0].copy()
            h_og = pk.overall_htu_gas(gas_h, liquid_h, slope)
            hetp = pk.hetp(h_og, slope)
        strip = not case.service.agent_is_liquid
        htu = h_og / slope if strip else h_og       # the treated phase's: H_OL stripping, H_OG absorbing

        def transfer_units_of(height):
            return height[:, None] / htu

        return dict(hetp=hetp, htu=htu, gas=gas_h, liquid=liquid_h, wetted=wetted,
                    transfer_units_of=transfer_units_of)

    def _outlets(self, separation, factor, stages):
        """Treated-stream and agent outlets of each solute's cascade of Z / HETP_s stages (Kremser)."""
        case = self.case
        agent = separation.agent
        k, lean = case.k_value[agent], case.lean[agent]
        flowing = factor > 0.0
        treated, agent_out = case.service.outlets(np.where(flowing, factor, 1.0), stages, case.feed_in, lean, k)
        return np.where(flowing, treated, case.feed_in), np.where(flowing, agent_out, lean)

    # -- cost

    def items(self, diameter, figures, *, warnings: list[str] | None = None) -> list[ItemCost]:
        """The packing (volume x price), the distributor and redistributors, and the support plates."""
        choice = self.choice
        volume = figures["packing_volume"]
        packing = pk.packing_cost(volume, choice.price_per_m3)
        beds = figures["beds"].astype(float)
        internals = pk.internals_cost(diameter, beds)
        square = np.asarray(diameter, dtype=float) ** 2
        ones = np.ones(volume.shape, bool)
        table = _internals_table()
        factor = float(table["packing_bare_module_factor"])
        return [ItemCost(self.spec, volume, packing, packing * factor, packing * factor, ones, choice.data["material"]),
                ItemCost(distributor_spec(), square * beds, internals.distributor + internals.redistributors,
                         internals.distributor + internals.redistributors,
                         internals.distributor + internals.redistributors, ones, "ss304"),
                ItemCost(support_spec(), square * beds, internals.supports, internals.supports, internals.supports,
                         ones, "ss304")]


def _log_ratio(slope):
    """(lambda - 1) / ln(lambda), 1 at lambda = 1: H_OG / HETP."""
    return 1.0 / pk.hetp(1.0, slope)


def _controlling(case: Case, treated) -> np.ndarray:
    """The solute nearest its spec (outlet over spec largest)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(np.isfinite(case.target), treated / case.target, 0.0)
    return np.argmax(share, axis=-1)

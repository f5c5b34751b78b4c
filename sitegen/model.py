"""The record format: pydantic types only, no I/O and no chemistry.

Three kinds of record live in a source folder (see ``docs/record-format.md``):

* ``methods/<id>.yaml`` under ``records/`` - a validated titration method;
* ``reagents/<id>.yaml`` - one chemical, shared by many methods;
* ``indicators/<id>.yaml`` - one indicator, with its transition potential.

and one ``site.yaml`` with the site settings. Chemistry strings (species,
reactions, half-reactions) are kept as text here; the chemistry core parses
them in the analyse stage, so a bad formula gets its own rule and position.
Quantities are written with units ("25.00 mL") and read by
:mod:`sitegen.units`.
"""

from __future__ import annotations

__all__ = [
    "Approval",
    "Calculation",
    "CalculationKind",
    "Conditions",
    "Couple",
    "Couples",
    "HazardData",
    "HistoryEntry",
    "Indicator",
    "MethodRecord",
    "Reactions",
    "Reagent",
    "ReagentUse",
    "Role",
    "Scope",
    "SiteConfig",
    "Status",
    "TitrationMode",
    "TitrationParameters",
    "WorkedExample",
]

import datetime as _dt
import enum
import re
from typing import Annotated, Any, Literal

from pydantic import AfterValidator, BaseModel, BeforeValidator, ConfigDict, Field

from .units import Measure, UnitError, parse_measure

SLUG = r"^[a-z0-9][a-z0-9-]{0,79}$"
_SLUG_RE = re.compile(SLUG)


def _measure(kind: str) -> Any:
    def convert(v: object) -> Measure:
        if isinstance(v, Measure):
            return v
        if isinstance(v, bool) or not isinstance(v, str | int | float):
            raise ValueError(f"expected a {kind.replace('_', ' ')} with a unit, as text")
        try:
            return parse_measure(v, kind)
        except UnitError as exc:
            raise ValueError(str(exc)) from None

    return Annotated[
        Measure,
        BeforeValidator(convert),
        Field(json_schema_extra={"type": "string", "description": f"{kind} with unit"}),
    ]


Volume = _measure("volume")
Mass = _measure("mass")
Concentration = _measure("concentration")
Potential = _measure("potential")
Temperature = _measure("temperature")
Result = Any  # a measure of the unit the calculation reports; checked in analyse


def _slug(v: str) -> str:
    if not _SLUG_RE.match(v):
        raise ValueError(
            f"{v!r} is not a valid id: use lower-case letters, digits and '-' only"
            " (it becomes a file name and a URL)"
        )
    return v


Slug = Annotated[str, AfterValidator(_slug)]
Text = Annotated[str, Field(min_length=1)]


class _Strict(BaseModel):
    model_config = ConfigDict(
        extra="forbid", frozen=True, str_strip_whitespace=True, defer_build=True
    )


class Status(enum.StrEnum):
    DRAFT = "draft"
    APPROVED = "approved"
    RETIRED = "retired"


class Role(enum.StrEnum):
    """What a reagent does in a method."""

    TITRANT = "titrant"
    PRIMARY_STANDARD = "primary-standard"
    INDICATOR = "indicator"
    REDUCTANT = "reductant"
    OXIDANT = "oxidant"
    ACID = "acid"
    BASE = "base"
    BUFFER = "buffer"
    EXCESS_REAGENT = "excess-reagent"
    AUXILIARY = "auxiliary"
    PREVENTIVE = "preventive"
    SOLVENT = "solvent"
    CATALYST = "catalyst"
    MASKING = "masking"


class TitrationMode(enum.StrEnum):
    DIRECT = "direct"
    INDIRECT = "indirect"
    BACK = "back"
    STANDARDISATION = "standardisation"


class CalculationKind(enum.StrEnum):
    """What the result formula computes; each kind has one formula, shown
    on the page and used by the build and the in-page calculator."""

    MASS_FRACTION = "mass-fraction"
    MASS_CONCENTRATION = "mass-concentration"
    TITRANT_CONCENTRATION = "titrant-concentration"


class HazardData(_Strict):
    """GHS classification of a reagent, as on the supplier's safety data
    sheet."""

    signal_word: Literal["Danger", "Warning", "none"]
    hazard_statements: list[str] = Field(default_factory=list)
    precautionary_statements: list[str] = Field(default_factory=list)
    pictograms: list[str] = Field(default_factory=list)
    source: Text
    storage: str | None = None
    incompatibilities: list[str] = Field(default_factory=list)
    ppe: list[str] = Field(default_factory=list)
    waste: str | None = None


class Reagent(_Strict):
    """One chemical, shared by the methods that use it."""

    id: Slug
    name: Text
    formula: Text
    supplies: str | None = Field(
        default=None, description="the redox-active species it supplies, e.g. Cr2O7^2-"
    )
    molar_mass_source: str = "IUPAC/CIAAW 2021 abridged standard atomic weights"
    grade: str | None = None
    purity: (
        Annotated[Measure, BeforeValidator(lambda v: _measure_of(v, "mass_fraction"))] | None
    ) = None
    primary_standard: bool = False
    concentration: Concentration | None = None
    standardised_by: Slug | None = None
    hazards: HazardData | None = None
    notes: str | None = None


def _measure_of(v: object, kind: str) -> Measure:
    if isinstance(v, Measure):
        return v
    try:
        return parse_measure(v, kind)  # type: ignore[arg-type]
    except UnitError as exc:
        raise ValueError(str(exc)) from None


class Indicator(_Strict):
    """A visual indicator. Redox indicators have a transition potential."""

    id: Slug
    name: Text
    kind: Literal["redox", "specific", "self"] = "redox"
    transition_potential: Potential | None = None
    n: int | None = Field(default=None, ge=1, le=6)
    medium: str | None = None
    colour_oxidised: str | None = None
    colour_reduced: str | None = None
    source: Text
    reagent: Slug | None = None
    notes: str | None = None


class Approval(_Strict):
    approved_by: Text
    approved_on: _dt.date
    review_due: _dt.date


class Scope(_Strict):
    analyte: Text
    analyte_species: Text = Field(
        description="the analyte as the species that enters the first reaction of the chain,"
        " e.g. Fe^2+, Cu^2+ (iodometric copper), IO3- (iodate standardisation)"
    )
    matrix: Text
    working_range: str | None = None
    purpose: str | None = None


class ReagentUse(_Strict):
    ref: Slug
    role: Role
    amount: str | None = None
    note: str | None = None


class Reactions(_Strict):
    titration: Text
    preceding: list[Text] = Field(default_factory=list)


class Couple(_Strict):
    half_reaction: Text = Field(description="written as a reduction: Ox + ... + n e- = Red")
    formal_potential: Potential
    n: int | None = Field(default=None, ge=1, le=12)
    medium: Text
    source: Text
    reversible: bool = True


class Couples(_Strict):
    titrand: Couple
    titrant: Couple


class Conditions(_Strict):
    medium: Text
    hydrogen_ion: Concentration = Field(description="[H+] of the titration medium")
    temperature: Temperature = Field(
        default_factory=lambda: parse_measure("25 degC", "temperature")
    )
    reference_electrode: Literal["SHE", "SCE", "Ag/AgCl-sat", "Ag/AgCl-3M"] | None = Field(
        default=None, description="the lab's reference electrode; default: site.yaml's"
    )


class TitrationParameters(_Strict):
    mode: TitrationMode
    sample: Annotated[Measure, BeforeValidator(lambda v: _sample(v))]
    initial_volume: Volume = Field(description="volume in the flask when titration starts")
    titrant: Slug = Field(description="reagent id of the titrant")
    titrant_concentration: Concentration
    burette: Volume
    expected_volume: Volume
    indicator: Slug | None = None
    excess_reagent: Slug | None = Field(
        default=None, description="back titrations: reagent id of the reagent added in excess"
    )
    excess_concentration: Concentration | None = None
    excess_volume: Volume | None = None
    partner_concentration: Concentration | None = Field(
        default=None,
        description="fixed concentration of the titrand couple's other form present from the"
        " start, e.g. excess iodide in an iodometric flask",
    )


def _sample(v: object) -> Measure:
    for kind in ("mass", "volume"):
        try:
            return _measure_of(v, kind)
        except ValueError:
            continue
    raise ValueError(f"{v!r}: a sample is a mass ('0.2500 g') or an aliquot volume ('25.00 mL')")


class WorkedExample(_Strict):
    titrant_volume: Volume
    blank_volume: Volume = Field(default_factory=lambda: parse_measure("0.00 mL", "volume"))
    sample: Annotated[Measure, BeforeValidator(lambda v: _sample(v))]
    titrant_concentration: Concentration | None = None
    excess_volume: Volume | None = None
    result: Text = Field(description="the stated result with its unit, e.g. '54.47 %'")


class Calculation(_Strict):
    kind: CalculationKind
    reports: Text
    unit: Text
    analyte_formula: Text = Field(description="formula whose molar mass the result uses")
    factor: Annotated[str, BeforeValidator(lambda v: str(v))] | None = Field(
        default=None,
        description="mol analyte per mol titrant (back titrations: per mol excess reagent"
        " consumed), as the method text states it; '1/2' or '0.5'",
    )
    excess_factor: Annotated[str, BeforeValidator(lambda v: str(v))] | None = Field(
        default=None, description="back titrations: mol excess reagent per mol titrant"
    )
    worked_example: WorkedExample


class HistoryEntry(_Strict):
    revision: int = Field(ge=1)
    date: _dt.date
    change: Text


class MethodRecord(_Strict):
    """A validated redox-titration method."""

    id: Slug
    title: Text
    revision: int = Field(ge=1)
    status: Status
    approval: Approval | None = None
    supersedes: list[Slug] = Field(default_factory=list)
    successor: Slug | None = None
    scope: Scope
    reagents: list[ReagentUse] = Field(min_length=1)
    reactions: Reactions
    couples: Couples
    conditions: Conditions
    titration: TitrationParameters
    calculation: Calculation
    procedure: Text
    safety: list[Text] = Field(default_factory=list)
    alternative: str | None = Field(default=None, description="a safer method id or text")
    history: list[HistoryEntry] = Field(default_factory=list)
    tags: list[str] = Field(default_factory=list)


class SiteConfig(_Strict):
    lab_name: Text
    base_path: str = "/"
    contact: Text
    reference_electrode: Literal["SHE", "SCE", "Ag/AgCl-sat", "Ag/AgCl-3M"] = "SHE"
    burette_band: tuple[float, float] = (0.20, 0.90)
    language: str = "en"

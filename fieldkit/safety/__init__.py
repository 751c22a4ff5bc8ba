"""Pre-raise safety: RF keep-out zones from the engine's near field, power-line clearance, weather and
rigging rules, and the checklists a plan generates.

fieldkit is a planning aid: the operator follows the local codes, the utility's rules, the landowner,
licensed practice and the local regulator's RF exposure rules; no compliance certification is claimed.

Public functions
----------------
parse_hazards(value, field="site.hazards") -> list      validation of the site's hazards
safety_block(*, option, site, radio, ground, limit_set="fcc-uncontrolled") -> dict   the option's block
checklist_templates() -> list[dict]                     the fixed items of every stage
option_items(findings) -> list[ChecklistItem]           the checklist generated from an option's findings
ready_to_raise(items, acknowledgements) -> bool         every required pre-raise item acknowledged done
checklist_csv / checklist_json(items, acknowledgements) the record's export formats
exposure_limit(limit_set, *, frequency_hz)              the limit tables
"""

from fieldkit.safety.block import CAUTIONS, safety_block
from fieldkit.safety.checklists import (
    checklist_csv,
    checklist_json,
    checklist_rows,
    checklist_templates,
    latest_acknowledgements,
    ready_to_raise,
)
from fieldkit.safety.duty import MODE_DUTY_FACTOR, parse_radio
from fieldkit.safety.hazards import parse_hazards
from fieldkit.safety.items import OptionFindings, option_items
from fieldkit.safety.limits import LIMIT_SETS, exposure_limit, parse_limit_set
from fieldkit.safety.oet65 import oet65_estimate

__all__ = [
    "CAUTIONS",
    "LIMIT_SETS",
    "MODE_DUTY_FACTOR",
    "OptionFindings",
    "checklist_csv",
    "checklist_json",
    "checklist_rows",
    "checklist_templates",
    "exposure_limit",
    "latest_acknowledgements",
    "oet65_estimate",
    "option_items",
    "parse_hazards",
    "parse_limit_set",
    "parse_radio",
    "ready_to_raise",
    "safety_block",
]

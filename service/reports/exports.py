"""The repair list as a CSV report (a report, not a file to import back)."""

from service.reports.schemas import SummaryOut
from service.store.csv_format import write_table

REPAIR_LIST_COLUMNS = (
    "tag",
    "area_name",
    "location",
    "application",
    "trap_type",
    "condition",
    "tested_at",
    "steam_loss_kg_h",
    "steam_loss_kg_h_low",
    "steam_loss_kg_h_high",
    "annual_total_cost",
    "annual_total_cost_low",
    "annual_total_cost_high",
    "annual_total_co2_t",
    "repair_kind",
    "repair_cost",
    "payback_years",
    "payback_years_low",
    "payback_years_high",
    "repaired_on",
)


def repair_list_csv(summary: SummaryOut) -> str:
    """The failed traps that cost money, costliest first, with rank and currency."""
    header = ["rank", *REPAIR_LIST_COLUMNS, "currency"]
    rows = [
        [
            rank,
            *(item.model_dump(mode="json")[name] for name in REPAIR_LIST_COLUMNS),
            summary.currency,
        ]
        for rank, item in enumerate(summary.repair_list, start=1)
    ]
    return write_table(header, rows)

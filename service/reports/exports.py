"""The repair list as a report in CSV or XLSX (not a file to import back), and XLSX
sheets for any table."""

import io

from openpyxl import Workbook
from openpyxl.styles import Font

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
    "annual_cost",
    "annual_cost_low",
    "annual_cost_high",
    "annual_co2_t",
    "repair_kind",
    "repair_cost",
    "payback_years",
    "payback_years_low",
    "payback_years_high",
    "repaired_on",
)


def repair_list_table(summary: SummaryOut) -> tuple[list[str], list[list[object]]]:
    """The failed traps whose failure losses cost money, quickest payback first (the
    order of the screen and the report), with rank and currency."""
    header = ["rank", *REPAIR_LIST_COLUMNS, "currency"]
    rows = [
        [
            rank,
            *(item.model_dump(mode="json")[name] for name in REPAIR_LIST_COLUMNS),
            summary.currency,
        ]
        for rank, item in enumerate(summary.repair_list, start=1)
    ]
    return header, rows


def repair_list_csv(summary: SummaryOut) -> str:
    return write_table(*repair_list_table(summary))


def xlsx_bytes(title: str, header: list[str], rows: list[list[object]]) -> bytes:
    """One sheet with a bold, frozen header row, as an .xlsx file. Every text cell is
    stored as text, never as a formula, whatever it begins with (OWASP, "CSV Injection")."""
    workbook = Workbook()
    sheet = workbook.active
    sheet.title = title[:31]
    sheet.append(header)
    for cell in sheet[1]:
        cell.font = Font(bold=True)
    sheet.freeze_panes = "A2"
    for row in rows:
        sheet.append(row)
        for cell in sheet[sheet.max_row]:
            if isinstance(cell.value, str):
                cell.data_type = "s"  # openpyxl takes a string starting with = for a formula
    out = io.BytesIO()
    workbook.save(out)
    return out.getvalue()

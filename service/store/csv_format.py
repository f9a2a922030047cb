"""Reading the CSV files people bring: any of three separators, with or without a BOM,
and numbers in the unit the column's header names.

A column whose quantity has units carries the unit in its name, for example
`inlet_pressure_kpa_g`, `inlet_pressure_bar_g` or `inlet_pressure_psig`; the value is
converted to the program's own unit on the way in. Rows are numbered as a
spreadsheet shows them: the header is row 1, the first record row 2.
"""

import csv
import io
import re
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field

from service.physics.units import convert

MAX_CSV_BYTES = 5 * 1024 * 1024
SEPARATORS = ",;\t"
TRUE_WORDS = frozenset({"yes", "y", "true", "1", "in service"})
FALSE_WORDS = frozenset({"no", "n", "false", "0", "retired"})


@dataclass(frozen=True, slots=True)
class UnitColumn:
    """A quantity that may come in several units: header suffix -> unit symbol."""

    field: str
    program_unit: str
    headers: dict[str, str]  # header -> unit symbol


# The program's unit, by the suffix a field's name ends in -> every header suffix a file
# may use for it, and that unit's symbol. The first is the program's own.
UNITS_BY_SUFFIX: dict[str, dict[str, str]] = {
    "kpa_g": {"kpa_g": "kPa(g)", "bar_g": "bar(g)", "psig": "psig"},
    "c": {"c": "°C", "f": "°F"},
    "mm": {"mm": "mm", "in": "in"},
    "kg_h": {"kg_h": "kg/h", "lb_h": "lb/h"},
}


def unit_column(field_name: str) -> UnitColumn | None:
    """The column of a field whose name ends in its unit (`inlet_pressure_kpa_g`), read
    from any of that quantity's headers; None for a field without a unit in its name.

    >>> list(unit_column("steam_temperature_c").headers)
    ['steam_temperature_c', 'steam_temperature_f']
    """
    for suffix, units in UNITS_BY_SUFFIX.items():
        base = field_name.removesuffix(f"_{suffix}")
        if base != field_name:
            headers = {f"{base}_{header}": symbol for header, symbol in units.items()}
            return UnitColumn(field_name, units[suffix], headers)
    return None


@dataclass(frozen=True, slots=True)
class Problem:
    """One thing wrong with an uploaded file: where, and what."""

    row: int
    column: str
    message: str


@dataclass(slots=True)
class Table:
    """An uploaded file read into its header and its rows (row number, cells by header)."""

    header: list[str]
    decimal_comma: bool = False  # a semicolon-separated file writes 4,5 for 4.5
    rows: list[tuple[int, dict[str, str]]] = field(default_factory=list)


class UnreadableFile(ValueError):  # noqa: N818 - it names what the file is
    """The file as a whole cannot be read: its message says why."""


# What a file that is not CSV often is, told by its first bytes (its name is not trusted).
NOT_CSV_SIGNATURES = {
    b"PK\x03\x04": "a spreadsheet (XLSX) or another ZIP file; save it as CSV UTF-8",
    b"\xd0\xcf\x11\xe0": "an old Office file (XLS); save it as CSV UTF-8",
    b"%PDF": "a PDF",
    b"\x89PNG": "a PNG picture",
    b"\xff\xd8\xff": "a JPEG picture",
}


def read_table(content: bytes) -> Table:
    """The file's header (lower-cased, trimmed) and its non-blank rows. Whether it is CSV
    text is judged from its content: its first bytes, NUL bytes, and UTF-8.

    >>> read_table(b"%PDF-1.7 ...")
    Traceback (most recent call last):
    ...
    service.store.csv_format.UnreadableFile: this is a PDF, not CSV
    """
    if len(content) > MAX_CSV_BYTES:
        raise UnreadableFile(f"the file is larger than {MAX_CSV_BYTES // (1024 * 1024)} MB")
    for signature, what in NOT_CSV_SIGNATURES.items():
        if content.startswith(signature):
            raise UnreadableFile(f"this is {what}, not CSV")
    if b"\x00" in content:
        raise UnreadableFile("this is not a text file (it holds NUL bytes)")
    try:
        text = content.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise UnreadableFile(
            f"the file is not UTF-8 text (byte {error.start}); save it as CSV UTF-8"
        ) from error
    first_line = text.split("\n", 1)[0]
    if not first_line.strip():
        raise UnreadableFile("the file is empty: its first line must name the columns")
    separator = max(SEPARATORS, key=first_line.count)
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=separator, strict=True)
    try:
        lines = list(reader)
    except csv.Error as error:
        raise UnreadableFile(f"the file is not valid CSV: {error}") from error
    header = [name.strip().lower() for name in lines[0]]
    duplicated = sorted({name for name in header if header.count(name) > 1 and name})
    if duplicated:
        raise UnreadableFile(f"columns named more than once: {', '.join(duplicated)}")
    table = Table(header=header, decimal_comma=separator == ";")
    for number, cells in enumerate(lines[1:], start=2):
        if not any(cell.strip() for cell in cells):
            continue
        if len(cells) > len(header):
            raise UnreadableFile(f"row {number} has more cells than the header has columns")
        table.rows.append(
            (number, {name: cell.strip() for name, cell in zip(header, cells, strict=False)})
        )
    return table


def unit_header(table: Table, column: UnitColumn) -> str | None:
    """Which of the column's headers the file uses; UnreadableFile if more than one."""
    present = [header for header in column.headers if header in table.header]
    if len(present) > 1:
        raise UnreadableFile(f"give {column.field} in one unit only, not {', '.join(present)}")
    return present[0] if present else None


def number(table: Table, text: str) -> float:
    """A cell's number, with the file's decimal mark. ValueError if it is no finite number."""
    try:
        value = float(text.replace(",", ".") if table.decimal_comma else text)
    except ValueError:
        raise ValueError(f"'{text}' is not a number") from None
    if value != value or value in (float("inf"), float("-inf")):
        raise ValueError(f"'{text}' is not a finite number")
    return value


def number_in_program_unit(table: Table, text: str, column: UnitColumn, header: str) -> float:
    """A cell's number converted from its header's unit to the program's."""
    return convert(number(table, text), column.headers[header], column.program_unit)


_FIGURE_IN_PROGRAM_UNIT = re.compile(r"(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?) (kPa\(g\)|°C|mm|kg/h)")


def in_file_units(message: str, units: dict[str, str]) -> str:
    """A message's figures in the units the file gave them in: `units` maps each
    program unit to the file's ('kPa(g)' -> 'psig'), so a US file hears psig.

    >>> in_file_units("the return pressure (206.843 kPa(g)) must be below", {"kPa(g)": "psig"})
    'the return pressure (30 psig) must be below'
    """

    def converted(match: re.Match[str]) -> str:
        figure, program_unit = float(match.group(1)), match.group(2)
        file_unit = units.get(program_unit, program_unit)
        if file_unit == program_unit:
            return match.group(0)
        return f"{convert(figure, program_unit, file_unit):.5g} {file_unit}"

    return _FIGURE_IN_PROGRAM_UNIT.sub(converted, message)


def yes_or_no(text: str) -> bool:
    word = text.strip().lower()
    if word in TRUE_WORDS:
        return True
    if word in FALSE_WORDS:
        return False
    raise ValueError(f"'{text}' is neither yes nor no")


def word(text: str) -> str:
    """A vocabulary cell as the program writes it: 'Blow through' -> 'blow_through'."""
    return text.strip().lower().replace(" ", "_").replace("-", "_")


# A text cell a spreadsheet would run as a formula begins with one of these (OWASP, "CSV
# Injection"): "=1+1", "=HYPERLINK(...)", "@SUM(...)", "+cmd|...".
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")
TEXT_MARK = "'"  # a spreadsheet shows a cell led by an apostrophe as the text after it


def could_run_as_formula(text: str) -> bool:
    """True where a spreadsheet would take this text for a formula.

    >>> could_run_as_formula("=HYPERLINK(A1)"), could_run_as_formula("F-12 leaks")
    (True, False)
    """
    return text.startswith(FORMULA_STARTS)


def spreadsheet_text(text: str) -> str:
    """Text that a spreadsheet shows as written, never runs: one that would start a
    formula is led by an apostrophe (OWASP, "CSV Injection"). `as_typed` undoes it.

    >>> spreadsheet_text("=1+1"), spreadsheet_text("-"), spreadsheet_text("lagging torn")
    ("'=1+1", "'-", 'lagging torn')
    """
    return TEXT_MARK + text if could_run_as_formula(text) else text


def as_typed(text: str) -> str:
    """A text cell as it was typed before `spreadsheet_text` marked it, so an exported
    file imports back to the same text.

    >>> as_typed("'=1+1"), as_typed("'quoted'")
    ('=1+1', "'quoted'")
    """
    unmarked = text.removeprefix(TEXT_MARK)
    return unmarked if could_run_as_formula(unmarked) else text


def csv_chunks(
    header: list[str], rows: Iterable[list[object]], rows_per_chunk: int = 1000
) -> Iterator[str]:
    """CSV text (comma-separated, CRLF line ends as RFC 4180) of a header and its rows, a
    chunk of `rows_per_chunk` rows at a time, its text safe to open in a spreadsheet
    (`spreadsheet_text`); numbers stay numbers."""
    out = io.StringIO()
    writer = csv.writer(out)
    writer.writerow(header)
    for number, row in enumerate(rows, start=1):
        writer.writerow(
            [
                "" if cell is None else spreadsheet_text(cell) if isinstance(cell, str) else cell
                for cell in row
            ]
        )
        if number % rows_per_chunk == 0:
            yield out.getvalue()
            out.seek(0)
            out.truncate()
    yield out.getvalue()


def write_table(header: list[str], rows: Iterable[list[object]]) -> str:
    """The whole of `csv_chunks` as one text.

    >>> write_table(["tag", "notes"], [["F-1", "=1+1"]])
    "tag,notes\\r\\nF-1,'=1+1\\r\\n"
    """
    return "".join(csv_chunks(header, rows))

"""notelsp reads mendeleev's SQLite file itself; every value must equal what mendeleev's own API returns."""

from __future__ import annotations

import math
import sqlite3

import pytest

from notelsp import elements

mendeleev_fetch = pytest.importorskip("mendeleev.fetch")

# Element field -> the column of mendeleev's "elements" table it comes from.
FIELD_COLUMNS = {
    "symbol": "symbol",
    "name": "name",
    "number": "atomic_number",
    "group": "group_id",
    "period": "period",
    "block": "block",
    "electronegativity": "en_pauling",
    "covalent_radius_pm": "covalent_radius_pyykko",
    "double_bond_radius_pm": "covalent_radius_pyykko_double",
    "triple_bond_radius_pm": "covalent_radius_pyykko_triple",
}
# The Python type each field holds when it has a value.
FIELD_TYPES = {"symbol": str, "name": str, "number": int, "group": int, "period": int, "block": str,
               "electronegativity": float, "covalent_radius_pm": float, "double_bond_radius_pm": float,
               "triple_bond_radius_pm": float}


def _missing(value: object) -> bool:
    return value is None or (isinstance(value, float) and math.isnan(value))


@pytest.fixture(scope="module")
def reference():
    """mendeleev's own reading of its database (pandas through SQLAlchemy)."""
    frame = mendeleev_fetch.fetch_table("elements")
    absent = sorted(set(FIELD_COLUMNS.values()) - set(frame.columns))
    assert not absent, f"mendeleev's elements table has no column {', '.join(absent)}: notelsp reads these"
    return frame


def test_every_field_covers_the_dataclass():
    assert set(FIELD_COLUMNS) == set(elements.Element.__dataclass_fields__) == set(FIELD_TYPES)
    assert set(FIELD_COLUMNS.values()) == set(elements.COLUMNS)


def test_every_element_and_field_equals_mendeleevs_api(reference):
    table = elements.read_database(elements.database_path())
    assert sorted(table) == sorted(reference["symbol"])
    differences = []
    for row in reference.to_dict("records"):
        ours = table[row["symbol"]]
        for field, column in FIELD_COLUMNS.items():
            theirs, mine = row[column], getattr(ours, field)
            if _missing(theirs):
                same = mine is None
            else:  # pandas widens a column with gaps to float: 3.0 stands for group 3
                same = mine == theirs and type(mine) is FIELD_TYPES[field]
            if not same:
                differences.append(f"{row['symbol']}.{field}: notelsp {mine!r}, mendeleev {theirs!r}")
    assert not differences, "\n".join(differences)


def test_the_process_table_is_the_database(reference):
    assert elements.table() == elements.read_database(elements.database_path())
    assert elements.element("Cl").number == 17  # common practice, no source
    assert elements.by_name("fluorine") is elements.element("F")


def test_a_database_without_a_needed_column_is_a_clear_error(tmp_path):
    database = tmp_path / "elements.db"
    kept = [column for column in elements.COLUMNS if column != "en_pauling"]
    with sqlite3.connect(database) as connection:
        connection.execute(f"CREATE TABLE elements ({', '.join(kept)})")
    connection.close()
    with pytest.raises(elements.ElementDataError, match="no column en_pauling"):
        elements.read_database(database)


def test_a_missing_database_is_a_clear_error(tmp_path):
    with pytest.raises(elements.ElementDataError, match="cannot read"):
        elements.read_database(tmp_path / "absent.db")

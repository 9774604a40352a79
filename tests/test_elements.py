"""notelsp reads mendeleev's SQLite file itself; every value must equal what mendeleev's own API returns."""

from __future__ import annotations

import math
import os
import sqlite3
import subprocess
import sys

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


# --- the rows kept in the user's cache folder ---------------------------------------------------


@pytest.fixture
def cache_home(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "cache"))
    return tmp_path / "cache" / "notelsp" / elements.cache_file_name(elements.database_path())


def _database_reads(monkeypatch) -> list:
    """The paths the database is read from from now on."""
    read: list = []
    original = elements._database_rows
    monkeypatch.setattr(elements, "_database_rows", lambda path: read.append(path) or original(path))
    return read


def test_the_rows_read_are_kept_and_read_back_as_the_database_gives_them(cache_home, monkeypatch):
    from_database = elements.read_database(elements.database_path())
    assert elements._load() == from_database and cache_home.is_file()
    read = _database_reads(monkeypatch)
    assert elements._load() == from_database and read == []


def test_a_later_process_reads_the_cache_without_sqlite3(cache_home, tmp_path):
    elements._load()
    script = ("import sys; from notelsp import elements; table = elements.table(); "
              "print(len(table), table['Cl'].electronegativity, 'sqlite3' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", script], env={**os.environ, "XDG_CACHE_HOME": str(tmp_path / "cache")},
                          capture_output=True, text=True, check=True)
    assert done.stdout.split() == ["118", "3.16", "False"]  # chlorine's Pauling electronegativity (common practice, no source)


def test_rows_kept_from_another_database_are_not_used_and_both_are_kept(cache_home, monkeypatch, tmp_path):
    elements._load()
    copy = tmp_path / "elements.db"
    copy.write_bytes(elements.database_path().read_bytes())  # the same rows, but another file: read it
    expected = elements.read_database(copy)
    original = elements.database_path()
    monkeypatch.setattr(elements, "database_path", lambda: copy)
    read = _database_reads(monkeypatch)
    assert elements._load() == expected and read == [copy]
    # each database keeps its own file: going back to the first (another environment) reads no database
    monkeypatch.setattr(elements, "database_path", lambda: original)
    assert elements._load() == expected and read == [copy]


@pytest.mark.parametrize("damage", ["garbage", "truncated", "rows of another shape", "writable by others"])
def test_a_damaged_or_foreign_cache_file_means_reading_the_database(cache_home, monkeypatch, damage):
    import marshal

    from_database = elements._load()
    data = cache_home.read_bytes()
    if damage == "garbage":
        cache_home.write_bytes(b"\x00\xff" * 40)
    elif damage == "truncated":
        cache_home.write_bytes(data[: len(data) // 2])
    elif damage == "rows of another shape":
        length = int.from_bytes(data[:4], "little")
        cache_home.write_bytes(data[: 4 + length] + marshal.dumps((("H", None, None),)))
    else:
        os.chmod(cache_home, 0o666)
    read = _database_reads(monkeypatch)
    assert elements._load() == from_database and read == [elements.database_path()]

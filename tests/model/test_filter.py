"""The --where filter language: precedence, every operator, errors at the right column.

The language is pqtriage's own (docs/inventory-format.md, "Views"); the values checked come from
the small fixed inventory of tests/formats (verdicts computed by hand in tests/formats/test_table.py).
"""

from __future__ import annotations

import pytest

from pqtriage.errors import UsageError
from pqtriage.model.filter import parse_filter, tokenize
from pqtriage.model.view import check_group_field, groups, select
from tests.formats.test_table import small_result


def _ids(expression: str) -> list[str]:
    result = small_result()
    return [item.system.id for item in select(result, parse_filter(expression)).items]


@pytest.mark.parametrize("expression, expected", [
    ("verdict = exposed", ["crew-archive"]),
    ("verdict >= exposed", ["legacy-link", "crew-archive"]),          # more urgent than or as urgent as
    ("verdict < unassessed", ["ticket-web", "pq-backup"]),
    ("criticality >= high", ["ticket-web"]),
    ("criticality in (high, critical) or verdict = unassessed", ["mystery", "ticket-web"]),
    ("not verdict = within-margin and exposure = internal", ["legacy-link", "crew-archive", "mystery", "pq-backup"]),
    ("verdict = exposed or verdict = classically-broken and exposure = internet", ["crew-archive"]),  # and first
    ("(verdict = exposed or verdict = classically-broken) and exposure = internal", ["legacy-link", "crew-archive"]),
    ("algorithm ~ rsa", ["crew-archive"]),                               # contains, any case
    ("algorithm = RSA-3072", ["crew-archive"]),                          # the resolved name
    ("name = \"Crew records archive\"", ["crew-archive"]),
    ("owner is empty and rank <= 2", ["legacy-link", "crew-archive"]),
    ("start_by < 2027-01-01", ["legacy-link", "crew-archive"]),
    ("shelf_life_years > 10", ["crew-archive"]),
    ("purpose = encryption", ["legacy-link", "mystery", "ticket-web"]),
    ("id != mystery and id != pq-backup", ["legacy-link", "crew-archive", "ticket-web"]),
    ("extra.cost_centre = x", []),
    ("high_value_asset", []),
])
def test_expressions(expression: str, expected: list[str]) -> None:
    assert _ids(expression) == expected


@pytest.mark.parametrize("expression, message", [
    ("critcality = high", "--where, column 1: unknown field 'critcality'; did you mean 'criticality'?"),
    ("criticality >= hgh", "--where, column 16: 'hgh' is not a value of criticality; did you mean 'high'?"),
    ("verdict = exposed and", "--where, column 22: the expression ends too early; complete it: FIELD = VALUE"),
    ("owner < b", "--where, column 7: 'owner' has no order, so '<' does not apply; use =, != or ~"),
    ("owner = Payments team", "--where, column 18: unexpected 'team'; join tests with 'and' or 'or'"),
    ("owner = 'Pay", "--where, column 9: unexpected character \"'\""),
    ("(verdict = exposed", "--where, column 19: the expression ends too early"),
    ("rank > many", "--where, column 8: 'rank' is a number, not 'many'"),
    ("start_by < soon", "--where, column 12: 'start_by' is a date, not 'soon'; write YYYY-MM-DD"),
    ("owner", "--where, column 6: 'owner' needs a comparison; write for example owner = VALUE"),
    ("", "--where, column 1: the expression is empty"),
    ("owner in Payments", "--where, column 10: expected '(' after 'in'"),
    ("owner is full", "--where, column 10: expected 'empty' after 'is'"),
])
def test_errors_point_at_the_column(expression: str, message: str) -> None:
    with pytest.raises(UsageError) as caught:
        parse_filter(expression)
    assert caught.value.diagnostics().startswith(message)


def test_never_evaluated_as_python() -> None:
    # Python syntax is not this language: it is refused, never run.
    with pytest.raises(UsageError):
        parse_filter("__import__('os').system('true')")
    assert [t.kind for t in tokenize('a = "x\\"y" and (b)')] == ["word", "op", "quoted", "keyword", "paren", "word",
                                                               "paren"]


def test_select_keeps_ranks_and_counts_what_is_hidden() -> None:
    result = small_result()
    view = select(result, parse_filter("verdict >= exposed"), top=1)
    assert [(i.rank, i.system.id) for i in view.items] == [(1, "legacy-link")]
    assert view.summary == result.summary  # counts stay those of the whole inventory
    selection = view.selection
    assert (selection.total, selection.matched, selection.hidden_unassessed) == (5, 2, 1)
    assert selection.describe() == (
        "Showing 1 of 5 systems (systems matching --where \"verdict >= exposed\", the top 1). 1 unassessed system "
        "is not shown: it is not safe, check it in the full result.")


def test_groups_in_order() -> None:
    result = small_result()
    assert [(label, [i.system.id for i in items]) for label, items in groups(result, "verdict")] == [
        ("classically-broken", ["legacy-link"]), ("exposed", ["crew-archive"]), ("unassessed", ["mystery"]),
        ("within-margin", ["ticket-web"]), ("quantum-resistant", ["pq-backup"])]
    assert [label for label, _ in groups(result, "owner")] == ["(none)"]
    assert check_group_field("Business_Unit") == "business_unit"
    with pytest.raises(UsageError) as caught:
        check_group_field("ower")
    assert "did you mean 'owner'?" in caught.value.diagnostics()

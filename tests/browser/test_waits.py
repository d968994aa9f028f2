"""The waiting helper of the browser tests compares values the way the page serialises them."""
import sys; sys.path.insert(0, "tests/browser")
from _waits import eventually
import pytest
def test_eventually_lists(web):
    page = web.page
    page.set_content("<div id=x>é</div>")
    eventually(page, "[1, 'é', {a: 2}]", [1, "é", {"a": 2}])
    eventually(page, "[arg, 3]", [2, 3], arg=2)
    with pytest.raises(AssertionError, match="still"):
        eventually(page, "[1]", [2], timeout=500)

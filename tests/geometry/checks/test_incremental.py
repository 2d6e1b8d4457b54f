"""The runner's sorted findings are patched, not rebuilt: the patch equals a fresh sort, and where
two different findings sort alike (only a fresh run's order tells them apart) it gives way."""

from __future__ import annotations

import random

from geometry.checks.incremental import IncrementalChecks, finding_order
from geometry.findings import Finding, Severity


def _finding(rng: random.Random, rule: str = "rule") -> Finding:
    return Finding(rng.choice(["E-A", "E-B", "W-C"]), rng.choice(list(Severity)), "message", ("x",),
                   (float(rng.randrange(5)), float(rng.randrange(5))), rule, "source")


def test_patched_findings_equal_a_fresh_sort() -> None:
    rng = random.Random(3)
    runner = IncrementalChecks()
    held = [_finding(rng) for _ in range(40)]
    runner._sorted = sorted(held, key=finding_order)  # the state under test
    for _ in range(30):
        out = rng.sample(held, min(3, len(held)))
        new = [_finding(rng) for _ in range(rng.randrange(6))]
        for finding in out:
            held.remove(finding)
        held.extend(new)
        assert runner._patch_sorted(out, new)  # invariant: equal findings may sort alike
        assert runner._sorted == sorted(held, key=finding_order)  # identity: the patch is the sort


def test_two_different_findings_sorting_alike_give_way_to_a_fresh_sort() -> None:
    rng = random.Random(5)
    first = _finding(random.Random(9), rule="one rule")
    runner = IncrementalChecks()
    runner._sorted = sorted([first, *(_finding(rng) for _ in range(10))], key=finding_order)
    twin = _finding(random.Random(9), rule="another rule")
    assert finding_order(twin) == finding_order(first)  # identity: the rule is not in the sort key
    assert not runner._patch_sorted([], [twin])  # invariant: the order of the two is a fresh run's

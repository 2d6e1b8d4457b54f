"""The Qt-free command stack (app/model/commands.py). Expected values are identities of the stack's
own rules (undo goes to ``before``, redo to ``after``, merge keeps the first ``before``)."""

from itertools import pairwise

import pytest

from app.model.commands import Command, CommandStack, move_vertex_merge_key
from app.model.elements import Layout


def layouts(count: int) -> list[Layout]:
    return [Layout(title=f"state {n}") for n in range(count)]


def push_chain(stack: CommandStack, states: list[Layout], key: object = None) -> None:
    for before, after in pairwise(states):
        stack.push(Command(f"to {after.title}", before, after, key))


def test_undo_and_redo_walk_the_states_exactly() -> None:
    states = layouts(4)
    stack = CommandStack()
    push_chain(stack, states)
    assert stack.undo_label == "to state 3" and stack.redo_label is None  # identity
    assert stack.undo() is states[2] and stack.undo() is states[1] and stack.undo() is states[0]  # identity
    assert stack.undo() is None and not stack.can_undo  # identity
    assert stack.redo_label == "to state 1"  # identity
    assert stack.redo() is states[1] and stack.redo() is states[2] and stack.redo() is states[3]  # identity
    assert stack.redo() is None and not stack.can_redo  # identity


def test_push_after_undo_drops_the_redo_branch() -> None:
    states = layouts(3)
    stack = CommandStack()
    push_chain(stack, states)
    stack.undo()
    other = Layout(title="other")
    stack.push(Command("other", states[1], other))
    assert not stack.can_redo and len(stack) == 2 and stack.undo() is states[1]  # identity


def test_same_merge_key_merges_into_one_command_with_the_first_before_and_label() -> None:
    states = layouts(5)
    stack = CommandStack()
    push_chain(stack, states, key=move_vertex_merge_key("twy-1", 2))
    assert len(stack) == 1 and stack.undo_label == "to state 1"  # identity
    assert stack.undo() is states[0] and stack.redo() is states[4]  # identity


def test_different_or_missing_merge_keys_do_not_merge() -> None:
    states = layouts(4)
    stack = CommandStack()
    stack.push(Command("a", states[0], states[1], move_vertex_merge_key("twy-1", 2)))
    stack.push(Command("b", states[1], states[2], move_vertex_merge_key("twy-1", 3)))
    stack.push(Command("c", states[2], states[3]))
    assert len(stack) == 3  # identity


def test_no_merge_onto_a_command_whose_after_is_not_the_new_before() -> None:
    states = layouts(4)
    stack = CommandStack()
    key = ("move-vertex", "twy-1", 0)
    stack.push(Command("a", states[0], states[1], key))
    stack.push(Command("b", states[2], states[3], key))
    assert len(stack) == 2  # identity


def test_no_merge_across_a_save_so_undo_still_reaches_the_saved_state() -> None:
    states = layouts(3)
    stack = CommandStack()
    key = move_vertex_merge_key("twy-1", 0)
    stack.push(Command("a", states[0], states[1], key))
    stack.mark_clean()
    stack.push(Command("b", states[1], states[2], key))
    assert len(stack) == 2 and not stack.is_clean  # identity
    assert stack.undo() is states[1] and stack.is_clean  # identity


def test_clean_flag_survives_undo_and_redo_back_to_the_saved_state() -> None:
    states = layouts(4)
    stack = CommandStack()
    assert stack.is_clean  # identity: a fresh stack is the opened (saved) state
    push_chain(stack, states[:3])
    stack.mark_clean()
    stack.push(Command("x", states[2], states[3]))
    assert not stack.is_clean  # identity
    stack.undo()
    assert stack.is_clean  # identity
    stack.undo()
    assert not stack.is_clean  # identity
    stack.redo()
    assert stack.is_clean  # identity


def test_clean_state_is_lost_for_good_when_its_branch_is_discarded() -> None:
    states = layouts(3)
    stack = CommandStack()
    push_chain(stack, states)
    stack.mark_clean()
    stack.undo()
    stack.push(Command("branch", states[1], Layout(title="branch")))
    stack.undo()
    assert not stack.is_clean  # identity: states[2] is no longer reachable
    stack.redo()
    assert not stack.is_clean  # identity


def test_limit_drops_the_oldest_commands() -> None:
    states = layouts(8)
    stack = CommandStack(limit=5)
    push_chain(stack, states)
    assert len(stack) == 5  # identity: 7 pushes, limit 5
    undone = [stack.undo() for _ in range(6)]
    assert undone[:5] == states[6:1:-1] and undone[5] is None  # identity


def test_limit_trimming_keeps_clean_tracking_in_step() -> None:
    states = layouts(5)
    stack = CommandStack(limit=3)
    push_chain(stack, states[:3])      # 2 commands, index 2
    stack.mark_clean()
    push_chain(stack, states[2:])      # 2 more, one dropped from the bottom
    stack.undo()
    stack.undo()
    assert stack.is_clean  # identity
    push_chain(stack, states[2:])      # the saved position is now the bottom of the stack
    stack.push(Command("x", states[4], Layout(title="x")))
    stack.push(Command("y", Layout(title="x"), Layout(title="y")))  # drops the saved position
    assert not stack.is_clean  # identity
    while stack.undo() is not None:
        assert not stack.is_clean  # identity


def test_clear_forgets_everything_and_is_clean() -> None:
    stack = CommandStack()
    push_chain(stack, layouts(3))
    stack.clear()
    assert (len(stack), stack.can_undo, stack.can_redo, stack.is_clean) == (0, False, False, True)  # identity
    assert stack.undo_label is None and stack.redo_label is None  # identity


def test_limit_must_be_positive() -> None:
    with pytest.raises(ValueError, match="at least 1"):
        CommandStack(limit=0)
    assert CommandStack().limit == 500  # identity: DEFAULT_UNDO_LIMIT, the brief's example

"""Model building as steps, so that many models are built together with array kernels.

A model is built by a generator (a *step function*) that does its own cheap work in Python and, for each
expensive numeric kernel, yields a :class:`Need` (the kernel's inputs) and receives the kernel's answer back
(or has the kernel's :class:`~assaycut.errors.AssaycutError` raised at that point).  :func:`run_together`
advances many step functions side by side and answers all their pending needs of one kind with one array call
(:meth:`Need.together`); one model is a batch of one (:func:`run_one`), so there is one way to build a model.

Why generators rather than stages over rows: each assay takes its own branches (a weight-basis curve refits
until its nodes close, light ends placed or not, extensions front and back, densities from narrow cuts or
at constant Watson K, measured or estimated sulfur), and a step function reads as the one assay's sequence of
decisions, with the kernels shared.  The row-wise stages written for the uncertainty draws
(:mod:`assaycut.model.draws`, common branches only) took more lines than the step functions for all branches.

Nothing here knows about assays or curves: the needs are defined next to their kernels.
"""

from __future__ import annotations

from collections import defaultdict

from ..errors import AssaycutError


class Need:
    """A request for one numeric kernel's answer; subclasses define the kernel in :meth:`together`."""

    __slots__ = ()

    @classmethod
    def together(cls, needs: list) -> list:
        """Answers to many problems of this kind (one of them alone is a batch of one), in order; an
        AssaycutError in place of a refused one.  Each answer depends on its own problem alone."""
        raise NotImplementedError


def run_one(steps):
    """Run one step function to its end (:func:`run_together` of one); its return value, or the AssaycutError
    that ended it raised."""
    result = run_together([steps])[0]
    if isinstance(result, AssaycutError):
        raise result
    return result


def run_together(all_steps: list) -> list:
    """Run many step functions side by side; each one's return value, or the AssaycutError that ended it.

    In each round every unfinished step function has one pending need; the needs are grouped by kind and each
    group is answered by one :meth:`Need.together` call.  Errors other than AssaycutError (programming
    errors) propagate.
    """
    results: list = [None] * len(all_steps)
    pending: dict[int, Need] = {}

    def advance(i, answer=None, first=False):
        g = all_steps[i]
        try:
            if first:
                pending[i] = next(g)
            elif isinstance(answer, AssaycutError):
                pending[i] = g.throw(answer)
            else:
                pending[i] = g.send(answer)
        except StopIteration as stop:
            results[i] = stop.value
        except AssaycutError as e:
            results[i] = e

    for i in range(len(all_steps)):
        advance(i, first=True)
    while pending:
        groups: dict[type, list[int]] = defaultdict(list)
        for i, need in pending.items():
            groups[type(need)].append(i)
        current = dict(pending)
        pending.clear()
        for kind, idx in groups.items():
            answers = kind.together([current[i] for i in idx])
            for i, answer in zip(idx, answers):
                advance(i, answer)
    return results

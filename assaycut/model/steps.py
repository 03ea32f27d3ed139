"""Model building as steps, so that many models can be built together with array kernels.

A model is built by a generator (a *step function*) that does its own cheap work in Python and, for each
expensive numeric kernel, yields a :class:`Need` (the kernel's inputs) and receives the kernel's answer back
(or has the kernel's :class:`~assaycut.errors.AssaycutError` raised at that point).  The same step function
then runs in two ways:

* :func:`run_alone` answers every need with the one-problem kernel (:meth:`Need.alone`): the reference path,
  what :func:`assaycut.model.crude.build_model` does;
* :func:`run_together` advances many step functions side by side and answers all their pending needs of one
  kind with one array call (:meth:`Need.together`), row by row the same arithmetic as the one-problem kernel,
  so each model is the one :func:`run_alone` gives (the tests compare them to the last bit).

Nothing here knows about assays or curves: the needs are defined next to their kernels.
"""

from __future__ import annotations

from collections import defaultdict

from ..errors import AssaycutError


class Need:
    """A request for one numeric kernel's answer; subclasses define the kernel.

    Subclasses implement :meth:`alone` (the one-problem kernel) and may implement :meth:`together` (the same
    kernel over many problems at once, each answer equal to :meth:`alone`'s).
    """

    __slots__ = ()

    def alone(self):
        """The answer to this one problem (raises an AssaycutError where the kernel refuses it)."""
        raise NotImplementedError

    @classmethod
    def together(cls, needs: list) -> list:
        """Answers to many problems of this kind, in order; an AssaycutError in place of a refused one.

        The default answers them one at a time.
        """
        out = []
        for n in needs:
            try:
                out.append(n.alone())
            except AssaycutError as e:
                out.append(e)
        return out


def run_alone(steps):
    """Run one step function to its end with the one-problem kernels; its return value.

    An AssaycutError raised by a kernel is raised inside the step function where it yielded (so it behaves
    as if the kernel had been called there).
    """
    try:
        need = next(steps)
        while True:
            try:
                answer = need.alone()
            except AssaycutError as e:
                need = steps.throw(e)
                continue
            need = steps.send(answer)
    except StopIteration as stop:
        return stop.value


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

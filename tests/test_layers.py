"""The package's layers: imports run one way, down the data flow, and no modules import each other in a loop.

The layers are the import-linter contract in ``.importlinter`` (top to bottom: cli, ui, batch, review,
signing, render, records, runs, cases, calcs, equipment, properties, units, errors).
"""

from pathlib import Path

import grimp
from importlinter.cli import lint_imports

ROOT = Path(__file__).resolve().parent.parent


def test_import_linter_layers_contract_is_kept(monkeypatch):
    monkeypatch.chdir(ROOT)
    assert lint_imports(config_filename=str(ROOT / ".importlinter"), no_cache=True) == 0


def _cycles(graph, modules):
    """Strongly connected components of more than one module (Tarjan's algorithm)."""
    index, low, stack, on_stack, found = {}, {}, [], set(), []

    def visit(node):
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for nxt in graph.find_modules_directly_imported_by(node):
            if nxt not in modules:
                continue
            if nxt not in index:
                visit(nxt)
                low[node] = min(low[node], low[nxt])
            elif nxt in on_stack:
                low[node] = min(low[node], index[nxt])
        if low[node] == index[node]:
            component = set()
            while True:
                member = stack.pop()
                on_stack.discard(member)
                component.add(member)
                if member == node:
                    break
            if len(component) > 1:
                found.append(sorted(component))

    for module in sorted(modules):
        if module not in index:
            visit(module)
    return found


def test_no_import_cycles_between_modules():
    graph = grimp.build_graph("steamcalc", cache_dir=None)
    modules = graph.modules
    assert _cycles(graph, modules) == []

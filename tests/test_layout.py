"""The package's shape: stages import one way, and never another package's private modules.

The stage order is the pipeline's (DEVELOPERS.md): a module may import from its own
stage and from earlier ones only.  An underscored module is private to its package.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "synccore"

STAGES = (
    ("errors", "units", "_version"),
    ("spec",),
    ("timings",),
    ("model",),
    ("clocking",),
    ("analog",),
    ("emit",),
    ("amaranth",),
    ("verification",),
    ("picture",),
    ("api",),
    ("cli", "__main__", "__init__"),
)
RANK = {name: i for i, names in enumerate(STAGES) for name in names}


def _modules() -> list[Path]:
    return sorted(PACKAGE.rglob("*.py"))


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _imports(path: Path) -> list[tuple[int, str]]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    found: list[tuple[int, str]] = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            found.append((node.lineno, node.module))
            found += [(node.lineno, f"{node.module}.{a.name}") for a in node.names]
        elif isinstance(node, ast.Import):
            found += [(node.lineno, a.name) for a in node.names]
        elif isinstance(node, ast.ImportFrom) and node.level:
            found.append((node.lineno, "." * node.level + (node.module or "")))
    return found


def _stage(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "__init__"


@pytest.mark.parametrize("path", _modules(), ids=lambda p: str(p.relative_to(PACKAGE)))
def test_imports_run_one_way(path: Path) -> None:
    me = _module_name(path)
    my_stage = _stage(me)
    assert my_stage in RANK, f"{me}: stage {my_stage!r} is not in the stage order"
    bad = []
    for line, target in _imports(path):
        if target.startswith("."):
            bad.append(f"{path.name}:{line}: relative import {target!r}; write it absolutely")
            continue
        if not target.startswith("synccore.") or target.count(".") < 1:
            continue
        stage = _stage(target)
        if stage not in RANK:
            continue  # a name imported from the top package, e.g. synccore.__version__
        if RANK[stage] > RANK[my_stage]:
            bad.append(f"{path.name}:{line}: {me} (stage {my_stage}) imports the later {target}")
        parts = target.split(".")
        for i, part in enumerate(parts[1:], start=1):
            owner = ".".join(parts[:i])
            if part.startswith("_") and not part.startswith("__") and not me.startswith(owner):
                bad.append(f"{path.name}:{line}: {me} imports {target}, private to {owner}")
                break
    assert not bad, "\n".join(bad)

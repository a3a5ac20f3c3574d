"""The built-in functions listed by Excel's categories, as the README shows them (a test keeps
the README equal to :func:`builtin_list`, so the registry is the one source).

>>> "**Logical**: AND," in builtin_list()
True
"""

from __future__ import annotations

from .evaluate import BUILTINS

OUT_OF_SCOPE = ("Cube", "Web")


def categories() -> dict[str, str]:
    """Excel's category of each function it lists (upper-case name -> category)."""
    from ..data import load

    return {name: cat for cat, names in load("excel/functions")["categories"].items() for name in names}


def builtin_list() -> str:
    """One Markdown line per category: the built-ins of that category, sorted."""
    category = categories()
    by_category: dict[str, list[str]] = {}
    for name in BUILTINS:
        by_category.setdefault(category.get(name, "Other"), []).append(name)
    return "\n".join(f"- **{cat}**: {', '.join(sorted(names))}" for cat, names in sorted(by_category.items())) + "\n"


if __name__ == "__main__":
    print(builtin_list(), end="")

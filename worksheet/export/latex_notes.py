"""Notes (Markdown) converted to LaTeX from markdown-it's token stream, all text escaped."""

from __future__ import annotations

from collections.abc import Sequence

from markdown_it.token import Token

from worksheet.export.latex_text import escape_text, texttt
from worksheet.export.note_math import safe_tex_math
from worksheet.export.notes import note_parser

_HEADINGS = (
    "section*",
    "subsection*",
    "subsubsection*",
    "paragraph",
    "subparagraph",
    "subparagraph",
)
_ENVIRONMENTS = {"bullet_list": "itemize", "ordered_list": "enumerate", "blockquote": "quote"}


def note_latex(text: str) -> str:
    """A note as LaTeX paragraphs, headings, lists, quotes, tables and code lines.

    >>> note_latex("# Budget\\n\\nA *rough* 5% & `x_1`.")
    '\\\\section*{Budget}\\n\\nA \\\\emph{rough} 5\\\\% \\\\& \\\\texttt{x\\\\_1}.\\n'
    """
    tokens = note_parser().parse(text)
    out: list[str] = []
    index = 0
    while index < len(tokens):
        token = tokens[index]
        kind = token.type
        if kind == "heading_open":
            level = int(token.tag[1:])
            out.append("\\" + _HEADINGS[level - 1] + "{")
        elif kind == "heading_close":
            out.append("}\n\n")
        elif kind == "paragraph_open":
            pass
        elif kind == "paragraph_close":
            out.append("\n" if token.hidden else "\n\n")
        elif kind == "inline":
            out.append(inline_latex(token.children or []))
        elif kind.endswith("_open") and kind[:-5] in _ENVIRONMENTS:
            out.append("\\begin{" + _ENVIRONMENTS[kind[:-5]] + "}\n")
        elif kind.endswith("_close") and kind[:-6] in _ENVIRONMENTS:
            out.append("\\end{" + _ENVIRONMENTS[kind[:-6]] + "}\n\n")
        elif kind == "list_item_open":
            out.append("\\item ")
        elif kind in ("math_block", "math_block_label"):
            out.append(math_latex(token.content, display=True) + "\n\n")
        elif kind in ("fence", "code_block"):
            out.append(code_lines_latex(token.content.split("\n")))
        elif kind == "hr":
            out.append("\\noindent\\rule{\\linewidth}{0.4pt}\n\n")
        elif kind == "table_open":
            end = _closing(tokens, index, "table_close")
            out.append(_table_latex(tokens[index + 1 : end]))
            index = end
        elif kind == "html_block":
            out.append(escape_text(token.content) + "\n\n")
        index += 1
    return "".join(out).rstrip("\n") + "\n"


def _closing(tokens: Sequence[Token], start: int, kind: str) -> int:
    for index in range(start, len(tokens)):
        if tokens[index].type == kind:
            return index
    return len(tokens) - 1


def code_lines_latex(lines: Sequence[str]) -> str:
    """Monospace lines, each escaped, spaces kept, in a left-aligned block."""
    lines = list(lines)
    while lines and not lines[-1]:
        lines.pop()
    shown = [texttt(line) if line else "~" for line in lines] or ["~"]
    return "\\begin{flushleft}\n" + "\\\\\n".join(shown) + "\n\\end{flushleft}\n\n"


def _table_latex(tokens: Sequence[Token]) -> str:
    rows: list[list[str]] = []
    header_rows = 0
    for token in tokens:
        if token.type == "tr_open":
            rows.append([])
        elif token.type == "inline" and rows:
            rows[-1].append(inline_latex(token.children or []))
        elif token.type == "thead_close":
            header_rows = len(rows)
    if not rows:
        return ""
    width = max(len(row) for row in rows)
    lines = ["\\begin{tabular}{" + "l" * width + "}", "\\hline"]
    for number, row in enumerate(rows, start=1):
        cells = row + [""] * (width - len(row))
        lines.append(" & ".join(cells) + " \\\\")
        if number == header_rows:
            lines.append("\\hline")
    lines += ["\\hline", "\\end{tabular}"]
    return "\n".join(lines) + "\n\n"


def inline_latex(children: Sequence[Token]) -> str:
    """Inline Markdown (emphasis, code, links, breaks) as LaTeX; links keep their address."""
    out: list[str] = []
    links: list[str] = []
    for token in children:
        kind = token.type
        if kind == "text":
            out.append(escape_text(token.content))
        elif kind == "softbreak":
            out.append("\n")
        elif kind == "hardbreak":
            out.append("\\\\\n")
        elif kind == "em_open":
            out.append("\\emph{")
        elif kind == "strong_open":
            out.append("\\textbf{")
        elif kind in ("em_close", "strong_close"):
            out.append("}")
        elif kind == "code_inline":
            out.append(texttt(token.content, keep_spaces=False))
        elif kind == "link_open":
            links.append(str(token.attrs.get("href", "")))
        elif kind == "link_close":
            href = links.pop() if links else ""
            if href:
                out.append(" (" + texttt(href, keep_spaces=False) + ")")
        elif kind == "html_inline":
            out.append(escape_text(token.content))
        elif kind in ("math_inline", "math_inline_double"):
            out.append(math_latex(token.content, display=kind == "math_inline_double"))
    return "".join(out)


def math_latex(source: str, display: bool = False) -> str:
    """A note's ``$...$`` as math when it passes the check in ``note_math``; else its text.

    >>> print(math_latex(r"T_H \\propto M^{-1}"), math_latex(r"\\input{x}"))
    \\(T_H \\propto M^{-1}\\) \\$\\textbackslash{}input\\{x\\}\\$
    """
    safe = safe_tex_math(source.strip())
    if safe is None:
        dollars = "\\$\\$" if display else "\\$"
        return dollars + escape_text(source) + dollars
    if display:
        return "\\[" + safe + "\\]"
    return "\\(" + safe + "\\)"

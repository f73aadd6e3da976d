#!/usr/bin/env python3
"""Functions of engine/ longer than about 80 lines must say why: a comment just above the
function (within its comment block) with the words "long because". Run by ctest; prints every
long function, with its length, and fails on one without its reason.

A plain scanner, not a C++ parser: comments and strings are blanked, then every brace pair whose
opening follows a parameter list at namespace or class level is a function body (lambdas and
blocks inside a function count in their function's lines). Lines are counted from the signature's
first line to the closing brace.

Usage: function_lengths.py ENGINE_DIR [LIMIT]
       function_lengths.py --self-test    # the scanner on made-up code whose answer is known
"""
import pathlib
import re
import sys

SCOPE = re.compile(r"\b(namespace|class|struct|union|enum)\b")
CONTROL = re.compile(r"^\s*(if|for|while|switch|catch|do|else|return)\b")


def blank(text: str) -> str:
    """Comments, strings and character literals as spaces, the newlines kept."""
    out, i, n = [], 0, len(text)
    while i < n:
        c = text[i]
        if text.startswith("//", i):
            j = text.find("\n", i)
            j = n if j < 0 else j
            out.append(" " * (j - i)); i = j
        elif text.startswith("/*", i):
            j = text.find("*/", i + 2)
            j = n if j < 0 else j + 2
            out.append(re.sub(r"[^\n]", " ", text[i:j])); i = j
        elif text.startswith('R"', i):
            m = re.match(r'R"([^(]*)\(', text[i:])
            end = text.find(")" + m.group(1) + '"', i) if m else -1
            j = n if end < 0 else end + len(m.group(1)) + 2
            out.append(re.sub(r"[^\n]", " ", text[i:j])); i = j
        elif c in "\"'" and not (c == "'" and i > 0 and text[i - 1].isalnum()):
            j = i + 1
            while j < n and text[j] != c:
                j += 2 if text[j] == "\\" else 1
            out.append(" " * (j + 1 - i)); i = j + 1
        else:
            out.append(c); i += 1
    return "".join(out)


def functions(text: str):
    """(first line, last line) of every function body at namespace or class level."""
    code = blank(text)
    stack = []  # for each open brace: True if it opens a scope (namespace/class), else False
    header_start = 0  # where the text before the current brace begins
    found = []
    i = 0
    while i < len(code):
        c = code[i]
        if c == "{":
            header = code[header_start:i]
            in_scope = all(stack)
            if in_scope and SCOPE.search(header) and "(" not in header.split("=")[0][-200:]:
                stack.append(True)
            elif in_scope and ")" in header and not CONTROL.match(header.strip()) \
                    and not header.rstrip().endswith("=") and "=" not in header.strip()[:1]:
                # A function body: find its matching brace.
                depth, j = 1, i + 1
                while j < len(code) and depth:
                    depth += {"{": 1, "}": -1}.get(code[j], 0)
                    j += 1
                sig = header_start + len(header) - len(header.lstrip())
                found.append((code.count("\n", 0, sig) + 1, code.count("\n", 0, j) + 1))
                i, header_start = j, j
                continue
            else:
                stack.append(False)
            header_start = i + 1
        elif c == "}":
            if stack:
                stack.pop()
            header_start = i + 1
        elif c == ";" or (c == ":" and code[i - 1:i + 1] != "::" and code[i:i + 2] != "::"
                          and re.search(r"\b(public|private|protected)\s*$", code[header_start:i])):
            header_start = i + 1
        i += 1
    return found


def self_test() -> int:
    """Made-up code: a namespace, a class with an inline member, a free function holding a
    lambda, an if block and a string with braces, a struct with an initializer."""
    body = "\n".join("  x += 1;" for _ in range(5))
    text = (
        "namespace a {\n"                       # 1
        "struct S { int v = {1}; };\n"          # 2
        "class C {\n"                           # 3
        " public:\n"                            # 4
        "  int f() const {\n"                   # 5
        "    return 1;\n"                       # 6
        "  }\n"                                 # 7
        "};\n"                                  # 8
        "// says \"{\" in a comment\n"           # 9
        "void g(int x) {\n"                     # 10
        "  auto l = [&](int y) { return y; };\n"  # 11
        "  if (x) { x = 2; }\n"                 # 12
        "  const char* s = \"}{\";\n"            # 13
        + body + "\n"                           # 14-18
        "}\n"                                   # 19
        "}  // namespace a\n")
    got = functions(text)
    want = [(5, 7), (10, 19)]
    print(f"self-test: found {got}, expected {want}")
    return 0 if got == want else 1


def main() -> int:
    if sys.argv[1] == "--self-test":
        return self_test()
    engine = pathlib.Path(sys.argv[1])
    limit = int(sys.argv[2]) if len(sys.argv) > 2 else 80
    unexplained = 0
    for source in sorted(engine.rglob("*")):
        if source.suffix not in (".hpp", ".cpp"):
            continue
        text = source.read_text()
        lines = text.split("\n")
        for first, last in functions(text):
            length = last - first + 1
            if length <= limit:
                continue
            # The comment block above the signature.
            above, k = [], first - 2
            while k >= 0 and (lines[k].strip().startswith("//") or lines[k].strip().startswith("template")):
                above.append(lines[k]); k -= 1
            reason = any("long because" in line.lower() for line in above)
            where = f"{source.relative_to(engine.parent)}:{first}"
            print(f"{where}: {length} lines, " + ("reason given" if reason else "NO reason written above it"))
            unexplained += 0 if reason else 1
    print(f"{unexplained} functions over {limit} lines without a reason")
    return 1 if unexplained else 0


if __name__ == "__main__":
    sys.exit(main())

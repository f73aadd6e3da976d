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

SCOPE = re.compile(r"^(extern\b|(namespace|class|struct|union|enum)\b)")
CONTROL = re.compile(r"^\s*(if|for|while|switch|catch|do|else|return)\b")
# What may follow a function's parameter list before its body.
QUALIFIERS = re.compile(r"(\s|const\b|noexcept\b(\s*\([^()]*\))?|override\b|final\b|mutable\b|"
                        r"volatile\b|&&?|->[^;{}]*|requires\b[^;{}]*)*")


def without_templates(header: str) -> str:
    """The header with every template parameter list `template <...>` removed (balanced)."""
    while True:
        m = re.search(r"\btemplate\s*<", header)
        if not m:
            return header
        depth, j = 1, m.end()
        while j < len(header) and depth:
            depth += {"<": 1, ">": -1}.get(header[j], 0)
            j += 1
        header = header[:m.start()] + header[j:]


def kind_of(header: str) -> str:
    """What the brace after `header` opens: "scope", "function", "initializer" (a member's
    brace initializer inside a constructor's initializer list) or "block"."""
    text = without_templates(header).strip()
    text = re.sub(r"\[\[[^\]]*\]\]", " ", text).strip()  # attributes
    if SCOPE.match(text):
        return "scope"
    if ")" not in text or CONTROL.match(text):
        return "block"
    if QUALIFIERS.fullmatch(text[text.rfind(")") + 1:]):
        return "function"
    if re.search(r"\)(\s|const\b|noexcept\b)*:(?!:)", text):
        # A constructor's initializer list: a brace right after a name initializes a member.
        return "initializer" if re.search(r"[\w>]\s*$", text) else "function"
    return "block"


def blank(text: str) -> str:
    """Comments, strings, character literals and preprocessor lines as spaces, the newlines
    kept."""
    text = re.sub(r"(?m)^[ \t]*#.*$", lambda m: " " * len(m.group(0)), text)
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
            kind = kind_of(header) if all(stack) else "block"
            if kind in ("function", "initializer"):
                depth, j = 1, i + 1
                while j < len(code) and depth:
                    depth += {"{": 1, "}": -1}.get(code[j], 0)
                    j += 1
                if kind == "initializer":
                    i = j  # the header goes on to the body's brace
                    continue
                sig = header_start + len(header) - len(header.lstrip())
                found.append((code.count("\n", 0, sig) + 1, code.count("\n", 0, j) + 1))
                i, header_start = j, j
                continue
            stack.append(kind == "scope")
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
    """Made-up code whose functions are known: a namespace, a class with an inline member and a
    constructor with brace initializers, a free function holding a lambda, a block and a string
    with braces, a template with a default argument, a table sized by sizeof, an extern "C"
    block, preprocessor lines and an operator()."""
    body = "\n".join("  x += 1;" for _ in range(5))
    text = "\n".join([
        "namespace a {",                         # 1
        "struct S { int v = {1}; };",            # 2
        "class C : public B<decltype(f(1))> {",  # 3
        " public:",                              # 4
        "  int f() const {",                     # 5
        "    return 1;",                         # 6
        "  }",                                   # 7
        "  C(int x) : a_{x}, b_(x) {",           # 8
        "  }",                                   # 9
        "  int a_, b_;",                         # 10
        "};",                                    # 11
        "// says \"{\" in a comment",             # 12
        "void g(int x) {",                       # 13
        "  auto l = [&](int y) { return y; };",  # 14
        "  if (x) { x = 2; }",                   # 15
        "  const char* s = \"}{\";",              # 16
        body,                                    # 17-21
        "}",                                     # 22
        "template <class T = int>",              # 23
        "T h() {",                               # 24
        "  return T{};",                         # 25
        "}",                                     # 26
        "std::array<int, sizeof(long)> t{1, 2};",  # 27
        "extern \"C\" {",                         # 28
        "#ifdef X",                              # 29
        "int k(int) {",                          # 30
        "#if Y > 1",                             # 31
        "  return 1;",                           # 32
        "#endif",                                # 33
        "  return 0;",                           # 34
        "}",                                     # 35
        "}",                                     # 36
        "struct D {",                            # 37
        "  int operator()(int v) const noexcept { return v; }",  # 38
        "  D() : m_{0} {}",                      # 39
        "  int m_;",                             # 40
        "};",                                    # 41
        "}  // namespace a",                     # 42
    ])
    got = functions(text)
    want = [(5, 7), (8, 9), (13, 22), (23, 26), (30, 35), (38, 38), (39, 39)]
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
            while k >= 0 and lines[k].strip().startswith(("//", "template", "#")):
                above.append(lines[k]); k -= 1
            reason = any("long because" in line.lower() for line in above)
            where = f"{source.relative_to(engine.parent)}:{first}"
            print(f"{where}: {length} lines, " + ("reason given" if reason else "NO reason written above it"))
            unexplained += 0 if reason else 1
    print(f"{unexplained} functions over {limit} lines without a reason")
    return 1 if unexplained else 0


if __name__ == "__main__":
    sys.exit(main())
